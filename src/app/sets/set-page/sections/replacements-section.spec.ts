import { HttpTestingController } from '@angular/common/http/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { clearAuthStorage, nextRequest } from '../../../../testing/http-testing';
import { configureBed, mount } from '../../testing/section-bed';
import { setDetail } from '../../testing/set-fixtures';
import { ReplacementsView } from '../../sets-api';
import { ReplacementsSection } from './replacements-section';

const marks = { ordered: false, orderedAt: null, received: false, receivedAt: null };
const LIST: ReplacementsView = {
  survey: { id: 31, purpose: 'intake', state: 'complete', startedAt: '2024-03-02T10:00:00Z' },
  order: [
    {
      ...marks,
      componentKey: 'c-r2',
      ref: 'R2',
      kind: 'carbon-composition',
      nominalText: '250 kΩ',
      nominalOhms: 250000,
      valueFrom: 'template',
      suggested: { ohms: 240000, text: '240 kΩ', code: '240K', series: 'E24', deviationPct: -4, inBand: true },
      noSuggestion: null,
      watts: 0.5,
      dissipationWatts: 0.01,
      type: 'carbon-film',
      voltageWarning: null,
      warnings: [],
      evidence: { testPointKey: 'tp-r2', readingId: 103, verdict: 'high', method: 'out-of-circuit' },
      purchaseKey: '240k-0.5-carbon-film',
      quantity: 2,
    },
  ],
  confirm: [
    { testPointKey: 'tp-r1', componentKey: 'c-r1', ref: 'R1', nominalText: '10 MΩ', readingText: '3M', from: 'V1.1', to: 'chassis', verdict: 'low', readingId: 101, nextStep: 'lift-a-lead', advice: 'Low in circuit: a parallel path may explain it.' },
  ],
  capacitors: [
    {
      ...marks,
      ordered: true,
      componentKey: 'c-c1',
      ref: 'C1',
      text: '0.01 µF 400 V',
      uF: 0.01,
      workingVolts: 400,
      dielectric: 'paper',
      polarised: false,
      safetyClass: null,
      can: null,
      type: 'film',
      reason: 'policy',
      warnings: [],
      purchaseKey: '0.01-400-film',
      quantity: 1,
    },
  ],
  purchase: [],
  series: 'E24',
  recap: 'standard',
};

describe('ReplacementsSection', () => {
  let http: HttpTestingController;
  beforeEach(() => (http = configureBed()));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  async function open() {
    const m = await mount(ReplacementsSection, { set: setDetail() });
    const req = await nextRequest(http, (r) => r.url === '/api/sets/5/replacements');
    expect(req.request.params.get('surveyId')).toBe('31');
    req.flush(LIST);
    await m.fixture.whenStable();
    return m;
  }

  it('keeps the to-confirm parts off the order, each with its next step and its verdict in words', async () => {
    const { fixture } = await open();
    const el = fixture.nativeElement as HTMLElement;
    const order = el.querySelector('table[aria-label="Parts to order"]')!.textContent!;
    expect(order).toContain('R2');
    expect(order).toContain('carbon film');
    expect(order).toContain('240 kΩ');
    expect(order).toContain('−4.0 %');
    expect(order).not.toContain('R1');
    const confirm = el.querySelector('ul[aria-label="Parts to confirm"]')!.textContent!;
    expect(confirm).toContain('R1');
    expect(confirm).toContain('low');
    expect(confirm).toContain('Lift a lead and measure the part on its own leads');
    expect(confirm).toContain('a parallel path may explain it');
  });

  it('marks a line ordered, and downloads the CSV', async () => {
    const { fixture, loader } = await open();
    const ordered = await loader.getHarness(MatCheckboxHarness.with({ label: /Ordered R2/ }));
    await ordered.check();
    const put = await nextRequest(http, (r) => r.method === 'PUT' && r.url === '/api/sets/5/replacements/c-r2/marks');
    expect(put.request.body).toEqual({ ordered: true, received: false });
    put.flush({});
    await fixture.whenStable();
    expect(await ordered.isChecked()).toBeTrue();

    const click = spyOn(HTMLAnchorElement.prototype, 'click');
    await (await loader.getHarness(MatButtonHarness.with({ text: /Download CSV/ }))).click();
    const csv = await nextRequest(http, (r) => r.url === '/api/sets/5/replacements' && r.params.get('format') === 'csv');
    csv.flush('qty,parts\n2,"R2, R7"\n', { headers: { 'Content-Disposition': 'attachment; filename="replacements.csv"' } });
    await fixture.whenStable();
    expect(click).toHaveBeenCalledTimes(1);
  });
});
