/**
 * The bench grid (api/domain/survey-grid.ts): rows, deviations, verdicts of readings in their
 * survey's context, follow-ups, summaries and the replacement-list rule, on a small network
 * worked by hand (two resistors in parallel: R = R1·R2/(R1 + R2), Ohm's and Kirchhoff's laws, any
 * circuits textbook, e.g. Hayt, Kemmerly & Durbin, "Engineering Circuit Analysis", 8th ed., §3.7)
 * and on the demo chassis, whose chart values the network reproduces.
 */
import { checkReading } from '../../api/domain/quick-check';
import type { SurveyConditions } from '../../api/domain/set-format';
import { GridInputError, parseReadingText, replacementDecision, SurveyGrid, worstVerdict, type GridInput, type GridReading } from '../../api/domain/survey-grid';
import type { TemplateDocument } from '../../api/domain/template-format';
import { DEFAULT_RULE } from '../../api/domain/verdict';
import { kestrel5 } from '../../seeds/chassis';
import { DEMO_TUBE_TYPES } from '../../seeds/tube-types';
import { workedMeter } from '../support/meters';
import { part } from '../support/template-parts';

const CONDITIONS: SurveyConditions = { tubesIn: true, speakerConnected: true, controls: '', ambientC: null, note: '' };

/** R1 1 kΩ ±10 % across A–B with R2 1 kΩ ±1 % in parallel; R3 10 kΩ ±10 % from B to chassis with nothing in parallel. */
function parallelDoc(): TemplateDocument {
  return {
    format: 'driftmark-template',
    formatVersion: 1,
    chassis: { maker: 'Spec Radio', model: 'Pair', chassisNumber: '', variants: [], yearFrom: null, yearTo: null, kind: 'other', power: 'transformer', hotChassis: false, hazardNotes: '', sources: [] },
    conditions: { tubesIn: true, speakerConnected: true, controls: '' },
    stages: [{ key: 'st-1', name: 'Only stage', sockets: [] }],
    junctions: [
      { name: 'A', note: '' },
      { name: 'B', note: '' },
    ],
    components: [part('R1', 'carbon-composition', 'A', 'B', { ohms: 1000 }), part('R2', 'metal-film', 'A', 'B', { ohms: 1000 }, { tolerancePct: 1 }), part('R3', 'carbon-composition', 'B', 'chassis', { ohms: 10_000 })],
    testPoints: [
      { key: 'tp-r1', stageKey: 'st-1', kind: 'component-check', componentKey: 'c-r1' },
      { key: 'tp-r3', stageKey: 'st-1', kind: 'component-check', componentKey: 'c-r3' },
      { key: 'tp-a', stageKey: 'st-1', kind: 'chart-reading', from: 'A', to: 'chassis', expected: { ohms: 10_500 }, tolerancePct: 20, conditions: {}, valueSource: 'schematic' },
    ],
  };
}

const input = (doc: TemplateDocument, extra: Partial<GridInput> = {}): GridInput => ({ document: doc, tubeTypes: DEMO_TUBE_TYPES, deviations: [], meter: null, rule: DEFAULT_RULE, conditions: CONDITIONS, ...extra });

let nextId = 1;
function reading(testPointKey: string, text: string, extra: Partial<GridReading> = {}): GridReading {
  const p = parseReadingText(text);
  return { id: nextId++, testPointKey, followsReadingId: null, text, state: p.state, ohms: p.ohms, method: 'in-circuit', liftedEnd: null, rangeIndex: null, ...extra };
}

describe('SurveyGrid rows', () => {
  it('lists one row per test point in bench order, with the expected value, band and in-circuit expectation', () => {
    const grid = new SurveyGrid(input(parallelDoc()));
    expect(grid.rows.map((r) => r.testPointKey)).toEqual(['tp-r1', 'tp-r3', 'tp-a']);
    const r1 = grid.row('tp-r1')!;
    expect(r1.expected).toEqual({ ohms: 1000 });
    expect(r1.expectedSource).toBe('nominal');
    expect(r1.band).toEqual({ lowPct: -10, highPct: 10, source: 'template' });
    // 1 k ∥ 1 k = 500 Ω (parallel rule).
    expect(r1.inCircuit!.expectedOhms).toBeCloseTo(500, 6);
    // Healthy range: every part at −tolerance (900 ∥ 990 = 471.4 Ω) and at +tolerance (1100 ∥ 1010 = 526.6 Ω).
    expect(r1.inCircuit!.healthyLowOhms).toBeCloseTo((900 * 990) / 1890, 3);
    expect(r1.inCircuit!.healthyHighOhms).toBeCloseTo((1100 * 1010) / 2110, 3);
    // A to chassis: 500 + 10 000 Ω.
    expect(grid.row('tp-a')!.inCircuit!.expectedOhms).toBeCloseTo(10_500, 6);
  });

  it("expects a set's deviation instead of the template value", () => {
    const grid = new SurveyGrid(input(parallelDoc(), { deviations: [{ key: 'dv-1', kind: 'non-original', componentKey: 'c-r3', nominal: { ohms: 12_000 }, tolerancePct: 5, note: 'Later 12 k' }] }));
    const r3 = grid.row('tp-r3')!;
    expect(r3.expected).toEqual({ ohms: 12_000 });
    expect(r3.expectedSource).toBe('deviation');
    expect(r3.band).toEqual({ lowPct: -5, highPct: 5, source: 'template' });
    expect(grid.evaluate(reading('tp-r3', '12k', { method: 'out-of-circuit' })).verdict).toBe('in-band');
    // Without the deviation the same reading is 20 % high on a ±10 % part.
    expect(new SurveyGrid(input(parallelDoc())).evaluate(reading('tp-r3', '12k', { method: 'out-of-circuit' })).verdict).toBe('high');
  });

  it('names the socket pin of a probe by its electrode on the demo chassis', () => {
    const grid = new SurveyGrid(input(kestrel5()));
    const withPin = grid.rows.find((r) => r.socket !== null)!;
    expect(withPin.socket!.designator).toMatch(/^V\d$/);
    expect(withPin.socket!.electrode).not.toBe('');
  });
});

describe('SurveyGrid verdicts', () => {
  it('judges a part on its own leads against its band directly', () => {
    const grid = new SurveyGrid(input(parallelDoc()));
    const r = grid.evaluate(reading('tp-r1', '1k25', { method: 'lead-lifted', liftedEnd: 0 }));
    expect(r.verdict).toBe('high');
    expect(r.driftPct).toBeCloseTo(25, 9);
    // The same as the quick check computes for it.
    expect(checkReading({ expected: 1000, reading: '1k25', tolerancePct: 10, kind: 'carbon-composition', method: 'lead-lifted' }).verdict).toBe('high');
  });

  it('judges an in-circuit reading by the implied value of the part (R0·Rm/(R0 − Rm))', () => {
    const grid = new SurveyGrid(input(parallelDoc(), { meter: workedMeter() }));
    // 500 Ω in circuit with R2 = 1 k in parallel: R1 = 1000·500/(1000 − 500) = 1000 Ω.
    const ok = grid.evaluate(reading('tp-r1', '500'));
    expect(ok.verdict).toBe('in-band');
    expect(ok.implied!.ohms).toBeCloseTo(1000, 6);
    expect(ok.implied!.lowOhms!).toBeLessThan(1000);
    expect(ok.implied!.highOhms!).toBeGreaterThan(1000);
    // 560 Ω: R1 = 1000·560/440 = 1272.7 Ω, beyond +10 % whatever R2 (±1 %) and U do.
    const high = grid.evaluate(reading('tp-r1', '560'));
    expect(high.verdict).toBe('high');
    expect(high.implied!.ohms).toBeCloseTo((1000 * 560) / 440, 6);
    expect(high.advice).toContain('path-high');
  });

  it('calls a low in-circuit reading the network cannot explain inconclusive and offers to lift a lead', () => {
    const grid = new SurveyGrid(input(parallelDoc(), { meter: workedMeter() }));
    // R1 shorted would read 0; R1 open reads 1 k; 300 Ω needs R1 = 1000·300/700 = 428.6 Ω: low, explained.
    const low = grid.evaluate(reading('tp-r1', '300'));
    expect(low.verdict).toBe('low');
    expect(low.advice).toContain('lift-a-lead');
    // 1.2 kΩ is above what the network reads with R1 open (1 k ∥ nothing = R2 ≤ 1010 Ω): not explained by R1.
    const unexplained = grid.evaluate(reading('tp-r1', '1k2'));
    expect(unexplained.verdict).toBe('inconclusive');
    expect(unexplained.reason).toBe('unexplained-in-circuit');
    expect(unexplained.advice).toContain('path-high');
  });

  it('judges a chart reading against the printed value and its tolerance', () => {
    const grid = new SurveyGrid(input(parallelDoc()));
    expect(grid.evaluate(reading('tp-a', '10k4')).verdict).toBe('in-band');
    const low = grid.evaluate(reading('tp-a', '6k8'));
    expect(low.verdict).toBe('low');
    expect(low.advice).toContain('lift-a-lead');
  });

  it('gives state readings their verdicts (open, climbing) and refuses text the core cannot parse', () => {
    const grid = new SurveyGrid(input(parallelDoc()));
    expect(grid.evaluate(reading('tp-r3', 'open', { method: 'out-of-circuit' })).verdict).toBe('open');
    const climbing = grid.evaluate({ ...reading('tp-r3', '10k'), state: 'climbing', ohms: null, text: '' });
    expect(climbing.verdict).toBe('inconclusive');
    expect(climbing.reason).toBe('climbing');
    expect(() => parseReadingText('4k7k')).toThrowError(GridInputError);
    expect(() => parseReadingText('47m')).toThrowError(GridInputError, /m/);
    expect(parseReadingText('470k')).toEqual(jasmine.objectContaining({ state: 'value', ohms: 470_000 }));
  });

  it('reproduces the printed chart of the demo chassis as in-band readings', () => {
    const doc = kestrel5();
    const grid = new SurveyGrid(input(doc));
    let judged = 0;
    for (const tp of doc.testPoints) {
      if (tp.kind !== 'chart-reading' || !('ohms' in tp.expected)) continue;
      const e = grid.evaluate({ id: nextId++, testPointKey: tp.key, followsReadingId: null, text: '', state: 'value', ohms: tp.expected.ohms, method: 'in-circuit', liftedEnd: null, rangeIndex: null });
      expect(e.verdict).withContext(tp.key).toBe('in-band');
      judged++;
    }
    expect(judged).toBeGreaterThan(10);
  });
});

describe('SurveyGrid follow-ups, summaries and the replacement rule', () => {
  it('takes the newest reading a follow-up does not supersede as current', () => {
    const grid = new SurveyGrid(input(parallelDoc()));
    const first = reading('tp-r1', '300');
    const followUp = reading('tp-r1', '430', { method: 'lead-lifted', liftedEnd: 0, followsReadingId: first.id });
    const other = reading('tp-r3', '10k');
    const current = grid.current([first, followUp, other]);
    expect(current.get('tp-r1')!.id).toBe(followUp.id);
    expect(current.get('tp-r3')!.id).toBe(other.id);
  });

  it('counts each stage: in band, near limit, out, inconclusive, unread', () => {
    const grid = new SurveyGrid(input(parallelDoc(), { meter: workedMeter() }));
    const evals = grid.evaluateAll([reading('tp-r1', '560'), reading('tp-a', '10k5')]);
    const { stages, total } = grid.summary(evals);
    expect(total).toEqual({ inBand: 1, nearLimit: 0, out: 1, inconclusive: 0, unread: 1 });
    expect(stages['st-1']).toEqual(total);
    expect(worstVerdict(['in-band', 'open', 'high'])).toBe('open');
  });

  it('orders a part only on conclusive evidence; the rest goes to confirm with its next step', () => {
    const grid = new SurveyGrid(input(parallelDoc(), { meter: workedMeter() }));
    const r1 = grid.row('tp-r1')!;
    const lifted = reading('tp-r1', '1k3', { method: 'lead-lifted', liftedEnd: 0 });
    expect(replacementDecision(r1, lifted, grid.evaluate(lifted), false)).toEqual({ list: 'order', nextStep: null });
    const lowInCircuit = reading('tp-r1', '300');
    expect(replacementDecision(r1, lowInCircuit, grid.evaluate(lowInCircuit), true)).toEqual({ list: 'confirm', nextStep: 'lift-a-lead' });
    const highInCircuit = reading('tp-r1', '560');
    expect(replacementDecision(r1, highInCircuit, grid.evaluate(highInCircuit), false)).toEqual({ list: 'confirm', nextStep: 'check-joint' });
    expect(replacementDecision(r1, highInCircuit, grid.evaluate(highInCircuit), true)).toEqual({ list: 'order', nextStep: null });
    const fine = reading('tp-r1', '500');
    expect(replacementDecision(r1, fine, grid.evaluate(fine), false)).toBeNull();
  });
});
