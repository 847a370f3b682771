import { compareStates, EN_LIMIT, normalisedError } from '../../api/domain/agreement';
import type { ReadingState } from '../../api/domain/words';

describe('normalisedError (ISO 13528; ISO/IEC 17043)', () => {
  it('uses the limit |E_n| ≤ 1', () => {
    expect(EN_LIMIT).toBe(1);
  });

  // [x1, U1, x2, U2, E_n, agree, source]
  const ROWS: ReadonlyArray<[number, number, number, number, number, boolean, string]> = [
    [47_300, 667.9, 46_500, 660.5, 0.852, true, 'check-values §3 [CALC]: student 47.3 k vs reference 46.5 k'],
    [104_200, 1193.5, 104_200, 1193.5, 0, true, 'identical readings'],
    [100, 3, 105, 4, 1, true, '[CALC] 3-4-5: E_n exactly 1 agrees (≤ 1)'],
    [100, 3, 105.01, 4, 1.002, false, '[CALC] just beyond 1'],
    [4700, 66.5, 4900, 66.5, 200 / Math.hypot(66.5, 66.5), false, '[CALC] check-values §3 U on the 20 k range, 200 Ω apart'],
    [1000, 0, 1010, 20, 0.5, true, '[CALC] a reference value with U = 0 (a calibrated resistor)'],
  ];
  for (const [x1, U1, x2, U2, en, agree, source] of ROWS) {
    it(`gives E_n ≈ ${en.toFixed(3)} for ${x1} ± ${U1} vs ${x2} ± ${U2} (${source})`, () => {
      const r = normalisedError({ ohms: x1, U: U1 }, { ohms: x2, U: U2 });
      expect(r.en).toBeCloseTo(en, 3);
      expect(r.agree).toBe(agree);
      expect(normalisedError({ ohms: x2, U: U2 }, { ohms: x1, U: U1 }).en).toBe(r.en);
    });
  }

  it('refuses two zero uncertainties, a negative U or a non-finite value; accepts the twins', () => {
    expect(() => normalisedError({ ohms: 1, U: 0 }, { ohms: 1, U: 0 })).toThrowError(RangeError, /both U are zero/);
    expect(() => normalisedError({ ohms: 1, U: -1 }, { ohms: 1, U: 1 })).toThrowError(RangeError, /negative/);
    expect(() => normalisedError({ ohms: Number.NaN, U: 1 }, { ohms: 1, U: 1 })).toThrowError(RangeError, /finite/);
    expect(normalisedError({ ohms: 1, U: 0 }, { ohms: 1, U: 1 }).agree).toBeTrue();
  });
});

describe('compareStates', () => {
  // DESIGN §3.9: state readings (open, short) compare by state. [a, b, agree, reason]
  const ROWS: ReadonlyArray<[ReadingState, ReadingState, boolean | null, RegExp | null]> = [
    ['open', 'open', true, null],
    ['short', 'short', true, null],
    ['over-range', 'over-range', true, null],
    ['open', 'short', false, null],
    ['short', 'over-range', false, null],
    ['open', 'over-range', null, /OL means open only/],
    ['over-range', 'open', null, /OL means open only/],
    ['value', 'open', null, /a value against a state/],
    ['short', 'value', null, /a value against a state/],
    ['value', 'value', null, /normalised error/],
    ['climbing', 'open', null, /climbing reading/],
    ['short', 'unstable', null, /unstable reading/],
    ['no-access', 'no-access', null, /no-access reading/],
  ];
  for (const [a, b, agree, reason] of ROWS) {
    it(`compares ${a} with ${b}: ${agree === null ? 'not comparable' : agree ? 'agree' : 'disagree'}`, () => {
      const r = compareStates(a, b);
      expect(r.agree).toBe(agree);
      if (reason) expect(r.reason).toMatch(reason);
      else expect(r.reason).toBeNull();
    });
  }
});
