import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { ChartConfiguration, Plugin } from 'chart.js';
import { BaseChartDirective, provideCharts, withDefaultRegisterables } from 'ng2-charts';
import type { PartInstance } from '@domain/part-history';
import { type ChartPoint, bandOf, chartPoints } from './history-data';

/** Draws each point's uncertainty as a vertical whisker from y − U to y + U (Chart.js has no error bars). */
const uncertaintyBars: Plugin<'line'> = {
  id: 'dmUncertaintyBars',
  afterDatasetsDraw(chart) {
    const index = chart.data.datasets.findIndex((d) => (d as { dmReadings?: boolean }).dmReadings);
    if (index < 0) return;
    const meta = chart.getDatasetMeta(index);
    const data = chart.data.datasets[index].data as unknown as ChartPoint[];
    const y = chart.scales['y'];
    const ctx = chart.ctx;
    ctx.save();
    ctx.strokeStyle = String(chart.data.datasets[index].borderColor ?? '#333');
    ctx.lineWidth = 1.5;
    meta.data.forEach((el, i) => {
      const p = data[i];
      if (!p || p.u === null) return;
      const top = y.getPixelForValue(p.y + p.u);
      const bottom = y.getPixelForValue(p.y - p.u);
      ctx.beginPath();
      ctx.moveTo(el.x, top);
      ctx.lineTo(el.x, bottom);
      ctx.moveTo(el.x - 5, top);
      ctx.lineTo(el.x + 5, top);
      ctx.moveTo(el.x - 5, bottom);
      ctx.lineTo(el.x + 5, bottom);
      ctx.stroke();
    });
    ctx.restore();
  },
};

function token(name: string, fallback: string): string {
  const v = typeof document === 'undefined' ? '' : getComputedStyle(document.documentElement).getPropertyValue(name).trim();
  return v && !v.startsWith('light-dark') ? v : fallback;
}

/** The chart's configuration: the band shaded between its limits, the readings with their U whiskers. */
export function historyChartConfig(part: PartInstance): ChartConfiguration<'line', ChartPoint[]> {
  const points = chartPoints(part);
  const xs = points.map((p) => p.x);
  const from = xs.length ? Math.min(...xs) - 0.25 : 0;
  const to = xs.length ? Math.max(...xs) + 0.25 : 1;
  const primary = token('--mat-sys-primary', '#3f51b5');
  const band = token('--mat-sys-secondary', '#607d8b');
  const datasets: ChartConfiguration<'line', ChartPoint[]>['data']['datasets'] = [];
  const b = bandOf(part);
  if (b) {
    datasets.push(
      { label: `Band upper limit (${b.highPct > 0 ? '+' : ''}${b.highPct} %)`, data: [{ x: from, y: b.highPct, u: null, changed: false }, { x: to, y: b.highPct, u: null, changed: false }], borderColor: band, borderDash: [6, 4], pointRadius: 0, fill: false },
      { label: `Band lower limit (${b.lowPct} %)`, data: [{ x: from, y: b.lowPct, u: null, changed: false }, { x: to, y: b.lowPct, u: null, changed: false }], borderColor: band, borderDash: [6, 4], pointRadius: 0, fill: { target: '-1' }, backgroundColor: 'rgba(96, 125, 139, 0.15)' },
    );
  }
  datasets.push({
    label: 'Drift of the reading (bars: U, k = 2)',
    data: points,
    borderColor: primary,
    backgroundColor: primary,
    pointStyle: points.map((p) => (p.changed ? 'triangle' : 'circle')),
    pointRadius: 5,
    tension: 0,
    ...({ dmReadings: true } as object),
  });
  return {
    type: 'line',
    data: { datasets },
    options: {
      responsive: true,
      maintainAspectRatio: false,
      animation: false,
      parsing: { xAxisKey: 'x', yAxisKey: 'y' },
      scales: {
        x: { type: 'linear', min: from, max: to, title: { display: true, text: 'Year' }, ticks: { callback: (v) => (Number.isInteger(Number(v)) ? String(v) : '') } },
        y: { title: { display: true, text: 'Drift from expected, %' } },
      },
      plugins: { legend: { position: 'bottom' } },
    },
    plugins: [uncertaintyBars],
  };
}

/**
 * The drift of one part instance across the set's surveys, drawn with Chart.js (ng2-charts).
 * Loaded lazily: the history section puts it in a `@defer` block so Chart.js stays out of the
 * set page's own bundle. The table beside it carries the same numbers in words.
 */
@Component({
  selector: 'dm-history-chart',
  imports: [BaseChartDirective],
  providers: [provideCharts(withDefaultRegisterables())],
  template: `
    <div class="chart" role="img" [attr.aria-label]="summary()">
      <canvas baseChart [type]="'line'" [data]="config().data" [options]="config().options" [plugins]="config().plugins ?? []"></canvas>
    </div>
  `,
  styles: `.chart { position: relative; height: 260px; max-width: 720px; } @media print { .chart { break-inside: avoid; } }`,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class HistoryChart {
  readonly part = input.required<PartInstance>();
  protected readonly config = computed(() => historyChartConfig(this.part()));
  protected readonly summary = computed(() => {
    const p = this.part();
    const n = chartPoints(p).length;
    const b = bandOf(p);
    return `Chart of the drift of ${p.ref} over ${n} survey${n === 1 ? '' : 's'}${b ? `, band ${b.lowPct} % to +${b.highPct} %` : ''}; the table below gives the values.`;
  });
}
