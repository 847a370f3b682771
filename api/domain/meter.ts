/**
 * Meter profiles and the measurement model (DESIGN.md §3.4).
 *
 * - Digital ranges: the meter's limit is a = p % × reading + n digits × resolution on the range
 *   used ("±(p % of reading + n digits)", handheld meter manuals), a digit being one step of the
 *   last displayed digit on that range.
 * - Analogue ranges: an ohmmeter scale follows θ = Rc/(R + Rc) (θ the needle position as a
 *   fraction of full arc, Rc the centre-scale value, a textbook result); an arc error ±δ gives the
 *   limits Rc(1/(θ + δ) − 1) … Rc(1/(θ − δ) − 1), unbounded above where θ ≤ δ.
 * - The limit is a rectangular distribution: u = a/√3 (JCGM 100:2008 (GUM) §4.3.7; for the
 *   analogue scale, whose limits sit asymmetrically about the reading, a is half the width and
 *   u = a/√3 still holds, GUM §4.3.8). A residual lead-and-contact term joins it at every value
 *   in quadrature; U = k·u_c with k = 2 (GUM §6.2–6.3). U is not called a 95 % interval: for a
 *   rectangular limit 2u = 1.155 a is wider than the limit itself.
 * - Lead resistance is a bias, not an uncertainty: `judge` (verdict.ts) subtracts it from the
 *   reading; the functions here take the value the meter displays.
 *
 * Pure TypeScript: no framework or Node-only imports.
 */

/** A digital range. `fullScaleOhms` is the largest displayable value (1999 Ω on a 2000-count "2 k" range). */
export type DigitalRange = { fullScaleOhms: number; resolutionOhms: number; pctOfReading: number; counts: number };
/** An analogue range: centre-scale value Rc and the arc error δ as a fraction of full arc (0.03 for 3 %). */
export type AnalogueRange = { centreOhms: number; arcFraction: number };
export type MeterProfile =
  | { kind: 'digital'; autorange?: boolean; leadOhms: number; ranges: DigitalRange[] }
  | { kind: 'analogue'; leadOhms: number; ranges: AnalogueRange[] };

/** Coverage factor k of the expanded uncertainty U = k·u_c (JCGM 100:2008 §6.2–6.3). Never called "95 %". */
export const COVERAGE_FACTOR = 2;

/**
 * Residual lead-and-contact term, ohms: the half-width of a rectangular distribution (±0.1 Ω) for
 * what is left of probe-contact and lead variation after the lead resistance has been subtracted
 * as a bias. Common practice, no published source (test leads add about 0.1–0.2 Ω, meter
 * manuals); a default, overridable per verdict (`thresholds.residualContactOhms`).
 */
export const RESIDUAL_CONTACT_OHMS = 0.1;

/** The meter's limit for one value on one range. */
export type MeterLimit = {
  kind: 'digital' | 'analogue';
  rangeIndex: number;
  /** True when the range was inferred from the value rather than recorded. */
  rangeInferred: boolean;
  /** Half-width of the rectangular limit; null where the limit is unbounded above (analogue, θ ≤ δ). */
  aOhms: number | null;
  /** The limits themselves: reading ∓ a (digital) or Rc(1/(θ ± δ) − 1) (analogue, floored at 0). */
  lowOhms: number;
  highOhms: number | null;
  /** Does this range display the value (digital: value ≤ full scale; analogue: below the unbounded point)? */
  shows: boolean;
};

/** Standard and expanded uncertainty of one value (all ohms; null where unbounded). */
export type MeasurementUncertainty = {
  limit: MeterLimit;
  /** u of the meter's limit: a/√3 (GUM §4.3.7). */
  uMeterOhms: number | null;
  /** u of the residual lead-and-contact term: its half-width/√3. */
  uContactOhms: number;
  /** Combined standard uncertainty u_c = √(u_meter² + u_contact²) (GUM §5.1.2, uncorrelated inputs). */
  ucOhms: number | null;
  k: number;
  /** U = k·u_c. */
  UOhms: number | null;
};

/** A problem in a meter profile, naming the field. */
export type MeterProblem = { field: string; message: string };

function isPositive(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x) && x > 0;
}
function isNonNegative(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x) && x >= 0;
}

/** Problems in a meter profile (empty when it is usable). */
export function meterProblems(meter: MeterProfile, field = 'meter'): MeterProblem[] {
  const problems: MeterProblem[] = [];
  if (!meter || (meter.kind !== 'digital' && meter.kind !== 'analogue')) {
    return [{ field: `${field}.kind`, message: 'a meter is `digital` or `analogue`' }];
  }
  if (!isNonNegative(meter.leadOhms)) problems.push({ field: `${field}.leadOhms`, message: 'lead resistance is a number of ohms, 0 or more' });
  if (!Array.isArray(meter.ranges) || meter.ranges.length === 0) {
    problems.push({ field: `${field}.ranges`, message: 'a meter needs at least one range' });
    return problems;
  }
  meter.ranges.forEach((r, i) => {
    const f = `${field}.ranges[${i}]`;
    if (meter.kind === 'digital') {
      const d = r as DigitalRange;
      if (!isPositive(d.fullScaleOhms)) problems.push({ field: `${f}.fullScaleOhms`, message: 'full scale is a positive number of ohms' });
      if (!isPositive(d.resolutionOhms)) problems.push({ field: `${f}.resolutionOhms`, message: 'resolution is a positive number of ohms' });
      if (!isNonNegative(d.pctOfReading)) problems.push({ field: `${f}.pctOfReading`, message: '% of reading is 0 or more' });
      if (!isNonNegative(d.counts)) problems.push({ field: `${f}.counts`, message: 'counts (digits) are 0 or more' });
    } else {
      const a = r as AnalogueRange;
      if (!isPositive(a.centreOhms)) problems.push({ field: `${f}.centreOhms`, message: 'centre-scale value is a positive number of ohms' });
      if (!(isPositive(a.arcFraction) && a.arcFraction < 0.5)) {
        problems.push({ field: `${f}.arcFraction`, message: 'arc error is a fraction of full arc between 0 and 0.5 (3 % is 0.03)' });
      }
    }
  });
  return problems;
}

/**
 * The largest value a range can show: the full scale of a digital range; for an analogue range the
 * value Rc(1/δ − 1) from which the upper limit is unbounded (the needle cannot tell it from ∞).
 */
export function rangeTopOhms(meter: MeterProfile, rangeIndex: number): number {
  if (meter.kind === 'digital') return meter.ranges[rangeIndex].fullScaleOhms;
  const r = meter.ranges[rangeIndex];
  return r.centreOhms * (1 / r.arcFraction - 1);
}

/** Index of the top range: the one with the largest full scale (analogue: the largest centre value). */
export function topRangeIndex(meter: MeterProfile): number {
  let best = 0;
  for (let i = 1; i < meter.ranges.length; i++) if (rangeTopOhms(meter, i) > rangeTopOhms(meter, best)) best = i;
  return best;
}

/**
 * The range a value would be read on when none is recorded.
 * Digital: the range with the smallest full scale that shows the value (the top range when none
 * does). Analogue: the range whose centre value is nearest the value on a log scale (an ohmmeter
 * is most accurate at mid-scale, θ = ½), the smallest centre for 0.
 */
export function inferRange(meter: MeterProfile, ohms: number): number {
  if (meter.kind === 'digital') {
    let best = -1;
    meter.ranges.forEach((r, i) => {
      if (ohms <= r.fullScaleOhms && (best < 0 || r.fullScaleOhms < meter.ranges[best].fullScaleOhms)) best = i;
    });
    return best >= 0 ? best : topRangeIndex(meter);
  }
  let best = 0;
  let bestDistance = Number.POSITIVE_INFINITY;
  meter.ranges.forEach((r, i) => {
    const distance = ohms > 0 ? Math.abs(Math.log(ohms / r.centreOhms)) : r.centreOhms;
    if (distance < bestDistance) {
      best = i;
      bestDistance = distance;
    }
  });
  return best;
}

function resolveRange(meter: MeterProfile, ohms: number, rangeIndex?: number): { index: number; inferred: boolean } {
  if (rangeIndex !== undefined && rangeIndex !== null) {
    if (!Number.isInteger(rangeIndex) || rangeIndex < 0 || rangeIndex >= meter.ranges.length) {
      throw new RangeError(`range ${rangeIndex} is not a range of this meter (0…${meter.ranges.length - 1})`);
    }
    return { index: rangeIndex, inferred: false };
  }
  return { index: inferRange(meter, ohms), inferred: true };
}

/**
 * The meter's limit at a displayed value, on the recorded range or (when none is given) the
 * inferred one. Digital: a = p % × |value| + counts × resolution. Analogue: θ = Rc/(R + Rc),
 * limits Rc(1/(θ ± δ) − 1), a = half their distance, unbounded above where θ ≤ δ.
 */
export function meterLimit(meter: MeterProfile, ohms: number, rangeIndex?: number): MeterLimit {
  const { index, inferred } = resolveRange(meter, ohms, rangeIndex);
  if (meter.kind === 'digital') {
    const r = meter.ranges[index];
    const a = (r.pctOfReading / 100) * Math.abs(ohms) + r.counts * r.resolutionOhms;
    return { kind: 'digital', rangeIndex: index, rangeInferred: inferred, aOhms: a, lowOhms: ohms - a, highOhms: ohms + a, shows: ohms <= r.fullScaleOhms };
  }
  const r = meter.ranges[index];
  const R = Math.max(0, ohms);
  const theta = r.centreOhms / (R + r.centreOhms);
  const low = Math.max(0, r.centreOhms * (1 / (theta + r.arcFraction) - 1));
  const high = theta > r.arcFraction ? r.centreOhms * (1 / (theta - r.arcFraction) - 1) : null;
  return {
    kind: 'analogue',
    rangeIndex: index,
    rangeInferred: inferred,
    aOhms: high === null ? null : (high - low) / 2,
    lowOhms: low,
    highOhms: high,
    shows: high !== null,
  };
}

/**
 * Standard and expanded uncertainty at a displayed value: u_meter = a/√3, u_contact =
 * residualContactOhms/√3, u_c = √(u_meter² + u_contact²), U = 2·u_c. Nulls where the meter's
 * limit is unbounded.
 */
export function measurementUncertainty(
  meter: MeterProfile,
  ohms: number,
  rangeIndex?: number,
  residualContactOhms: number = RESIDUAL_CONTACT_OHMS,
): MeasurementUncertainty {
  const limit = meterLimit(meter, ohms, rangeIndex);
  const uContact = residualContactOhms / Math.sqrt(3);
  const uMeter = limit.aOhms === null ? null : limit.aOhms / Math.sqrt(3);
  const uc = uMeter === null ? null : Math.hypot(uMeter, uContact);
  return { limit, uMeterOhms: uMeter, uContactOhms: uContact, ucOhms: uc, k: COVERAGE_FACTOR, UOhms: uc === null ? null : COVERAGE_FACTOR * uc };
}

/**
 * U = 2·u_c at a displayed value, for reuse by the in-circuit reasoning.
 * Returns +Infinity where the meter's limit is unbounded (an analogue scale near its ∞ end), so
 * that `reading + U` stays correct arithmetic.
 */
export function expandedUncertainty(meter: MeterProfile, ohms: number, rangeIndex?: number, residualContactOhms: number = RESIDUAL_CONTACT_OHMS): number {
  return measurementUncertainty(meter, ohms, rangeIndex, residualContactOhms).UOhms ?? Number.POSITIVE_INFINITY;
}

/**
 * Does an over-range display (`OL`, the needle at ∞) count as open? Yes without a meter profile,
 * on an autoranging meter, and on the top range (or a single-range meter); otherwise `OL` only
 * means "over the selected range" (meter manuals), and the verdict decides what it means.
 */
export function isCountedAsOpen(meter: MeterProfile | undefined | null, rangeIndex?: number): boolean {
  if (!meter) return true;
  if (meter.kind === 'digital' && meter.autorange) return true;
  if (meter.ranges.length === 1) return true;
  return rangeIndex !== undefined && rangeIndex !== null && rangeIndex === topRangeIndex(meter);
}
