import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { ChartConfiguration } from 'chart.js';
import { BaseChartDirective, provideCharts, withDefaultRegisterables } from 'ng2-charts';
import type { ClassResults } from '@domain/class-format';

export type PointShare = ClassResults['points'][number];

function token(name: string, fallback: string): string {
  const v = typeof document === 'undefined' ? '' : getComputedStyle(document.documentElement).getPropertyValue(name).trim();
  return v && !v.startsWith('light-dark') ? v : fallback;
}

/** The bar chart: per test point, the share of students whose latest attempt agreed with the reference. */
export function resultsChartConfig(points: readonly PointShare[]): ChartConfiguration<'bar', (number | null)[], string> {
  const primary = token('--mat-sys-primary', '#3f51b5');
  return {
    type: 'bar',
    data: {
      labels: points.map((p) => p.label),
      datasets: [{ label: 'Students who agreed with the reference, %', data: points.map((p) => (p.compared === 0 ? null : Math.round((p.agreed / p.compared) * 1000) / 10)), backgroundColor: primary }],
    },
    options: {
      indexAxis: 'y',
      responsive: true,
      maintainAspectRatio: false,
      animation: false,
      scales: { x: { min: 0, max: 100, title: { display: true, text: 'Agreed, % of students compared' } } },
      plugins: { legend: { display: false } },
    },
  };
}

/**
 * Where students go wrong: Chart.js (ng2-charts), loaded lazily — the results section puts it in
 * a `@defer` block. The table beside it carries the same numbers in words.
 */
@Component({
  selector: 'dm-results-chart',
  imports: [BaseChartDirective],
  providers: [provideCharts(withDefaultRegisterables())],
  template: `
    <div class="chart" role="img" [attr.aria-label]="summary()" [style.height.px]="height()">
      <canvas baseChart [type]="'bar'" [data]="config().data" [options]="config().options"></canvas>
    </div>
  `,
  styles: `.chart { position: relative; max-width: 760px; } @media print { .chart { break-inside: avoid; } }`,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ResultsChart {
  readonly points = input.required<readonly PointShare[]>();
  protected readonly config = computed(() => resultsChartConfig(this.points()));
  protected readonly height = computed(() => Math.max(160, 28 * this.points().length + 60));
  protected readonly summary = computed(() => `Bar chart of the share of students who agreed with the reference at each of ${this.points().length} test points; the table gives the values.`);
}
