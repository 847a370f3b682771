import {
  CONTINUITY_BAND,
  DEFAULT_ALLOWANCE,
  DEFAULT_TOLERANCE_PCT,
  NEAR_LIMIT_FRACTION,
  OPEN_THRESHOLD_OHMS,
  SHORT_THRESHOLD_OHMS,
  VerdictInputError,
  chooseBand,
  conformityProbability,
  judge,
  verdictInputProblems,
  type AcceptanceRule,
  type VerdictInput,
} from '../../api/domain/verdict';
import type { MeterProfile } from '../../api/domain/meter';
import type { ReadingState } from '../../api/domain/words';
import { analogueMeter, workedMeter } from '../support/meters';


const value = (ohms: number) => ({ state: 'value' as const, ohms });
const stateOf = (state: ReadingState) => ({ state, ohms: null });
const guarded: AcceptanceRule = { decision: 'guarded', nearLimitFraction: 0.75, bandFrom: 'template' };
const simple: AcceptanceRule = { decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'template' };
/** 100 kΩ ±10 % on the 200 k range of the worked meter (check-values §3 [CALC]). */
const worked = (ohms: number, rule: AcceptanceRule): VerdictInput => ({
  expected: 100_000,
  tolerancePct: 10,
  reading: value(ohms),
  rangeIndex: 3,
  meter: workedMeter(),
  rule,
});
const codes = (r: { explanation: { notes: { code: string }[] } }) => r.explanation.notes.map((n) => n.code);

describe('judge', () => {
  describe('worked cases of check-values §3 [CALC]', () => {
    it('100 kΩ ±10 %, 104.2 kΩ on 200 k: drift +4.20 %, U = 1.1935 kΩ at the reading (GUM §4.3.7, §6.2)', () => {
      const r = judge(worked(104_200, simple));
      expect(r.verdict).toBe('in-band');
      expect(r.driftPct!).toBeCloseTo(4.2, 10);
      expect(r.uncertaintyOhms! / 1000).toBeCloseTo(1.1935, 4);
      expect(r.explanation.uncertainty!.aOhms! / 1000).toBeCloseTo(1.0336, 6);
      expect(r.explanation.rule.reference).toContain('ILAC-G8:09/2019 §4.2.1');
    });

    it('the same under the guarded rule: U at each limit 1.0623 / 1.2471 kΩ, acceptance 91.062…108.753 kΩ, rejection 88.938…111.247 kΩ (ILAC-G8:09/2019 §4.2.3)', () => {
      const r = judge(worked(104_200, guarded));
      expect(r.verdict).toBe('in-band');
      expect(r.side).toBeNull();
      const g = r.explanation.guard!;
      expect(g.UAtLowOhms! / 1000).toBeCloseTo(1.0623, 4);
      expect(g.UAtHighOhms! / 1000).toBeCloseTo(1.2471, 4);
      expect(g.acceptanceLowOhms! / 1000).toBeCloseTo(91.062, 3);
      expect(g.acceptanceHighOhms! / 1000).toBeCloseTo(108.753, 3);
      expect(g.rejectionLowOhms! / 1000).toBeCloseTo(88.938, 3);
      expect(g.rejectionHighOhms! / 1000).toBeCloseTo(111.247, 3);
      expect(g.acceptanceZoneEmpty).toBeFalse();
      expect(r.conformityProbability!.toFixed(3)).toBe('1.000'); // JCGM 106:2012 §7
      expect(r.explanation.rule.applied).toBe('guarded');
    });

    // [reading, verdict, reason, side, p_c] — check-values §3 [CALC]: p_c by the normal
    // approximation of JCGM 106:2012 §7 with u = a/√3 at the reading.
    const guardedCases: [number, string, string | null, string | null, number][] = [
      [109_500, 'inconclusive', 'guard-band', 'conditional-pass', 0.7895],
      [110_500, 'inconclusive', 'guard-band', 'conditional-fail', 0.2122],
      [111_500, 'high', null, null, 0.0087],
      [89_000, 'inconclusive', 'guard-band', 'conditional-fail', 0.0288], // mirror on the low side [CALC, CPython math.erfc]
      [88_000, 'low', null, null, 0.0001], // below the rejection limit 88.938 kΩ [CALC, CPython math.erfc: 6.4e-5]
    ];
    for (const [ohms, verdict, reason, side, pc] of guardedCases) {
      it(`guarded: ${ohms / 1000} kΩ → ${verdict} ${side ?? ''} with p_c ${pc}`, () => {
        const r = judge(worked(ohms, guarded));
        expect(r.verdict).toBe(verdict as never);
        expect(r.reason).toBe(reason as never);
        expect(r.side).toBe(side as never);
        expect(r.conformityProbability!).toBeCloseTo(pc, 4);
        expect(r.explanation.conformity!.method).toContain('normal approximation (JCGM 106:2012 §7)');
      });
    }

    // The simple rule (ILAC-G8:09/2019 §4.2.1): the reading decides.
    const simpleCases: [number, string][] = [
      [109_500, 'near-limit'],
      [110_000, 'near-limit'], // the limit itself belongs to the band
      [110_500, 'high'],
      [111_500, 'high'],
      [89_000, 'low'],
    ];
    for (const [ohms, verdict] of simpleCases) {
      it(`simple: ${ohms / 1000} kΩ → ${verdict}`, () => {
        const r = judge(worked(ohms, simple));
        expect(r.verdict).toBe(verdict as never);
        expect(r.side).toBeNull();
        expect(r.reason).toBeNull();
      });
    }

    it('4.70 kΩ on the 20 k range: U = 66.5 Ω; 1.500 MΩ on 2000 k: U = 19.6 kΩ', () => {
      const m = workedMeter();
      expect(judge({ expected: 4700, tolerancePct: 5, reading: value(4700), meter: m }).uncertaintyOhms!).toBeCloseTo(66.5, 1);
      const big = judge({ expected: 1_500_000, tolerancePct: 10, reading: value(1_500_000), meter: m, rangeIndex: 4 });
      expect(Math.round(big.uncertaintyOhms! / 100) / 10).toBe(19.6);
      expect(big.explanation.range!.index).toBe(4);
      expect(big.explanation.range!.inferred).toBeFalse();
    });
  });

  describe('U at each limit is evaluated on the range that would display that limit', () => {
    it('1.9 kΩ ±10 % read on the 2 k range: the 1.71 kΩ limit on 2 k, the 2.09 kΩ limit on 20 k', () => {
      const r = judge({ expected: 1900, tolerancePct: 10, reading: value(1900), rangeIndex: 1, meter: workedMeter(), rule: guarded });
      const g = r.explanation.guard!;
      expect(g.lowLimitRangeIndex).toBe(1);
      expect(g.highLimitRangeIndex).toBe(2);
      expect(g.UAtHighOhms!).toBeCloseTo((2 * Math.hypot(0.008 * 2090 + 20, 0.1)) / Math.sqrt(3), 9);
      expect(g.UAtLowOhms!).toBeCloseTo((2 * Math.hypot(0.008 * 1710 + 2, 0.1)) / Math.sqrt(3), 9);
    });
  });

  describe('near-limit per side (check-values §3 [CALC]): 100 kΩ, allowance −10 %/+20 %, fraction 0.75', () => {
    const rule: AcceptanceRule = { decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'allowance', allowance: { lowPct: -10, highPct: 20 } };
    const cases: [number, string][] = [
      [116_000, 'near-limit'], // +16 % beyond 0.75 × 20 % = 15 %
      [114_000, 'in-band'],
      [92_000, 'near-limit'], // −8 % beyond 0.75 × 10 % = 7.5 %
      [93_000, 'in-band'],
      [121_000, 'high'],
      [89_000, 'low'],
    ];
    for (const [ohms, verdict] of cases) {
      it(`${ohms / 1000} kΩ → ${verdict}`, () => {
        const r = judge({ expected: 100_000, tolerancePct: 10, reading: value(ohms), rule });
        expect(r.verdict).toBe(verdict as never);
        expect(r.band.source).toBe('allowance');
      });
    }
    it('shows both sides’ near-limit thresholds in the explanation', () => {
      const nl = judge({ expected: 100_000, reading: value(100_000), rule }).explanation.nearLimit!;
      expect(nl.lowPct).toBeCloseTo(-7.5, 12);
      expect(nl.highPct).toBeCloseTo(15, 12);
      expect(nl.lowOhms).toBeCloseTo(92_500, 6);
      expect(nl.highOhms).toBeCloseTo(115_000, 6);
      expect(nl.fraction).toBe(0.75);
    });
    it('a different fraction moves the threshold: 0.9 puts 116 kΩ back in band', () => {
      expect(judge({ expected: 100_000, reading: value(116_000), rule: { ...rule, nearLimitFraction: 0.9 } }).verdict).toBe('in-band');
    });
  });

  describe('band choice', () => {
    it('a critical position’s own band always wins, over the template and over an allowance', () => {
      const base: VerdictInput = { expected: 100_000, tolerancePct: 20, reading: value(106_000) };
      expect(judge(base).verdict).toBe('in-band');
      expect(judge(base).band.source).toBe('template');
      const critical = judge({ ...base, critical: { lowPct: -5, highPct: 5 } });
      expect(critical.verdict).toBe('high');
      expect(critical.band.source).toBe('critical');
      expect(critical.explanation.band.basis).toBe('critical');
      const overAllowance = judge({ ...base, critical: { lowPct: -5, highPct: 5 }, rule: { ...simple, bandFrom: 'allowance', allowance: { lowPct: -20, highPct: 20 } } });
      expect(overAllowance.band.source).toBe('critical');
    });

    it('template: the asymmetric band wins over the symmetric tolerance, with a note', () => {
      const r = judge({ expected: 100_000, tolerancePct: 10, band: { lowPct: -5, highPct: 15 }, reading: value(111_000) });
      expect(r.verdict).toBe('in-band');
      expect(r.band.lowOhms).toBeCloseTo(95_000, 6);
      expect(r.band.highOhms!).toBeCloseTo(115_000, 6);
      expect(r.explanation.band.basis).toBe('template-band');
      expect(codes(r)).toContain('band-over-tolerance');
      expect(judge({ expected: 100_000, tolerancePct: 10, reading: value(111_000) }).verdict).toBe('high');
    });

    it('template with no tolerance: ±20 % (IEC 60062:2016, no tolerance band), said so', () => {
      const r = judge({ expected: 1000, reading: value(1190) });
      expect(DEFAULT_TOLERANCE_PCT).toBe(20);
      expect(r.explanation.band.basis).toBe('default-tolerance');
      expect(r.band.highOhms!).toBeCloseTo(1200, 9);
      expect(codes(r)).toContain('default-tolerance');
    });

    it('allowance with none named: the default ±20 % (common practice), said so', () => {
      const r = judge({ expected: 1000, tolerancePct: 5, reading: value(1160), rule: { ...simple, bandFrom: 'allowance' } });
      expect(r.explanation.band.basis).toBe('default-allowance');
      expect(r.band.lowOhms).toBeCloseTo(1000 * (1 + DEFAULT_ALLOWANCE.lowPct / 100), 9);
      expect(r.verdict).toBe('near-limit');
    });

    it('chooseBand gives threshold bands for expected states', () => {
      expect(chooseBand({ expected: 'open' })).toEqual(jasmine.objectContaining({ lowOhms: OPEN_THRESHOLD_OHMS, highOhms: null, basis: 'expected-open' }));
      expect(chooseBand({ expected: 'short' })).toEqual(jasmine.objectContaining({ lowOhms: 0, highOhms: SHORT_THRESHOLD_OHMS, basis: 'expected-short' }));
    });
  });

  describe('analogue meter (check-values §3 [CALC], scale law θ = Rc/(R + Rc))', () => {
    const base = (ohms: number, rule: AcceptanceRule = simple): VerdictInput => ({
      expected: 100_000,
      tolerancePct: 10,
      reading: value(ohms),
      rangeIndex: 1,
      meter: analogueMeter(),
      rule,
    });
    it('100 kΩ on Rc = 10 kΩ, δ = 3 %: limits 72.71…154.18 kΩ in the explanation, U = 2·(half-width)/√3', () => {
      const r = judge(base(100_000));
      const u = r.explanation.uncertainty!;
      expect(u.limitLowOhms / 1000).toBeCloseTo(72.71, 2);
      expect(u.limitHighOhms! / 1000).toBeCloseTo(154.18, 2);
      expect(r.uncertaintyOhms!).toBeCloseTo(2 * Math.hypot(u.aOhms! / Math.sqrt(3), 0.1 / Math.sqrt(3)), 6);
    });
    it('at 323.3 kΩ and above the limit is unbounded: no U, said so; the simple rule still decides', () => {
      const r = judge(base(330_000));
      expect(r.uncertaintyOhms).toBeNull();
      expect(r.explanation.uncertainty!.limitHighOhms).toBeNull();
      expect(codes(r)).toContain('unbounded-above');
      expect(r.verdict).toBe('high');
      expect(r.conformityProbability).toBeNull();
      expect(judge(base(320_000)).uncertaintyOhms).not.toBeNull();
    });
    it('guarded: a ±10 % band is narrower than U, so the meter cannot decide an in-band reading', () => {
      const r = judge(base(100_000, guarded));
      expect(r.verdict).toBe('inconclusive');
      expect(r.reason).toBe('meter-cannot-decide');
      expect(r.side).toBe('conditional-pass');
      expect(r.explanation.guard!.acceptanceZoneEmpty).toBeTrue();
      expect(codes(r)).toContain('meter-cannot-decide');
    });
    it('guarded: …but a reading beyond the rejection limit is still a conclusive high', () => {
      const r = judge(base(300_000, guarded));
      expect(r.explanation.guard!.rejectionHighOhms!).toBeLessThan(300_000);
      expect(r.verdict).toBe('high');
    });
  });

  describe('meter cannot decide on a digital meter', () => {
    it('10 Ω ±1 % on the 200 Ω range: U at the limits exceeds the band’s half-width', () => {
      const r = judge({ expected: 10, tolerancePct: 1, reading: value(10), meter: workedMeter(), rangeIndex: 0, rule: guarded });
      expect(r.verdict).toBe('inconclusive');
      expect(r.reason).toBe('meter-cannot-decide');
      expect(r.explanation.guard!.acceptanceLowOhms!).toBeGreaterThan(r.explanation.guard!.acceptanceHighOhms!);
      // twin: a 10 % band on the same range is decided
      expect(judge({ expected: 10, tolerancePct: 10, reading: value(10), meter: workedMeter(), rangeIndex: 0, rule: guarded }).verdict).toBe('in-band');
    });
    it('the same band, a reading beyond the rejection limit: high', () => {
      expect(judge({ expected: 10, tolerancePct: 1, reading: value(11), meter: workedMeter(), rangeIndex: 0, rule: guarded }).verdict).toBe('high');
    });
    it('a reading outside the band but inside the rejection limit: conditional-fail', () => {
      const r = judge({ expected: 10, tolerancePct: 1, reading: value(10.2), meter: workedMeter(), rangeIndex: 0, rule: guarded });
      expect(r.reason).toBe('meter-cannot-decide');
      expect(r.side).toBe('conditional-fail');
    });
  });

  describe('over-range', () => {
    const at = (rangeIndex: number | undefined, extra: Partial<VerdictInput> = {}): VerdictInput => ({
      expected: 100_000,
      tolerancePct: 10,
      reading: stateOf('over-range'),
      meter: workedMeter(),
      rangeIndex,
      ...extra,
    });
    it('without a meter profile counts as open', () => {
      const r = judge({ expected: 100_000, tolerancePct: 10, reading: stateOf('over-range') });
      expect(r.verdict).toBe('open');
      expect(codes(r)).toContain('over-range-counts-as-open');
    });
    it('on an autoranging meter is open', () => {
      expect(judge(at(undefined, { meter: workedMeter({ autorange: true }) })).verdict).toBe('open');
    });
    it('on the top range is open', () => expect(judge(at(4)).verdict).toBe('open'));
    it('on the 200 k range (full scale 199.9 k above the band’s 110 k) is high', () => {
      const r = judge(at(3));
      expect(r.verdict).toBe('high');
      expect(codes(r)).toContain('over-range-above-band');
    });
    it('on the 20 k range (full scale below the band’s upper limit) is not read: take a higher range', () => {
      const r = judge(at(2));
      expect(r.verdict).toBe('not-read');
      expect(r.reason).toBe('over-range');
      expect(codes(r)).toContain('over-range-below-band');
    });
    it('guarded: a full scale beyond the rejection limit is a conclusive high', () => {
      expect(judge(at(3, { rule: guarded })).verdict).toBe('high');
    });
    it('analogue, the needle at ∞ on the ×1 k range (distinguishable to 323.3 kΩ, above the band): high; on the top range: open', () => {
      expect(judge(at(1, { meter: analogueMeter() })).verdict).toBe('high');
      expect(judge(at(2, { meter: analogueMeter() })).verdict).toBe('open');
      expect(judge(at(0, { meter: analogueMeter() })).verdict).toBe('not-read');
    });
    it('on a manual meter with no range recorded is not read', () => {
      const r = judge(at(undefined));
      expect(r.verdict).toBe('not-read');
      expect(r.reason).toBe('over-range');
      expect(codes(r)).toContain('over-range-range-unknown');
    });
    it('guarded: a full scale above the band but within U of its limit is a conditional fail (18 k ±10 % over 19.99 k)', () => {
      const r = judge(at(2, { expected: 18_000, rule: guarded }));
      expect(r.verdict).toBe('inconclusive');
      expect(r.reason).toBe('guard-band');
      expect(r.side).toBe('conditional-fail');
      expect(judge(at(2, { expected: 18_000, rule: simple })).verdict).toBe('high');
    });
    it('expected open: in band without a meter, on the top range, or on a range reaching the open threshold; not read below it', () => {
      expect(judge({ expected: 'open', reading: stateOf('over-range') }).verdict).toBe('in-band');
      expect(judge(at(4, { expected: 'open' })).verdict).toBe('in-band');
      const r = judge(at(2, { expected: 'open' }));
      expect(r.verdict).toBe('not-read');
      expect(r.reason).toBe('over-range');
      const tall: MeterProfile = {
        kind: 'digital',
        leadOhms: 0,
        ranges: [
          { fullScaleOhms: 1999, resolutionOhms: 1, pctOfReading: 1, counts: 2 },
          { fullScaleOhms: 19_990_000, resolutionOhms: 10_000, pctOfReading: 1.5, counts: 3 },
          { fullScaleOhms: 199_900_000, resolutionOhms: 100_000, pctOfReading: 5, counts: 10 },
        ],
      };
      const reach = judge({ expected: 'open', reading: stateOf('over-range'), meter: tall, rangeIndex: 1, thresholds: { openOhms: 10e6 } });
      expect(reach.verdict).toBe('in-band');
      expect(codes(reach)).toContain('over-range-above-open-threshold');
      expect(judge({ expected: 'open', reading: stateOf('over-range'), meter: tall, rangeIndex: 1 }).verdict).toBe('not-read');
    });
    it('expected short: over-range is open where it counts as open, high on a low manual range', () => {
      expect(judge({ expected: 'short', reading: stateOf('over-range') }).verdict).toBe('open');
      expect(judge(at(0, { expected: 'short' })).verdict).toBe('high');
    });
  });

  describe('reading states', () => {
    const cases: [ReadingState, VerdictInput['expected'], string, string | null][] = [
      ['open', 100_000, 'open', null],
      ['open', 'open', 'in-band', null],
      ['open', 'short', 'open', null],
      ['short', 100_000, 'short', null],
      ['short', 'short', 'in-band', null],
      ['short', 'open', 'short', null],
      ['climbing', 100_000, 'inconclusive', 'climbing'],
      ['unstable', 100_000, 'inconclusive', 'unstable'],
      ['no-access', 100_000, 'not-read', 'no-access'],
    ];
    for (const [state, expected, verdict, reason] of cases) {
      it(`${state}, expected ${expected} → ${verdict}${reason ? ` (${reason})` : ''}`, () => {
        const r = judge({ expected, tolerancePct: typeof expected === 'number' ? 10 : undefined, reading: stateOf(state), meter: workedMeter() });
        expect(r.verdict).toBe(verdict as never);
        expect(r.reason).toBe(reason as never);
        expect(r.driftPct).toBeNull();
        expect(r.uncertaintyOhms).toBeNull();
        expect(codes(r)).toContain('state-reading');
      });
    }
  });

  describe('expected open and short', () => {
    it('expected open: ≥ 20 MΩ is in band, 5 MΩ is low (a leakage path), 0.5 Ω is short', () => {
      expect(OPEN_THRESHOLD_OHMS).toBe(20e6);
      expect(judge({ expected: 'open', reading: value(25e6) }).verdict).toBe('in-band');
      expect(judge({ expected: 'open', reading: value(20e6) }).verdict).toBe('in-band');
      expect(judge({ expected: 'open', reading: value(5e6) }).verdict).toBe('low');
      expect(judge({ expected: 'open', reading: value(0.5) }).verdict).toBe('short');
      expect(judge({ expected: 'open', reading: value(25e6) }).driftPct).toBeNull();
    });
    it('expected short: at or below 1 Ω plus the lead resistance is in band; above it high; 30 MΩ open', () => {
      expect(SHORT_THRESHOLD_OHMS).toBe(1);
      expect(judge({ expected: 'short', reading: value(1) }).verdict).toBe('in-band');
      expect(judge({ expected: 'short', reading: value(1.2) }).verdict).toBe('high');
      const leads = workedMeter({ leadOhms: 0.3 });
      const withLeads = judge({ expected: 'short', reading: value(1.2), meter: leads });
      expect(withLeads.verdict).toBe('in-band');
      expect(withLeads.explanation.thresholds.shortDisplayedOhms).toBeCloseTo(1.3, 12);
      expect(judge({ expected: 'short', reading: value(1.4), meter: leads }).verdict).toBe('high');
      expect(judge({ expected: 'short', reading: value(30e6) }).verdict).toBe('open');
    });
    it('the thresholds can be overridden and the explanation shows the ones used', () => {
      const r = judge({ expected: 'short', reading: value(1.8), thresholds: { shortOhms: 2 } });
      expect(r.verdict).toBe('in-band');
      expect(r.explanation.thresholds.shortOhms).toBe(2);
      expect(r.explanation.thresholds.openOhms).toBe(OPEN_THRESHOLD_OHMS);
    });
  });

  describe('numeric readings far outside a part’s band', () => {
    it('100 kΩ reading 0.4 Ω is short; reading 25 MΩ is open', () => {
      expect(judge({ expected: 100_000, tolerancePct: 10, reading: value(0.4) }).verdict).toBe('short');
      expect(judge({ expected: 100_000, tolerancePct: 10, reading: value(25e6) }).verdict).toBe('open');
    });
    it('…but a 22 MΩ part whose band reaches past 20 MΩ is judged by its band, and a 0.47 Ω part by its own', () => {
      expect(judge({ expected: 22e6, tolerancePct: 20, reading: value(25e6) }).verdict).toBe('in-band');
      expect(judge({ expected: 0.47, tolerancePct: 10, reading: value(0.45) }).verdict).toBe('in-band');
    });
  });

  describe('lead resistance is a bias subtracted from the displayed value', () => {
    it('10 Ω ±5 % displaying 10.6 Ω with 0.2 Ω leads is judged at 10.4 Ω (+4 %, near limit); without leads it is high', () => {
      const r = judge({ expected: 10, tolerancePct: 5, reading: value(10.6), meter: workedMeter({ leadOhms: 0.2 }) });
      expect(r.explanation.correctedOhms!).toBeCloseTo(10.4, 12);
      expect(r.driftPct!).toBeCloseTo(4, 9);
      expect(r.verdict).toBe('near-limit');
      expect(codes(r)).toContain('lead-subtracted');
      expect(judge({ expected: 10, tolerancePct: 5, reading: value(10.6), meter: workedMeter() }).verdict).toBe('high');
    });
    it('a reading below the lead resistance is taken as 0 Ω, said so', () => {
      const r = judge({ expected: 'short', reading: value(0.1), meter: workedMeter({ leadOhms: 0.2 }) });
      expect(r.explanation.correctedOhms).toBe(0);
      expect(r.verdict).toBe('in-band');
      expect(codes(r)).toContain('negative-after-lead');
    });
  });

  describe('no meter profile', () => {
    it('no U, no p_c; guarded falls back to simple with a note', () => {
      const r = judge({ expected: 100_000, tolerancePct: 10, reading: value(109_500), rule: guarded });
      expect(r.verdict).toBe('near-limit');
      expect(r.uncertaintyOhms).toBeNull();
      expect(r.conformityProbability).toBeNull();
      expect(r.explanation.rule.decision).toBe('guarded');
      expect(r.explanation.rule.applied).toBe('simple');
      expect(r.explanation.guard).toBeNull();
      expect(codes(r)).toContain('guarded-needs-meter');
      expect(codes(r)).toContain('no-meter');
      // twin: with the meter the guarded rule applies
      expect(judge(worked(109_500, guarded)).verdict).toBe('inconclusive');
    });
  });

  describe('continuity kinds (heaters, lamps, windings)', () => {
    it('a heater near its cold value: in band, "continuity consistent — DC resistance cannot show shorted turns"', () => {
      const r = judge({ expected: 20, tolerancePct: 10, kind: 'heater', reading: value(18) });
      expect(r.verdict).toBe('in-band');
      expect(r.explanation.continuity).toBeTrue();
      expect(r.explanation.band.basis).toBe('continuity');
      expect(r.explanation.notes.find((n) => n.code === 'continuity')!.text).toBe('continuity consistent — DC resistance cannot show shorted turns');
      expect(codes(r)).toContain('cold-resistance');
      expect(r.explanation.nearLimit).toBeNull();
    });
    it('the wide band: −45 % is still in band for a heater, low for a carbon-composition part', () => {
      expect(CONTINUITY_BAND).toEqual({ lowPct: -50, highPct: 100 });
      expect(judge({ expected: 20, kind: 'heater', reading: value(11) }).verdict).toBe('in-band');
      expect(judge({ expected: 20, kind: 'carbon-composition', reading: value(11) }).verdict).toBe('low');
    });
    it('outside the wide band: a heater at 8 Ω of 20 is low; a winding at 700 Ω of 300 is high; a lamp reading open is open', () => {
      expect(judge({ expected: 20, kind: 'heater', reading: value(8) }).verdict).toBe('low');
      expect(judge({ expected: 300, kind: 'winding', reading: value(700) }).verdict).toBe('high');
      expect(judge({ expected: 40, kind: 'lamp', reading: stateOf('open') }).verdict).toBe('open');
      expect(codes(judge({ expected: 300, kind: 'winding', reading: value(300) }))).not.toContain('cold-resistance');
    });
    it('a critical band still wins over continuity', () => {
      const r = judge({ expected: 300, kind: 'winding', critical: { lowPct: -10, highPct: 10 }, reading: value(340) });
      expect(r.verdict).toBe('high');
      expect(r.explanation.continuity).toBeFalse();
      expect(r.band.source).toBe('critical');
    });
  });

  describe('method', () => {
    const part = (ohms: number): VerdictInput => ({ expected: 100_000, tolerancePct: 10, kind: 'carbon-composition', method: 'in-circuit', reading: value(ohms) });
    it('in circuit, a low component check is inconclusive (unexplained-in-circuit: lift a lead)', () => {
      const r = judge(part(60_000));
      expect(r.verdict).toBe('inconclusive');
      expect(r.reason).toBe('unexplained-in-circuit');
      expect(r.explanation.methodCaveat).toContain('whole network');
      // twin: lifted, the same reading is low
      expect(judge({ ...part(60_000), method: 'lead-lifted' }).verdict).toBe('low');
    });
    it('in circuit, a high reading stays high: the path is high', () => {
      const r = judge(part(130_000));
      expect(r.verdict).toBe('high');
      expect(codes(r)).toContain('in-circuit-path-high');
    });
    it('in circuit, in band: not low, high not ruled out', () => {
      const r = judge(part(100_000));
      expect(r.verdict).toBe('in-band');
      expect(codes(r)).toContain('in-circuit-not-low');
    });
    it('in circuit, a short points first at a shorted capacitor in parallel', () => {
      const r = judge(part(0.2));
      expect(r.verdict).toBe('short');
      expect(codes(r)).toContain('in-circuit-short');
    });
    it('a chart reading (no kind) expects the in-circuit value already: a low one is low', () => {
      const r = judge({ expected: 100_000, tolerancePct: 10, method: 'in-circuit', reading: value(60_000) });
      expect(r.verdict).toBe('low');
      expect(r.explanation.methodCaveat).toContain('chart reading');
    });
  });

  describe('explanation', () => {
    it('names the band and its source, range and a, u, U, k, the rule, the thresholds and near-limit per side', () => {
      const e = judge(worked(104_200, guarded)).explanation;
      expect(e.band).toEqual(jasmine.objectContaining({ source: 'template', basis: 'template-tolerance', lowPct: -10, highPct: 10 }));
      expect(e.range).toEqual(jasmine.objectContaining({ index: 3, inferred: false, kind: 'digital', topOhms: 199_900 }));
      expect(e.uncertainty).toEqual(jasmine.objectContaining({ k: 2, distribution: 'rectangular' }));
      expect(e.uncertainty!.reference).toContain('JCGM 100:2008');
      expect(e.rule.reference).toContain('§4.2.3');
      expect(e.thresholds).toEqual(jasmine.objectContaining({ shortOhms: 1, openOhms: 20e6, residualContactOhms: 0.1, continuityLowPct: -50, continuityHighPct: 100 }));
      expect(e.nearLimit!.fraction).toBe(NEAR_LIMIT_FRACTION);
      expect(e.notes.find((n) => n.code === 'coverage-factor')!.text).toContain('not a 95 % interval');
      expect(JSON.parse(JSON.stringify(e))).toEqual(e as never); // plain data: survives the wire
    });
  });

  describe('conformityProbability (JCGM 106:2012 §7, normal approximation)', () => {
    it('is Φ((T_U − y)/u) − Φ((T_L − y)/u); with no upper limit only the lower term counts', () => {
      expect(conformityProbability({ lowOhms: 90, highOhms: 110 }, 100, 5)).toBeCloseTo(0.954499736103642, 12); // Φ(2) − Φ(−2), A&S Table 26.1
      expect(conformityProbability({ lowOhms: 90, highOhms: null }, 100, 5)).toBeCloseTo(0.977249868051821, 12);
    });
    it('with u = 0 it is 1 in band and 0 outside', () => {
      expect(conformityProbability({ lowOhms: 90, highOhms: 110 }, 100, 0)).toBe(1);
      expect(conformityProbability({ lowOhms: 90, highOhms: 110 }, 120, 0)).toBe(0);
    });
  });

  describe('validation', () => {
    const ok: VerdictInput = { expected: 100_000, band: { lowPct: -10, highPct: 20 }, reading: value(100_000) };
    it('accepts a signed band, refuses a positive lowPct with an explanation', () => {
      expect(verdictInputProblems(ok)).toEqual([]);
      const problems = verdictInputProblems({ ...ok, band: { lowPct: 10, highPct: 20 } });
      expect(problems.map((p) => p.field)).toEqual(['band.lowPct']);
      expect(problems[0].message).toContain('−10');
      expect(() => judge({ ...ok, band: { lowPct: 10, highPct: 20 } })).toThrowError(VerdictInputError);
      expect(() => judge(ok)).not.toThrow();
    });
    const bad: [string, Partial<VerdictInput> | Record<string, unknown>, string][] = [
      ['a zero expected value', { expected: 0 }, 'expected'],
      ['a value reading without ohms', { reading: { state: 'value', ohms: null } }, 'reading.ohms'],
      ['an unknown state', { reading: { state: 'smoking', ohms: null } }, 'reading.state'],
      ['a tolerance of 0', { tolerancePct: 0 }, 'tolerancePct'],
      ['a critical band with a negative highPct', { critical: { lowPct: -5, highPct: -1 } }, 'critical.highPct'],
      ['a near-limit fraction of 0', { rule: { ...simple, nearLimitFraction: 0 } }, 'rule.nearLimitFraction'],
      ['an allowance with a positive lowPct', { rule: { ...simple, bandFrom: 'allowance', allowance: { lowPct: 20, highPct: 20 } } }, 'rule.allowance.lowPct'],
      ['a range the meter lacks', { meter: workedMeter(), rangeIndex: 7 }, 'rangeIndex'],
      ['an open threshold below the short one', { thresholds: { openOhms: 0.5 } }, 'thresholds.openOhms'],
      ['an unknown kind', { kind: 'valve' }, 'kind'],
      ['a positive continuity lowPct', { thresholds: { continuityLowPct: 50 } }, 'thresholds.continuityLowPct'],
      ['a bad meter', { meter: { kind: 'digital', leadOhms: 0, ranges: [] } }, 'meter.ranges'],
    ];
    for (const [what, patch, field] of bad) {
      it(`refuses ${what} (field ${field})`, () => {
        const input = { ...ok, ...patch } as VerdictInput;
        expect(verdictInputProblems(input).map((p) => p.field)).toContain(field);
        let error: unknown;
        try {
          judge(input);
        } catch (e) {
          error = e;
        }
        expect(error instanceof VerdictInputError && error.problems.some((p) => p.field === field)).toBeTrue();
      });
    }
  });
});
