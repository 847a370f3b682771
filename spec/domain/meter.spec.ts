import {
  COVERAGE_FACTOR,
  RESIDUAL_CONTACT_OHMS,
  expandedUncertainty,
  inferRange,
  isCountedAsOpen,
  measurementUncertainty,
  meterLimit,
  meterProblems,
  rangeTopOhms,
  topRangeIndex,
  type MeterProfile,
} from '../../api/domain/meter';
import { analogueMeter, workedMeter } from '../support/meters';

describe('meter model', () => {
  describe('digital limit a = p % × reading + counts × resolution (check-values §3 [CALC]; meter manuals)', () => {
    const m = workedMeter();
    // [value, range, a, u = a/√3 (GUM §4.3.7), U = 2u (GUM §6.2–6.3), half a unit of the last
    // printed digit of u and U] — check-values §3 [CALC], as printed there
    const cases: [number, number, number, number, number, number, number][] = [
      [4700, 2, 57.6, 33.26, 66.5, 0.005, 0.05],
      [1_500_000, 4, 17_000, 9810, 19_600, 5, 50],
      [104_200, 3, 1033.6, 596.75, 1193.5, 0.005, 0.05],
      [90_000, 3, 920, 531.16, 1062.3, 0.005, 0.05],
      [110_000, 3, 1080, 623.54, 1247.1, 0.005, 0.05],
    ];
    for (const [ohms, range, a, u, U, du, dU] of cases) {
      it(`${ohms} Ω on range ${range}: a = ${a} Ω, u = ${u} Ω, U = ${U} Ω`, () => {
        const limit = meterLimit(m, ohms, range);
        expect(limit.aOhms).toBeCloseTo(a, 6);
        expect(limit.lowOhms).toBeCloseTo(ohms - a, 6);
        expect(limit.highOhms!).toBeCloseTo(ohms + a, 6);
        // The residual contact term (±0.1 Ω) moves u by under a milliohm at these values.
        const mu = measurementUncertainty(m, ohms, range);
        expect(Math.abs(mu.uMeterOhms! - u)).toBeLessThanOrEqual(du);
        expect(Math.abs(mu.UOhms! - U)).toBeLessThanOrEqual(dU);
        expect(mu.k).toBe(2);
      });
    }

    it('U on the worked values with the contact term off is exactly 2a/√3 (GUM §4.3.7, §6.2)', () => {
      expect(expandedUncertainty(m, 4700, 2, 0)).toBeCloseTo((2 * 57.6) / Math.sqrt(3), 10);
      expect(expandedUncertainty(m, 4700, 2, 0)).toBeCloseTo(66.51, 2);
    });

    it('joins the residual lead-and-contact term in quadrature at every value: at 0 Ω on 200 Ω, u_c = √((0.2/√3)² + (0.1/√3)²)', () => {
      const mu = measurementUncertainty(m, 0, 0);
      expect(mu.limit.aOhms).toBeCloseTo(0.2, 12);
      expect(mu.uContactOhms).toBeCloseTo(RESIDUAL_CONTACT_OHMS / Math.sqrt(3), 12);
      expect(mu.ucOhms!).toBeCloseTo(Math.hypot(0.2, 0.1) / Math.sqrt(3), 12);
      expect(mu.UOhms!).toBeCloseTo(COVERAGE_FACTOR * Math.hypot(0.2, 0.1) / Math.sqrt(3), 12);
      // twin: the same value with the contact term off has u_c = u_meter
      expect(measurementUncertainty(m, 0, 0, 0).ucOhms!).toBeCloseTo(0.2 / Math.sqrt(3), 12);
    });

    it('a recorded range wins over the inferred one: 4.70 kΩ on the 200 k range has a = 37.6 + 200 Ω', () => {
      const limit = meterLimit(m, 4700, 3);
      expect(limit.rangeIndex).toBe(3);
      expect(limit.rangeInferred).toBeFalse();
      expect(limit.aOhms).toBeCloseTo(237.6, 9);
      const inferred = meterLimit(m, 4700);
      expect(inferred.rangeIndex).toBe(2);
      expect(inferred.rangeInferred).toBeTrue();
    });

    it('refuses a range the meter does not have', () => {
      expect(() => meterLimit(m, 4700, 5)).toThrowError(RangeError);
      expect(() => meterLimit(m, 4700, 4)).not.toThrow();
    });
  });

  describe('inferRange: the smallest full scale that shows the reading', () => {
    const m = workedMeter();
    const cases: [number, number][] = [
      [0, 0],
      [199.9, 0], // the full scale itself is displayable
      [200, 1],
      [1999, 1],
      [1999.5, 2],
      [4700, 2],
      [104_200, 3],
      [1_500_000, 4],
      [5_000_000, 4], // nothing shows it: the top range
    ];
    for (const [ohms, range] of cases) it(`${ohms} Ω → range ${range}`, () => expect(inferRange(m, ohms)).toBe(range));

    it('does not depend on the order the ranges are listed in', () => {
      const shuffled: MeterProfile = { ...m, ranges: [...(m as { ranges: object[] }).ranges].reverse() } as MeterProfile;
      expect(rangeTopOhms(shuffled, inferRange(shuffled, 4700))).toBe(19_990);
      expect(topRangeIndex(shuffled)).toBe(0);
      expect(topRangeIndex(m)).toBe(4);
    });

    it('analogue: the range whose centre is nearest on a log scale (best accuracy at mid-scale)', () => {
      const a = analogueMeter();
      expect(inferRange(a, 5)).toBe(0);
      expect(inferRange(a, 50_000)).toBe(1);
      expect(inferRange(a, 200_000)).toBe(2);
      expect(inferRange(a, 0)).toBe(0);
    });
  });

  describe('analogue scale law θ = Rc/(R + Rc), limits Rc(1/(θ ± δ) − 1) (check-values §3 [CALC])', () => {
    const a = analogueMeter();
    it('100 kΩ on Rc = 10 kΩ, δ = 3 %: 72.71…154.18 kΩ (not the first-order 63.7…136.3 kΩ)', () => {
      const limit = meterLimit(a, 100_000, 1);
      expect(limit.lowOhms / 1000).toBeCloseTo(72.71, 2);
      expect(limit.highOhms! / 1000).toBeCloseTo(154.18, 2);
      expect(limit.aOhms!).toBeCloseTo((limit.highOhms! - limit.lowOhms) / 2, 9);
      expect(limit.shows).toBeTrue();
      // GUM §4.3.8: asymmetric bounds, u = half-width/√3
      const mu = measurementUncertainty(a, 100_000, 1, 0);
      expect(mu.uMeterOhms!).toBeCloseTo(limit.aOhms! / Math.sqrt(3), 9);
    });

    it('unbounded above from R = Rc(1/δ − 1) = 323.3 kΩ; bounded just below it', () => {
      expect(rangeTopOhms(a, 1) / 1000).toBeCloseTo(323.33, 2);
      const at = meterLimit(a, 323_400, 1);
      expect(at.highOhms).toBeNull();
      expect(at.aOhms).toBeNull();
      expect(at.shows).toBeFalse();
      expect(measurementUncertainty(a, 323_400, 1).UOhms).toBeNull();
      expect(expandedUncertainty(a, 323_400, 1)).toBe(Number.POSITIVE_INFINITY);
      const below = meterLimit(a, 323_000, 1);
      expect(below.highOhms).not.toBeNull();
      expect(Number.isFinite(expandedUncertainty(a, 323_000, 1))).toBeTrue();
    });

    it('floors the lower limit at 0 Ω near the scale’s 0 end (θ + δ ≥ 1)', () => {
      const limit = meterLimit(a, 0, 1);
      expect(limit.lowOhms).toBe(0);
      expect(limit.highOhms!).toBeCloseTo(10_000 * (1 / 0.97 - 1), 6);
    });
  });

  describe('isCountedAsOpen: when over-range means open', () => {
    it('without a meter profile', () => expect(isCountedAsOpen(undefined)).toBeTrue());
    it('on an autoranging meter, and not on the same meter ranged by hand below its top', () => {
      expect(isCountedAsOpen(workedMeter({ autorange: true }), 1)).toBeTrue();
      expect(isCountedAsOpen(workedMeter(), 1)).toBeFalse();
    });
    it('on the top range of a manual meter, and not with no range recorded', () => {
      expect(isCountedAsOpen(workedMeter(), 4)).toBeTrue();
      expect(isCountedAsOpen(workedMeter())).toBeFalse();
    });
    it('on a single-range meter', () => {
      const one: MeterProfile = { kind: 'digital', leadOhms: 0, ranges: [{ fullScaleOhms: 1999, resolutionOhms: 1, pctOfReading: 1, counts: 1 }] };
      expect(isCountedAsOpen(one)).toBeTrue();
    });
  });

  describe('meterProblems', () => {
    it('accepts the worked meters', () => {
      expect(meterProblems(workedMeter())).toEqual([]);
      expect(meterProblems(analogueMeter())).toEqual([]);
    });
    it('names each bad field', () => {
      const bad = { kind: 'digital', leadOhms: -1, ranges: [{ fullScaleOhms: 0, resolutionOhms: 1, pctOfReading: -1, counts: 2 }] } as MeterProfile;
      expect(meterProblems(bad).map((p) => p.field)).toEqual(['meter.leadOhms', 'meter.ranges[0].fullScaleOhms', 'meter.ranges[0].pctOfReading']);
      expect(meterProblems({ kind: 'analogue', leadOhms: 0, ranges: [{ centreOhms: 10, arcFraction: 3 }] }).map((p) => p.field)).toEqual(['meter.ranges[0].arcFraction']);
      expect(meterProblems({ kind: 'digital', leadOhms: 0, ranges: [] }).map((p) => p.field)).toEqual(['meter.ranges']);
      expect(meterProblems({ kind: 'steam' } as unknown as MeterProfile).map((p) => p.field)).toEqual(['meter.kind']);
    });
  });
});
