import { HttpTestingController } from '@angular/common/http/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { clearAuthStorage, nextRequest } from '../../../../testing/http-testing';
import { configureBed, mount } from '../../testing/section-bed';
import { partInstance, setDetail, surveySummary } from '../../testing/set-fixtures';
import { historyChartConfig } from './history-chart';
import { chartPoints, decimalYear } from './history-data';
import { HistorySection, projectionText, rateText } from './history-section';

describe('history words and chart data', () => {
  it('gives the rate with its interval, or the reason there is none', () => {
    expect(rateText(partInstance())).toBe('Drift rate +1.00 %/year (95 % interval +0.40 to +1.60 %/year, 3 surveys).');
    expect(rateText(partInstance({ rate: { slopePctPerYear: null, reason: 'fewer than 3 surveys' } }))).toBe('No rate: fewer than 3 surveys.');
  });

  it('labels the projection as an extrapolation', () => {
    expect(projectionText(partInstance())).toMatch(/^Extrapolation: the fitted line meets the high band edge in about 6\.0 years \(soonest 3\.8 years, latest 15\.0 years\)/);
    expect(projectionText(partInstance({ projection: null }))).toBeNull();
  });

  it('charts drift at decimal years with U as whiskers, a changed meter as another marker, and the band as two shaded limits', () => {
    expect(decimalYear('2022-01-01T00:00:00Z')).toBeCloseTo(2022, 6);
    expect(chartPoints(partInstance())).toEqual([
      { x: jasmine.any(Number), y: 0, u: 1, changed: false },
      { x: jasmine.any(Number), y: 2, u: 1, changed: false },
      { x: jasmine.any(Number), y: 4, u: 1, changed: true },
    ]);
    const config = historyChartConfig(partInstance());
    const sets = config.data.datasets;
    expect(sets.length).toBe(3);
    expect(sets[0].data.map((p) => p.y)).toEqual([10, 10]);
    expect(sets[1].data.map((p) => p.y)).toEqual([-10, -10]);
    expect(sets[1].fill).toEqual({ target: '-1' });
    expect(sets[2].pointStyle).toEqual(['circle', 'circle', 'triangle']);
    // Without a band, only the readings are drawn.
    const noBand = partInstance();
    const points = noBand.points.map((p) => ({ ...p, band: null }));
    expect(historyChartConfig({ ...noBand, points }).data.datasets.length).toBe(1);
  });
});

describe('HistorySection', () => {
  let http: HttpTestingController;
  beforeEach(() => (http = configureBed()));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('shows each part instance with its table, and compares the oldest with the newest survey', async () => {
    const set = setDetail({ surveys: [surveySummary({ id: 31, startedAt: '2020-01-01T00:00:00Z' }), surveySummary({ id: 33, startedAt: '2024-01-01T00:00:00Z', purpose: 'periodic' })] });
    const { fixture, loader, text } = await mount(HistorySection, { set });
    (await nextRequest(http, '/api/sets/5/history')).flush({ parts: [partInstance()] });
    await fixture.whenStable();
    expect(text()).toContain('R2');
    expect(text()).toContain('original part');
    expect(text()).toContain('Drift rate +1.00 %/year');
    expect(text()).toContain('meter changed (triangle in the chart)');
    expect(text()).toContain('+4.0 %');
    // The chart comes in its own lazily loaded chunk once the page is idle: a canvas with a text alternative.
    let chart: Element | null = null;
    for (let i = 0; i < 100 && !chart; i++) {
      await new Promise((r) => setTimeout(r, 20));
      await fixture.whenStable();
      chart = (fixture.nativeElement as HTMLElement).querySelector('dm-history-chart canvas');
    }
    expect(chart).not.toBeNull();
    expect((fixture.nativeElement as HTMLElement).querySelector('dm-history-chart [role=img]')?.getAttribute('aria-label')).toContain('Chart of the drift of R2 over 3 surveys');

    await (await loader.getHarness(MatButtonHarness.with({ text: 'Compare' }))).click();
    const req = await nextRequest(http, (r) => r.url === '/api/sets/5/compare');
    expect(req.request.params.get('a')).toBe('31');
    expect(req.request.params.get('b')).toBe('33');
    req.flush({
      rows: [
        {
          testPointKey: 'tp-r2',
          stageName: 'Detector and first audio',
          label: 'R2',
          a: { readingId: 1, text: '250k', state: 'value', ohms: 250000, method: 'out-of-circuit', verdict: 'in-band', driftPct: 0 },
          b: { readingId: 3, text: '280k', state: 'value', ohms: 280000, method: 'in-circuit', verdict: 'high', driftPct: 12 },
          changePct: 12,
          verdictChanged: true,
          methodChanged: true,
        },
      ],
    });
    await fixture.whenStable();
    const table = (fixture.nativeElement as HTMLElement).querySelector('table[aria-label="Before and after"]')!.textContent!;
    expect(table).toContain('250k');
    expect(table).toContain('in band');
    expect(table).toContain('280k');
    expect(table).toContain('high');
    expect(table).toContain('+12.0 %');
    expect(table).toContain('method changed');
  });
});
