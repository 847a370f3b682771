import type { SurveyConditions } from '../../api/domain/set-format';
import {
  compareReadings,
  comparisonCounts,
  conditionDifferences,
  feedbackHints,
  notComparableNote,
  predictionOf,
  suggestedScore,
  verdictsAgree,
  type ComparedReading,
} from '../../api/domain/review';
import type { MeterProfile } from '../../api/domain/meter';

const value = (ohms: number, U: number | null, extra: Partial<ComparedReading> = {}): ComparedReading => ({ state: 'value', ohms, method: 'in-circuit', verdict: 'in-band', uncertaintyOhms: U, ...extra });
const state = (s: ComparedReading['state'], extra: Partial<ComparedReading> = {}): ComparedReading => ({ state: s, ohms: null, method: 'in-circuit', verdict: 'open', uncertaintyOhms: null, ...extra });
const SAME = { conditionDifferences: [], sameMeter: false };

const CONDITIONS: SurveyConditions = { tubesIn: false, speakerConnected: true, controls: 'volume full, tone bright', ambientC: 20, note: '' };

describe('compareReadings (DESIGN.md §3.9; ISO 13528, ISO/IEC 17043)', () => {
  it('agrees on the worked example: 47.3 kΩ (U 667.9 Ω) against 46.5 kΩ (U 660.5 Ω) gives E_n = 0.852 (check-values.md §3, [CALC])', () => {
    const c = compareReadings(value(47_300, 667.9), value(46_500, 660.5), SAME);
    expect(c.agreement).toBe('agree');
    expect(c.en!).toBeCloseTo(0.852, 3);
    expect(c.lenient).toBeFalse();
    expect(c.reason).toBeNull();
  });

  it('disagrees beyond E_n = 1 and agrees at exactly 1 (3-4-5 triangle, [CALC])', () => {
    const out = compareReadings(value(106, 3), value(100, 4), SAME);
    expect(out.agreement).toBe('disagree');
    expect(out.en!).toBeCloseTo(1.2, 12);
    const edge = compareReadings(value(105, 3), value(100, 4), SAME);
    expect(edge.agreement).toBe('agree');
    expect(edge.en!).toBeCloseTo(1, 12);
  });

  it('says the comparison is lenient when both used the same meter, and still computes E_n', () => {
    const c = compareReadings(value(47_300, 667.9), value(46_500, 660.5), { conditionDifferences: [], sameMeter: true });
    expect(c.agreement).toBe('agree');
    expect(c.lenient).toBeTrue();
    expect(c.note).toContain('same meter');
  });

  it('does not compare across methods: lead lifted against in circuit (its twin with one method compares)', () => {
    const c = compareReadings(value(47_300, 667.9, { method: 'lead-lifted' }), value(46_500, 660.5), SAME);
    expect(c.agreement).toBe('not-comparable');
    expect(c.reason).toBe('method-differs');
    expect(c.en).toBeNull();
    expect(compareReadings(value(47_300, 667.9, { method: 'lead-lifted' }), value(46_500, 660.5, { method: 'lead-lifted' }), SAME).agreement).toBe('agree');
  });

  it('does not compare in-circuit readings taken under other conditions, naming the difference; on its own leads the conditions do not matter', () => {
    const diffs = conditionDifferences({ ...CONDITIONS, tubesIn: true }, CONDITIONS);
    expect(diffs).toEqual(['tubes in: yours yes, reference no']);
    const c = compareReadings(value(47_300, 667.9), value(46_500, 660.5), { conditionDifferences: diffs, sameMeter: false });
    expect(c.agreement).toBe('not-comparable');
    expect(c.reason).toBe('conditions-differ');
    expect(c.note).toContain('tubes in: yours yes, reference no');
    const lifted = compareReadings(value(47_300, 667.9, { method: 'out-of-circuit' }), value(46_500, 660.5, { method: 'out-of-circuit' }), { conditionDifferences: diffs, sameMeter: false });
    expect(lifted.agreement).toBe('agree');
  });

  it('compares states by state: open against open agrees, open against short disagrees', () => {
    expect(compareReadings(state('open'), state('open'), SAME).agreement).toBe('agree');
    expect(compareReadings(state('open'), state('short', { verdict: 'short' }), SAME).agreement).toBe('disagree');
  });

  it('leaves a value against a state, a pending state and OL against open to the verdicts', () => {
    expect(compareReadings(value(1000, 10), state('open'), SAME).reason).toBe('value-against-state');
    expect(compareReadings(state('climbing', { verdict: 'inconclusive' }), state('open'), SAME).reason).toBe('state-pending');
    expect(compareReadings(state('over-range'), state('open'), SAME).reason).toBe('ambiguous-state');
  });

  it('needs an uncertainty on at least one reading (no meter profile on either side: E_n undefined)', () => {
    const c = compareReadings(value(1000, null), value(1000, 0), SAME);
    expect(c.reason).toBe('no-uncertainty');
    expect(notComparableNote('no-uncertainty')).toContain('E_n is undefined');
    expect(compareReadings(value(1000, null), value(1005, 10), SAME).agreement).toBe('agree');
  });

  it('names a missing side: no reference reading, or the student did not read it', () => {
    expect(compareReadings(value(1000, 10), null, SAME).reason).toBe('no-reference');
    expect(compareReadings(null, value(1000, 10), SAME).reason).toBe('not-read');
  });

  it('counts verdict agreement separately from E_n agreement', () => {
    const c = compareReadings(value(47_300, 667.9, { verdict: 'high' }), value(46_500, 660.5, { verdict: 'in-band' }), SAME);
    expect(c.agreement).toBe('agree');
    expect(c.verdictAgreement).toBeFalse();
    expect(verdictsAgree('in-band', 'near-limit')).toBeTrue();
    expect(verdictsAgree('high', 'high')).toBeTrue();
    expect(verdictsAgree('high', 'low')).toBeFalse();
    expect(verdictsAgree('not-read', 'high')).toBeNull();
  });
});

describe('conditionDifferences', () => {
  it('finds none between equal conditions (controls compared without case or spacing)', () => {
    expect(conditionDifferences(CONDITIONS, { ...CONDITIONS, controls: ' Volume full,  tone bright ', ambientC: 25 })).toEqual([]);
  });
  it('names each difference that matters in circuit', () => {
    const d = conditionDifferences({ ...CONDITIONS, speakerConnected: false, controls: 'volume zero' }, CONDITIONS);
    expect(d.length).toBe(2);
    expect(d[0]).toContain('speaker connected');
    expect(d[1]).toContain('volume zero');
  });
});

describe('predictionOf', () => {
  it('gives the error of a prediction against the measured value ([CALC] 40 k predicted, 50 kΩ measured: −20 %)', () => {
    const p = predictionOf({ prediction: '40k', state: 'value', ohms: 50_000 });
    expect(p!.ohms).toBe(40_000);
    expect(p!.errorPct!).toBeCloseTo(-20, 12);
  });
  it('keeps an unparseable prediction as text with no error, and gives nothing without a prediction', () => {
    const p = predictionOf({ prediction: 'about half', state: 'value', ohms: 50_000 });
    expect(p!.text).toBe('about half');
    expect(p!.ohms).toBeNull();
    expect(p!.errorPct).toBeNull();
    expect(predictionOf({ prediction: null, state: 'value', ohms: 1 })).toBeNull();
  });
  it('has no error against a state reading', () => {
    expect(predictionOf({ prediction: '1M', state: 'open', ohms: null })!.errorPct).toBeNull();
  });
});

describe('feedbackHints', () => {
  const DMM: MeterProfile = {
    kind: 'digital',
    leadOhms: 0.2,
    autorange: false,
    ranges: [
      { fullScaleOhms: 1999, resolutionOhms: 1, pctOfReading: 0.8, counts: 3 },
      { fullScaleOhms: 199_999, resolutionOhms: 100, pctOfReading: 0.8, counts: 3 },
      { fullScaleOhms: 19_990_000, resolutionOhms: 10_000, pctOfReading: 1, counts: 5 },
    ],
  };

  it('hints fingers across the probes for a 2.2 MΩ grid leak reading 600 kΩ (common practice), not for 2.0 MΩ', () => {
    expect(feedbackHints({ reading: { state: 'value', ohms: 600_000, rangeIndex: 2 }, expectedOhms: 2.2e6, meter: DMM, predictionErrorPct: null })).toEqual(['fingers-across-probes']);
    expect(feedbackHints({ reading: { state: 'value', ohms: 2.0e6, rangeIndex: 2 }, expectedOhms: 2.2e6, meter: DMM, predictionErrorPct: null })).toEqual([]);
  });

  it('does not hint fingers for a low reading of a low-value part (a 47 kΩ plate load reading 20 kΩ)', () => {
    expect(feedbackHints({ reading: { state: 'value', ohms: 20_000, rangeIndex: 1 }, expectedOhms: 47_000, meter: DMM, predictionErrorPct: null })).toEqual([]);
  });

  it('hints over-range on a low range when the part is beyond it; not on the top range', () => {
    expect(feedbackHints({ reading: { state: 'over-range', ohms: null, rangeIndex: 0 }, expectedOhms: 470_000, meter: DMM, predictionErrorPct: null })).toEqual(['over-range-on-low-range']);
    expect(feedbackHints({ reading: { state: 'over-range', ohms: null, rangeIndex: 2 }, expectedOhms: 470_000, meter: DMM, predictionErrorPct: null })).toEqual([]);
  });

  it('does not blame the range when the part should have shown on it (a 1 kΩ part OL on the 2 k range is a finding)', () => {
    expect(feedbackHints({ reading: { state: 'over-range', ohms: null, rangeIndex: 0 }, expectedOhms: 1000, meter: DMM, predictionErrorPct: null })).toEqual([]);
  });

  it('hints a far prediction beyond ±50 %, not within', () => {
    expect(feedbackHints({ reading: { state: 'value', ohms: 1000, rangeIndex: 0 }, expectedOhms: 1000, meter: DMM, predictionErrorPct: -60 })).toEqual(['far-from-prediction']);
    expect(feedbackHints({ reading: { state: 'value', ohms: 1000, rangeIndex: 0 }, expectedOhms: 1000, meter: DMM, predictionErrorPct: 40 })).toEqual([]);
  });
});

describe('suggestedScore', () => {
  const agree = compareReadings(value(100, 4), value(100, 3), SAME);
  const disagree = compareReadings(value(110, 4), value(100, 3), SAME);
  const none = compareReadings(null, value(100, 3), SAME);

  it('is the share of comparable points that agree, not-comparable ones left out ([CALC] 2 of 3 → 66.7)', () => {
    expect(suggestedScore([agree, agree, disagree, none])).toBe(66.7);
    expect(comparisonCounts([agree, agree, disagree, none])).toEqual({ agree: 2, disagree: 1, notComparable: 1, verdictAgree: 3, verdictDisagree: 0 });
  });
  it('is null when nothing is comparable, 100 when all agree', () => {
    expect(suggestedScore([none])).toBeNull();
    expect(suggestedScore([agree])).toBe(100);
  });
});
