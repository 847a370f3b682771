/**
 * Band choice and verdicts (DESIGN.md §3.4). `judge` is what `POST /api/calc/verdict` wraps and
 * what the bench grid computes in the browser.
 *
 * Order of work in `judge`:
 *  1. validate the input (VerdictInputError names each bad field);
 *  2. choose the band: a critical position's own band always wins; continuity kinds get the wide
 *     continuity band; otherwise the rule's `bandFrom` — `template` (the marked tolerance, or the
 *     template's asymmetric band) or `allowance`; expected states get threshold bands;
 *  3. subtract the meter's lead resistance from a displayed value (the bias correction: this is
 *     the one place it happens; range choice and the meter's limit use the displayed value);
 *  4. decide by reading state, then by value under the `simple` (ILAC-G8:09/2019 §4.2.1) or
 *     `guarded` (ILAC-G8:09/2019 §4.2.3, ISO 14253-1) rule;
 *  5. near-limit per side, the probability of conformity (JCGM 106:2012 §7, normal
 *     approximation), the method caveat and the structured explanation.
 *
 * Band percentages are signed: `lowPct` is 0 or negative (−10 means 10 % below nominal),
 * `highPct` 0 or positive. A positive `lowPct` is refused with an explanation rather than guessed.
 *
 * Pure TypeScript: no framework or Node-only imports.
 */
import {
  COMPONENT_KINDS,
  CONTINUITY_KINDS,
  DECISION_RULES,
  METHODS,
  READING_STATES,
  type BandSource,
  type ComponentKind,
  type DecisionRule,
  type Method,
  type ReadingState,
  type Side,
  type Verdict,
  type VerdictReason,
} from './words';
import {
  COVERAGE_FACTOR,
  RESIDUAL_CONTACT_OHMS,
  isCountedAsOpen,
  measurementUncertainty,
  meterLimit,
  meterProblems,
  rangeTopOhms,
  type AnalogueRange,
  type DigitalRange,
  type MeasurementUncertainty,
  type MeterProfile,
} from './meter';
import { normalCdf } from './normal';

// ---------------------------------------------------------------------------------------------
// Named defaults (every one overridable, every one shown in the explanation)

/**
 * Expected `short`: a reading (after the lead resistance is subtracted) at or below this is a
 * short — i.e. 1 Ω plus the lead resistance as displayed. Common practice, no published source.
 */
export const SHORT_THRESHOLD_OHMS = 1;

/**
 * Expected `open`: a reading at or above this is open (as is `OL` where it counts as open).
 * 20 MΩ, the top of a common 2000-count meter's 20 M range. Common practice, no published source.
 */
export const OPEN_THRESHOLD_OHMS = 20e6;

/**
 * Near-limit fraction: an in-band reading whose |drift| is beyond this fraction of its own side's
 * limit is `near-limit` (DESIGN.md §2 "acceptance rule", default 0.75). Common practice.
 */
export const NEAR_LIMIT_FRACTION = 0.75;

/**
 * Tolerance used when a template gives neither a tolerance nor a band: ±20 %, what a resistor with
 * no tolerance band is marked (IEC 60062:2016, colour code: no band ±20 %).
 */
export const DEFAULT_TOLERANCE_PCT = 20;

/**
 * Restoration allowance used when the rule asks for one and names none: ±20 % in non-critical
 * places (check-values §5). Common practice, a policy choice, no published source.
 */
export const DEFAULT_ALLOWANCE: Readonly<PctBand> = { lowPct: -20, highPct: 20 };

/**
 * Continuity band for heaters, lamps and windings (CONTINUITY_KINDS): −50 % … +100 % of the
 * template's (cold) value. Wide on purpose: a cold tungsten heater's resistance varies with room
 * temperature and from tube to tube, and DC resistance cannot show shorted turns anyway.
 * Common practice, no published source.
 */
export const CONTINUITY_BAND: Readonly<PctBand> = { lowPct: -50, highPct: 100 };

// ---------------------------------------------------------------------------------------------
// Types

/** A band in signed percent of the expected value: lowPct ≤ 0 ≤ highPct, lowPct < highPct. */
export type PctBand = { lowPct: number; highPct: number };

export type AcceptanceRule = {
  decision: DecisionRule;
  /** Default NEAR_LIMIT_FRACTION (0.75). */
  nearLimitFraction: number;
  bandFrom: 'template' | 'allowance';
  allowance?: PctBand;
};

/** The default rule: simple decision, template band, near-limit at 0.75 of each side. */
export const DEFAULT_RULE: Readonly<AcceptanceRule> = { decision: 'simple', nearLimitFraction: NEAR_LIMIT_FRACTION, bandFrom: 'template' };

export type Thresholds = {
  /** SHORT_THRESHOLD_OHMS */
  shortOhms: number;
  /** OPEN_THRESHOLD_OHMS */
  openOhms: number;
  /** RESIDUAL_CONTACT_OHMS (meter.ts) */
  residualContactOhms: number;
  /** CONTINUITY_BAND.lowPct */
  continuityLowPct: number;
  /** CONTINUITY_BAND.highPct */
  continuityHighPct: number;
};

export const DEFAULT_THRESHOLDS: Readonly<Thresholds> = {
  shortOhms: SHORT_THRESHOLD_OHMS,
  openOhms: OPEN_THRESHOLD_OHMS,
  residualContactOhms: RESIDUAL_CONTACT_OHMS,
  continuityLowPct: CONTINUITY_BAND.lowPct,
  continuityHighPct: CONTINUITY_BAND.highPct,
};

export type VerdictInput = {
  expected: number | 'open' | 'short';
  reading: { state: ReadingState; ohms: number | null };
  /** The template's symmetric band, ±tolerancePct. */
  tolerancePct?: number;
  /** The template's asymmetric band, signed percent (lowPct ≤ 0). Wins over tolerancePct. */
  band?: PctBand;
  /** A critical position's own band (signed percent): always wins. */
  critical?: PctBand;
  kind?: ComponentKind;
  method?: Method;
  rangeIndex?: number;
  rule?: AcceptanceRule;
  meter?: MeterProfile;
  thresholds?: Partial<Thresholds>;
};

/** How the band was arrived at. */
export type BandBasis =
  | 'critical'
  | 'template-band'
  | 'template-tolerance'
  | 'default-tolerance'
  | 'allowance'
  | 'default-allowance'
  | 'continuity'
  | 'expected-open'
  | 'expected-short';

export type NoteCode =
  | 'lead-subtracted'
  | 'negative-after-lead'
  | 'guarded-needs-meter'
  | 'no-meter'
  | 'over-range-counts-as-open'
  | 'over-range-above-band'
  | 'over-range-below-band'
  | 'over-range-range-unknown'
  | 'over-range-above-open-threshold'
  | 'numeric-short'
  | 'numeric-open'
  | 'meter-cannot-decide'
  | 'unbounded-above'
  | 'normal-approximation'
  | 'coverage-factor'
  | 'continuity'
  | 'cold-resistance'
  | 'band-over-tolerance'
  | 'default-tolerance'
  | 'default-allowance'
  | 'unexplained-in-circuit'
  | 'in-circuit-not-low'
  | 'in-circuit-path-high'
  | 'in-circuit-short'
  | 'state-reading';

export type ExplanationNote = { code: NoteCode; text: string };

export type VerdictExplanation = {
  expected: number | 'open' | 'short';
  readingState: ReadingState;
  /** The value as displayed, before the lead resistance is subtracted. */
  displayedOhms: number | null;
  /** The lead resistance subtracted (0 without a meter profile). */
  leadOhms: number;
  /** The value judged: displayed − lead, floored at 0. */
  correctedOhms: number | null;
  band: {
    lowOhms: number;
    highOhms: number | null;
    lowPct: number | null;
    highPct: number | null;
    source: BandSource;
    basis: BandBasis;
  };
  /** The range used at the reading, and its specification. */
  range: { index: number; inferred: boolean; kind: 'digital' | 'analogue'; topOhms: number; spec: DigitalRange | AnalogueRange } | null;
  /** The measurement model at the reading (JCGM 100:2008 §4.3.7, §6.2–6.3). */
  uncertainty: {
    aOhms: number | null;
    limitLowOhms: number;
    limitHighOhms: number | null;
    uMeterOhms: number | null;
    uContactOhms: number;
    ucOhms: number | null;
    k: number;
    UOhms: number | null;
    distribution: 'rectangular';
    reference: string;
  } | null;
  rule: {
    /** The rule asked for. */
    decision: DecisionRule;
    /** The rule applied (`simple` when `guarded` was asked without a meter profile). */
    applied: DecisionRule;
    bandFrom: 'template' | 'allowance';
    nearLimitFraction: number;
    reference: string;
  };
  /** Guarded rule only: U at each band limit, on the range that would display that limit, and the limits it gives. */
  guard: {
    UAtLowOhms: number | null;
    UAtHighOhms: number | null;
    lowLimitRangeIndex: number | null;
    highLimitRangeIndex: number | null;
    /** null: no acceptance limit below (U at the lower limit unbounded: nothing is accepted). */
    acceptanceLowOhms: number | null;
    /** null: no upper acceptance limit (the band has none, or U at it is unbounded: see acceptanceZoneEmpty). */
    acceptanceHighOhms: number | null;
    /** null: nothing can be rejected as low (U at the lower limit unbounded). */
    rejectionLowOhms: number | null;
    /** null: nothing can be rejected as high (no upper limit, or U at it unbounded). */
    rejectionHighOhms: number | null;
    acceptanceZoneEmpty: boolean;
    reference: string;
  } | null;
  /** Near-limit thresholds per side (numeric expected values outside continuity checks). */
  nearLimit: { fraction: number; lowPct: number; highPct: number; lowOhms: number; highOhms: number } | null;
  conformity: { probability: number; uOhms: number; method: string } | null;
  /** The thresholds used (defaults merged with overrides); `shortDisplayedOhms` adds the lead resistance. */
  thresholds: Thresholds & { shortDisplayedOhms: number };
  method: Method | null;
  methodCaveat: string | null;
  continuity: boolean;
  notes: ExplanationNote[];
};

export type VerdictResult = {
  verdict: Verdict;
  reason: VerdictReason | null;
  driftPct: number | null;
  band: { lowOhms: number; highOhms: number | null; source: BandSource };
  /** U = 2·u_c at the reading; null without a meter, for a state reading, or where unbounded. */
  uncertaintyOhms: number | null;
  side: Side | null;
  conformityProbability: number | null;
  explanation: VerdictExplanation;
};

export type VerdictProblem = { field: string; message: string };

/** Thrown by `judge` for input it cannot judge; `problems` names each field. */
export class VerdictInputError extends Error {
  readonly problems: VerdictProblem[];
  constructor(problems: VerdictProblem[]) {
    super(`invalid verdict input: ${problems.map((p) => `${p.field}: ${p.message}`).join('; ')}`);
    this.name = 'VerdictInputError';
    this.problems = problems;
  }
}

// ---------------------------------------------------------------------------------------------
// References shown in explanations

const REF_SIMPLE = 'ILAC-G8:09/2019 §4.2.1 (simple acceptance: the reading decides)';
const REF_GUARDED = 'ILAC-G8:09/2019 §4.2.3 (non-binary rule with guard band w = U); ISO 14253-1';
const REF_GUM = 'JCGM 100:2008 (GUM) §4.3.7 rectangular u = a/√3; §6.2–6.3 U = k·u_c, k = 2';
const CONFORMITY_METHOD = 'normal approximation (JCGM 106:2012 §7) with u at the reading: p_c = Φ((T_U − y)/u) − Φ((T_L − y)/u)';

// ---------------------------------------------------------------------------------------------
// Validation

const isFiniteNumber = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

function pctBandProblems(b: unknown, field: string): VerdictProblem[] {
  if (typeof b !== 'object' || b === null) return [{ field, message: 'a band is { lowPct, highPct } in signed percent' }];
  const { lowPct, highPct } = b as PctBand;
  const problems: VerdictProblem[] = [];
  if (!isFiniteNumber(lowPct)) problems.push({ field: `${field}.lowPct`, message: 'lowPct is a number of percent' });
  else if (lowPct > 0) {
    problems.push({ field: `${field}.lowPct`, message: `lowPct is signed: a lower limit ${lowPct} % below nominal is written −${lowPct}` });
  } else if (lowPct <= -100) problems.push({ field: `${field}.lowPct`, message: 'lowPct must be above −100 %' });
  if (!isFiniteNumber(highPct)) problems.push({ field: `${field}.highPct`, message: 'highPct is a number of percent' });
  else if (highPct < 0) problems.push({ field: `${field}.highPct`, message: 'highPct is 0 or positive (the upper limit above nominal)' });
  if (problems.length === 0 && lowPct === highPct) problems.push({ field, message: 'a band needs some width' });
  return problems;
}

/** Problems with a verdict input (empty when `judge` can judge it). */
export function verdictInputProblems(input: VerdictInput): VerdictProblem[] {
  const problems: VerdictProblem[] = [];
  if (typeof input !== 'object' || input === null) return [{ field: '', message: 'a verdict input is an object' }];
  const { expected, reading } = input;
  if (!(expected === 'open' || expected === 'short' || (isFiniteNumber(expected) && expected > 0))) {
    problems.push({ field: 'expected', message: 'expected is a positive number of ohms, `open` or `short`' });
  }
  if (typeof reading !== 'object' || reading === null || !READING_STATES.includes(reading.state)) {
    problems.push({ field: 'reading.state', message: `a reading state is one of ${READING_STATES.join(', ')}` });
  } else if (reading.state === 'value' && !isFiniteNumber(reading.ohms)) {
    problems.push({ field: 'reading.ohms', message: 'a `value` reading needs a number of ohms' });
  }
  if (input.tolerancePct !== undefined && !(isFiniteNumber(input.tolerancePct) && input.tolerancePct > 0 && input.tolerancePct < 100)) {
    problems.push({ field: 'tolerancePct', message: 'tolerance is a percentage above 0 and below 100' });
  }
  if (input.band !== undefined) problems.push(...pctBandProblems(input.band, 'band'));
  if (input.critical !== undefined) problems.push(...pctBandProblems(input.critical, 'critical'));
  if (input.kind !== undefined && !COMPONENT_KINDS.includes(input.kind)) problems.push({ field: 'kind', message: `kind is one of ${COMPONENT_KINDS.join(', ')}` });
  if (input.method !== undefined && !METHODS.includes(input.method)) problems.push({ field: 'method', message: `method is one of ${METHODS.join(', ')}` });
  if (input.rule !== undefined) {
    const r = input.rule;
    if (typeof r !== 'object' || r === null) problems.push({ field: 'rule', message: 'a rule is { decision, nearLimitFraction, bandFrom, allowance? }' });
    else {
      if (r.decision !== undefined && !DECISION_RULES.includes(r.decision)) problems.push({ field: 'rule.decision', message: 'decision is `simple` or `guarded`' });
      if (r.nearLimitFraction !== undefined && !(isFiniteNumber(r.nearLimitFraction) && r.nearLimitFraction > 0 && r.nearLimitFraction <= 1)) {
        problems.push({ field: 'rule.nearLimitFraction', message: 'the near-limit fraction is above 0 and at most 1' });
      }
      if (r.bandFrom !== undefined && r.bandFrom !== 'template' && r.bandFrom !== 'allowance') {
        problems.push({ field: 'rule.bandFrom', message: 'bandFrom is `template` or `allowance`' });
      }
      if (r.allowance !== undefined) problems.push(...pctBandProblems(r.allowance, 'rule.allowance'));
    }
  }
  if (input.meter !== undefined) {
    const mp = meterProblems(input.meter);
    problems.push(...mp);
    if (mp.length === 0 && input.rangeIndex !== undefined) {
      if (!(Number.isInteger(input.rangeIndex) && input.rangeIndex >= 0 && input.rangeIndex < input.meter.ranges.length)) {
        problems.push({ field: 'rangeIndex', message: `range is 0…${input.meter.ranges.length - 1} on this meter` });
      }
    }
  } else if (input.rangeIndex !== undefined && !(Number.isInteger(input.rangeIndex) && input.rangeIndex >= 0)) {
    problems.push({ field: 'rangeIndex', message: 'range is a whole number from 0' });
  }
  const t = input.thresholds;
  if (t !== undefined) {
    if (typeof t !== 'object' || t === null) problems.push({ field: 'thresholds', message: 'thresholds is an object' });
    else {
      if (t.shortOhms !== undefined && !(isFiniteNumber(t.shortOhms) && t.shortOhms >= 0)) problems.push({ field: 'thresholds.shortOhms', message: 'a number of ohms, 0 or more' });
      if (t.openOhms !== undefined && !(isFiniteNumber(t.openOhms) && t.openOhms > 0)) problems.push({ field: 'thresholds.openOhms', message: 'a positive number of ohms' });
      if (t.residualContactOhms !== undefined && !(isFiniteNumber(t.residualContactOhms) && t.residualContactOhms >= 0)) {
        problems.push({ field: 'thresholds.residualContactOhms', message: 'a number of ohms, 0 or more' });
      }
      if (t.continuityLowPct !== undefined || t.continuityHighPct !== undefined) {
        const cb = { lowPct: t.continuityLowPct ?? CONTINUITY_BAND.lowPct, highPct: t.continuityHighPct ?? CONTINUITY_BAND.highPct };
        problems.push(...pctBandProblems(cb, 'thresholds').map((p) => ({ ...p, field: p.field.replace('lowPct', 'continuityLowPct').replace('highPct', 'continuityHighPct') })));
      }
      const shortOhms = t.shortOhms ?? SHORT_THRESHOLD_OHMS;
      const openOhms = t.openOhms ?? OPEN_THRESHOLD_OHMS;
      if (isFiniteNumber(shortOhms) && isFiniteNumber(openOhms) && openOhms <= shortOhms) {
        problems.push({ field: 'thresholds.openOhms', message: 'the open threshold must lie above the short threshold' });
      }
    }
  }
  return problems;
}

// ---------------------------------------------------------------------------------------------
// Band

type ChosenBand = VerdictExplanation['band'];

function pctBandToOhms(expected: number, b: PctBand, source: BandSource, basis: BandBasis): ChosenBand {
  return {
    lowOhms: expected * (1 + b.lowPct / 100),
    highOhms: expected * (1 + b.highPct / 100),
    lowPct: b.lowPct,
    highPct: b.highPct,
    source,
    basis,
  };
}

/**
 * The band for an input: critical wins; continuity kinds get the continuity band; else the rule's
 * `bandFrom`. Expected states get threshold bands (source `template`, the template's expected
 * state): `open` → [openOhms, ∞), `short` → [0, shortOhms].
 */
export function chooseBand(
  input: Pick<VerdictInput, 'expected' | 'tolerancePct' | 'band' | 'critical' | 'kind'>,
  rule: Pick<AcceptanceRule, 'bandFrom' | 'allowance'> = DEFAULT_RULE,
  thresholds: Thresholds = DEFAULT_THRESHOLDS,
): ChosenBand {
  const { expected } = input;
  if (expected === 'open') return { lowOhms: thresholds.openOhms, highOhms: null, lowPct: null, highPct: null, source: 'template', basis: 'expected-open' };
  if (expected === 'short') return { lowOhms: 0, highOhms: thresholds.shortOhms, lowPct: null, highPct: null, source: 'template', basis: 'expected-short' };
  if (input.critical) return pctBandToOhms(expected, input.critical, 'critical', 'critical');
  if (input.kind && CONTINUITY_KINDS.includes(input.kind)) {
    return pctBandToOhms(expected, { lowPct: thresholds.continuityLowPct, highPct: thresholds.continuityHighPct }, 'template', 'continuity');
  }
  if (rule.bandFrom === 'allowance') {
    return rule.allowance
      ? pctBandToOhms(expected, rule.allowance, 'allowance', 'allowance')
      : pctBandToOhms(expected, DEFAULT_ALLOWANCE, 'allowance', 'default-allowance');
  }
  if (input.band) return pctBandToOhms(expected, input.band, 'template', 'template-band');
  if (input.tolerancePct !== undefined) {
    return pctBandToOhms(expected, { lowPct: -input.tolerancePct, highPct: input.tolerancePct }, 'template', 'template-tolerance');
  }
  return pctBandToOhms(expected, { lowPct: -DEFAULT_TOLERANCE_PCT, highPct: DEFAULT_TOLERANCE_PCT }, 'template', 'default-tolerance');
}

// ---------------------------------------------------------------------------------------------
// Guard band (ILAC-G8:09/2019 §4.2.3)

/**
 * Guard-band limits in ohms. Unbounded values are ±Infinity here (arithmetic stays right);
 * the explanation shows them as null.
 */
export type GuardLimits = {
  UAtLowOhms: number | null;
  UAtHighOhms: number | null;
  lowLimitRangeIndex: number | null;
  highLimitRangeIndex: number | null;
  acceptanceLowOhms: number;
  acceptanceHighOhms: number | null;
  rejectionLowOhms: number;
  rejectionHighOhms: number | null;
  acceptanceZoneEmpty: boolean;
  reference: string;
};

/** The range that would display a value: the recorded one when it shows the value, else the inferred one. */
function rangeForValue(meter: MeterProfile, displayedOhms: number, recorded: number | undefined): number {
  if (recorded !== undefined && meterLimit(meter, displayedOhms, recorded).shows) return recorded;
  return meterLimit(meter, displayedOhms).rangeIndex;
}

/**
 * Acceptance and rejection limits: each band limit moved inward (acceptance) and outward
 * (rejection) by U evaluated at that limit, on the range that would display it. A lower limit of
 * 0 Ω is no limit (nothing reads below 0) and is not guarded.
 */
export function guardLimits(
  band: { lowOhms: number; highOhms: number | null },
  meter: MeterProfile,
  rangeIndex?: number,
  residualContactOhms: number = RESIDUAL_CONTACT_OHMS,
): GuardLimits {
  const lead = meter.leadOhms;
  const at = (limit: number) => {
    const range = rangeForValue(meter, limit + lead, rangeIndex);
    const U = measurementUncertainty(meter, limit + lead, range, residualContactOhms).UOhms;
    return { range, U };
  };
  const low = band.lowOhms > 0 ? at(band.lowOhms) : null;
  const high = band.highOhms !== null ? at(band.highOhms) : null;
  const UL = low ? low.U : 0;
  const acceptanceLow = UL === null ? Number.POSITIVE_INFINITY : band.lowOhms + UL;
  const rejectionLow = UL === null ? Number.NEGATIVE_INFINITY : band.lowOhms - UL;
  let acceptanceHigh: number | null = null;
  let rejectionHigh: number | null = null;
  if (band.highOhms !== null && high) {
    acceptanceHigh = high.U === null ? Number.NEGATIVE_INFINITY : band.highOhms - high.U;
    rejectionHigh = high.U === null ? Number.POSITIVE_INFINITY : band.highOhms + high.U;
  }
  const empty = !Number.isFinite(acceptanceLow) || (acceptanceHigh !== null && (!Number.isFinite(acceptanceHigh) || acceptanceLow > acceptanceHigh));
  return {
    UAtLowOhms: low ? low.U : 0,
    UAtHighOhms: high ? high.U : null,
    lowLimitRangeIndex: low ? low.range : null,
    highLimitRangeIndex: high ? high.range : null,
    acceptanceLowOhms: acceptanceLow,
    acceptanceHighOhms: acceptanceHigh,
    rejectionLowOhms: rejectionLow,
    rejectionHighOhms: rejectionHigh,
    acceptanceZoneEmpty: empty,
    reference: REF_GUARDED,
  };
}

/** Probability of conformity, normal approximation (JCGM 106:2012 §7) with u at the reading. */
export function conformityProbability(band: { lowOhms: number; highOhms: number | null }, y: number, u: number): number {
  const inBand = y >= band.lowOhms && (band.highOhms === null || y <= band.highOhms);
  if (!(u > 0)) return inBand ? 1 : 0;
  const upper = band.highOhms === null ? 1 : normalCdf((band.highOhms - y) / u);
  return Math.max(0, Math.min(1, upper - normalCdf((band.lowOhms - y) / u)));
}

// ---------------------------------------------------------------------------------------------
// Judge

type Outcome = { verdict: Verdict; reason: VerdictReason | null; side: Side | null };
const outcome = (verdict: Verdict, reason: VerdictReason | null = null, side: Side | null = null): Outcome => ({ verdict, reason, side });

const CONTINUITY_TEXT = 'continuity consistent — DC resistance cannot show shorted turns';

function methodCaveat(method: Method | undefined, componentCheck: boolean): string | null {
  switch (method) {
    case 'in-circuit':
      return componentCheck
        ? 'in circuit the meter reads the whole network between its probes: a reading can only be at or below the part; a high reading proves the path high, a low one proves nothing until a lead is lifted'
        : 'chart reading: the expected value is the in-circuit value the service data prints; it holds only under the chart’s conditions (controls, tubes, speaker)';
    case 'lead-lifted':
      return 'lead lifted: the reading is the part’s own';
    case 'out-of-circuit':
      return 'out of circuit: the reading is the part’s own';
    default:
      return null;
  }
}

const fmt = (ohms: number): string => {
  const abs = Math.abs(ohms);
  if (abs >= 1e6) return `${+(ohms / 1e6).toPrecision(4)} MΩ`;
  if (abs >= 1e3) return `${+(ohms / 1e3).toPrecision(4)} kΩ`;
  return `${+ohms.toPrecision(4)} Ω`;
};

const finiteOrNull = (x: number | null): number | null => (x !== null && Number.isFinite(x) ? x : null);

function definedOnly<T extends object>(o: T): Partial<T> {
  const out: Record<string, unknown> = {};
  for (const k in o) if (o[k] !== undefined) out[k] = o[k];
  return out as Partial<T>;
}

// Module-level helpers rather than closures inside judge(): judge runs once per reading of a
// survey, and a closure per call costs an allocation (and, under tsx, a name definition).
function addNote(notes: ExplanationNote[], code: NoteCode, text: string): void {
  notes.push({ code, text });
}

function inBandOf(band: { lowOhms: number; highOhms: number | null }, y: number): boolean {
  return y >= band.lowOhms && (band.highOhms === null || y <= band.highOhms);
}

/** Judge one reading. Throws VerdictInputError for input it cannot judge. */
export function judge(input: VerdictInput): VerdictResult {
  const problems = verdictInputProblems(input);
  if (problems.length) throw new VerdictInputError(problems);

  const thresholds: Thresholds = { ...DEFAULT_THRESHOLDS, ...definedOnly(input.thresholds ?? {}) };
  const rule: AcceptanceRule = { ...DEFAULT_RULE, ...definedOnly(input.rule ?? {}) };
  const meter = input.meter;
  const lead = meter ? meter.leadOhms : 0;
  const expected = input.expected;
  const state = input.reading.state;
  const continuity = typeof expected === 'number' && !input.critical && !!input.kind && CONTINUITY_KINDS.includes(input.kind);
  const componentCheck = typeof expected === 'number' && input.kind !== undefined;
  const band = chooseBand(input, rule, thresholds);
  const applied: DecisionRule = meter ? rule.decision : 'simple';
  const notes: ExplanationNote[] = [];

  if (!meter) addNote(notes, 'no-meter', 'no meter profile: no uncertainty is known, so no U and no probability of conformity');
  if (rule.decision === 'guarded' && !meter) addNote(notes, 'guarded-needs-meter', 'the guarded rule needs a meter profile to know U: the simple rule was applied');
  if (band.basis === 'default-tolerance') addNote(notes, 'default-tolerance', `no tolerance given: ±${DEFAULT_TOLERANCE_PCT} % assumed (IEC 60062: no tolerance band)`);
  if (band.basis === 'default-allowance') {
    addNote(notes, 'default-allowance', `no allowance given: ${DEFAULT_ALLOWANCE.lowPct} %/+${DEFAULT_ALLOWANCE.highPct} % assumed (common practice)`);
  }
  if (band.basis === 'template-band' && input.tolerancePct !== undefined) {
    addNote(notes, 'band-over-tolerance', 'the template’s asymmetric band was used rather than its symmetric tolerance');
  }
  if (continuity) {
    addNote(notes, 'continuity', CONTINUITY_TEXT);
    if (input.kind === 'heater' || input.kind === 'lamp') {
      addNote(notes, 'cold-resistance', 'a cold heater or lamp reads far below its hot V/I value (roughly 1/5 to 1/10, from memory): judge continuity, never against V/I');
    }
  }

  // The value judged: the displayed value less the lead bias (the one place it is subtracted).
  const displayed = state === 'value' ? (input.reading.ohms as number) : null;
  let corrected: number | null = null;
  if (displayed !== null) {
    corrected = displayed - lead;
    if (lead > 0) addNote(notes, 'lead-subtracted', `lead resistance ${fmt(lead)} subtracted from the displayed ${fmt(displayed)}`);
    if (corrected < 0) {
      addNote(notes, 'negative-after-lead', 'the reading is below the lead resistance: taken as 0 Ω');
      corrected = 0;
    }
  }

  // The measurement model at the reading, on the displayed value.
  let mu: MeasurementUncertainty | null = null;
  if (meter && displayed !== null) {
    mu = measurementUncertainty(meter, displayed, input.rangeIndex, thresholds.residualContactOhms);
    if (mu.UOhms === null) addNote(notes, 'unbounded-above', 'the reading sits where the scale’s upper limit is unbounded (θ ≤ δ): no finite U; use a higher range');
  }
  const guard = meter && applied === 'guarded' ? guardLimits(band, meter, input.rangeIndex, thresholds.residualContactOhms) : null;

  // Near-limit thresholds per side (numeric expected values outside continuity checks).
  let nearLimit: VerdictExplanation['nearLimit'] = null;
  if (typeof expected === 'number' && !continuity && band.lowPct !== null && band.highPct !== null) {
    const f = rule.nearLimitFraction;
    nearLimit = {
      fraction: f,
      lowPct: f * band.lowPct,
      highPct: f * band.highPct,
      lowOhms: expected * (1 + (f * band.lowPct) / 100),
      highOhms: expected * (1 + (f * band.highPct) / 100),
    };
  }


  const judgeOverRange = (): Outcome => {
    if (isCountedAsOpen(meter, input.rangeIndex)) {
      addNote(notes, 'over-range-counts-as-open', !meter ? 'no meter profile: over-range counts as open' : 'over-range on an autoranging meter or on its top range counts as open');
      return outcome(expected === 'open' ? 'in-band' : 'open');
    }
    const m = meter as MeterProfile;
    if (input.rangeIndex === undefined) {
      addNote(notes, 'over-range-range-unknown', 'over-range on a manually ranged meter with no range recorded: record the range, or take a higher one');
      return outcome('not-read', 'over-range');
    }
    const shown = rangeTopOhms(m, input.rangeIndex);
    const top = shown - lead;
    if (expected === 'open') {
      if (top >= band.lowOhms) {
        addNote(notes, 'over-range-above-open-threshold', `over the range’s ${fmt(shown)}, at or above the open threshold ${fmt(band.lowOhms)}`);
        return outcome('in-band');
      }
      addNote(notes, 'over-range-below-band', `over the range’s ${fmt(shown)} only, below the open threshold: take a higher range`);
      return outcome('not-read', 'over-range');
    }
    if (band.highOhms !== null && top > band.highOhms) {
      if (guard && guard.rejectionHighOhms !== null && top < guard.rejectionHighOhms) {
        addNote(notes, 'over-range-above-band', `over the range’s ${fmt(shown)}: above the band, but within U of its upper limit`);
        return outcome('inconclusive', 'guard-band', 'conditional-fail');
      }
      addNote(notes, 'over-range-above-band', `over the range’s ${fmt(shown)}, which is above the band’s upper limit ${fmt(band.highOhms)}`);
      return outcome('high');
    }
    addNote(notes, 'over-range-below-band', `over the range’s ${fmt(shown)} only, which does not reach past the band: take a higher range`);
    return outcome('not-read', 'over-range');
  };

  const judgeValue = (y: number): Outcome => {
    if (y <= thresholds.shortOhms && band.lowOhms > thresholds.shortOhms) {
      addNote(notes, 'numeric-short', `${fmt(y)} is at or below the short threshold ${fmt(thresholds.shortOhms)} (plus the lead resistance, as displayed)`);
      return outcome('short');
    }
    if (y >= thresholds.openOhms && band.highOhms !== null && band.highOhms < thresholds.openOhms) {
      addNote(notes, 'numeric-open', `${fmt(y)} is at or above the open threshold ${fmt(thresholds.openOhms)}`);
      return outcome('open');
    }
    if (guard) {
      if (y < guard.rejectionLowOhms) return outcome('low');
      if (guard.rejectionHighOhms !== null && y > guard.rejectionHighOhms) return outcome('high');
      if (guard.acceptanceZoneEmpty) {
        addNote(notes, 'meter-cannot-decide', 'U at the band’s limits is as wide as the band: this meter and range cannot decide this band; use a better range or meter');
        return outcome('inconclusive', 'meter-cannot-decide', inBandOf(band, y) ? 'conditional-pass' : 'conditional-fail');
      }
      const accepted = y >= guard.acceptanceLowOhms && (guard.acceptanceHighOhms === null || y <= guard.acceptanceHighOhms);
      if (!accepted) return outcome('inconclusive', 'guard-band', inBandOf(band, y) ? 'conditional-pass' : 'conditional-fail');
    } else {
      if (y < band.lowOhms) return outcome('low');
      if (band.highOhms !== null && y > band.highOhms) return outcome('high');
    }
    if (nearLimit && typeof expected === 'number' && ((y > expected && y > nearLimit.highOhms) || (y < expected && y < nearLimit.lowOhms))) {
      return outcome('near-limit');
    }
    return outcome('in-band');
  };

  let result: Outcome;
  switch (state) {
    case 'no-access':
      result = outcome('not-read', 'no-access');
      break;
    case 'climbing':
    case 'unstable':
      result = outcome('inconclusive', state);
      break;
    case 'open':
      result = outcome(expected === 'open' ? 'in-band' : 'open');
      break;
    case 'short':
      result = outcome(expected === 'short' ? 'in-band' : 'short');
      break;
    case 'over-range':
      result = judgeOverRange();
      break;
    default:
      result = judgeValue(corrected as number);
  }
  if (state !== 'value') addNote(notes, 'state-reading', `reading state \`${state}\`: judged by its state; no drift`);

  // An in-circuit component check without a network (DESIGN.md §3.5, last bullet). A chart
  // reading (no `kind`) already expects the in-circuit value and is judged as it is.
  if (input.method === 'in-circuit' && componentCheck && corrected !== null) {
    if (result.verdict === 'short') {
      addNote(notes, 'in-circuit-short', 'a short across a resistor in circuit points first at a shorted capacitor in parallel: lift a lead to confirm');
    } else if (corrected < band.lowOhms) {
      addNote(notes, 'unexplained-in-circuit', 'low in circuit: a parallel path may explain it; lift a lead to decide');
      result = outcome('inconclusive', 'unexplained-in-circuit');
    } else if (band.highOhms !== null && corrected > band.highOhms) {
      addNote(notes, 'in-circuit-path-high', 'the path is high: check the joints and contacts, then the part');
    } else if (result.verdict === 'in-band' || result.verdict === 'near-limit') {
      addNote(notes, 'in-circuit-not-low', 'in circuit: not low; high not ruled out');
    }
  }

  // Probability of conformity, whenever u at the reading is known.
  let conformity: VerdictExplanation['conformity'] = null;
  if (corrected !== null && mu && mu.ucOhms !== null) {
    conformity = { probability: conformityProbability(band, corrected, mu.ucOhms), uOhms: mu.ucOhms, method: CONFORMITY_METHOD };
    addNote(notes, 'normal-approximation', 'p_c is a normal approximation (JCGM 106:2012 §7) with u at the reading');
  }
  if (mu && mu.UOhms !== null) addNote(notes, 'coverage-factor', `U = ${COVERAGE_FACTOR}·u_c (coverage factor ${COVERAGE_FACTOR}); for a rectangular limit this is not a 95 % interval`);

  const driftPct = typeof expected === 'number' && corrected !== null ? ((corrected - expected) / expected) * 100 : null;
  const range =
    meter && mu
      ? {
          index: mu.limit.rangeIndex,
          inferred: mu.limit.rangeInferred,
          kind: meter.kind,
          topOhms: rangeTopOhms(meter, mu.limit.rangeIndex),
          spec: meter.ranges[mu.limit.rangeIndex],
        }
      : meter && input.rangeIndex !== undefined
        ? { index: input.rangeIndex, inferred: false, kind: meter.kind, topOhms: rangeTopOhms(meter, input.rangeIndex), spec: meter.ranges[input.rangeIndex] }
        : null;

  const explanation: VerdictExplanation = {
    expected,
    readingState: state,
    displayedOhms: displayed,
    leadOhms: lead,
    correctedOhms: corrected,
    band,
    range,
    uncertainty: mu
      ? {
          aOhms: mu.limit.aOhms,
          limitLowOhms: mu.limit.lowOhms,
          limitHighOhms: mu.limit.highOhms,
          uMeterOhms: mu.uMeterOhms,
          uContactOhms: mu.uContactOhms,
          ucOhms: mu.ucOhms,
          k: mu.k,
          UOhms: mu.UOhms,
          distribution: 'rectangular',
          reference: REF_GUM,
        }
      : null,
    rule: { decision: rule.decision, applied, bandFrom: rule.bandFrom, nearLimitFraction: rule.nearLimitFraction, reference: applied === 'guarded' ? REF_GUARDED : REF_SIMPLE },
    guard: guard
      ? {
          ...guard,
          acceptanceLowOhms: finiteOrNull(guard.acceptanceLowOhms),
          acceptanceHighOhms: finiteOrNull(guard.acceptanceHighOhms),
          rejectionLowOhms: finiteOrNull(guard.rejectionLowOhms),
          rejectionHighOhms: finiteOrNull(guard.rejectionHighOhms),
        }
      : null,
    nearLimit,
    conformity,
    thresholds: { ...thresholds, shortDisplayedOhms: thresholds.shortOhms + lead },
    method: input.method ?? null,
    methodCaveat: methodCaveat(input.method, componentCheck),
    continuity,
    notes,
  };

  return {
    verdict: result.verdict,
    reason: result.reason,
    driftPct,
    band: { lowOhms: band.lowOhms, highOhms: band.highOhms, source: band.source },
    uncertaintyOhms: mu ? mu.UOhms : null,
    side: result.side,
    conformityProbability: conformity ? conformity.probability : null,
    explanation,
  };
}
