/**
 * Dissipation and a suggested power rating (DESIGN.md §3.6).
 *
 * P = V²/R or I²R (the voltage across the part, or the current through it), scaled by the mains
 * factor squared (a voltage ratio: a set rated for 117 V on a 125 V line sees 125/117, and P
 * scales with its square). Suggested rating: the next standard step at or above twice the
 * dissipation (run parts at ≤ 50 % of rating — common practice, consistent with NAVSEA SD-18
 * resistor derating), never below the original rating. Working voltage E = √(P·R) is checked
 * against the part's own rating or the style's typical limit.
 *
 * Pure TypeScript: no framework or Node-only imports.
 */
import type { ComponentKind } from './words';

/** Standard power steps, watts: ⅛ ¼ ½ 1 2 3 5 7 10 15 20 25 W. Common practice, no published source. */
export const STANDARD_WATT_STEPS: readonly number[] = [0.125, 0.25, 0.5, 1, 2, 3, 5, 7, 10, 15, 20, 25];

/**
 * Rating ≥ this × dissipation (parts run at ≤ 50 % of rating). Common practice, consistent with
 * NAVSEA SD-18 resistor derating.
 */
export const DERATING_FACTOR = 2;

/** Default mains factor (a voltage ratio): 1, no scaling. */
export const DEFAULT_MAINS_FACTOR = 1;

/**
 * Typical maximum working voltage by style (rated watts → volts): ¼ W 250 V, ½ W 350 V,
 * 1 W 500 V, 2 W 750 V. From memory [MEM], unverified: a part's own datasheet rating
 * (`ratedVolts`) wins.
 */
export const STYLE_VOLTAGE_LIMITS: readonly { watts: number; volts: number }[] = [
  { watts: 0.25, volts: 250 },
  { watts: 0.5, volts: 350 },
  { watts: 1, volts: 500 },
  { watts: 2, volts: 750 },
];

/** Kinds for which a resistor power rating makes sense. */
const RESISTOR_KINDS: readonly ComponentKind[] = ['carbon-composition', 'carbon-film', 'metal-film', 'wirewound', 'pot', 'ballast', 'thermistor'];

export type DissipationInput = {
  ohms: number;
  /** Voltage across the part (DC or RMS), volts. */
  volts?: number;
  /** Current through the part (DC or RMS), amperes. */
  amps?: number;
  /** The original part's rating, watts. */
  ratedWatts?: number;
  /** Line-voltage ratio now/then (default 1); P scales with its square. */
  mainsFactor?: number;
  role?: 'fuse' | 'mains-side' | null;
  kind?: ComponentKind;
  /** The part's own maximum working voltage, volts (wins over the style table). */
  ratedVolts?: number;
};

export type DissipationNoteCode =
  | 'from-volts'
  | 'from-amps'
  | 'volts-and-amps'
  | 'mains-factor'
  | 'derating'
  | 'kept-original-rating'
  | 'above-standard-steps'
  | 'fuse-role'
  | 'mains-side-flameproof'
  | 'working-voltage'
  | 'no-voltage-limit'
  | 'not-a-resistor'
  | 'original-overloaded';

export type DissipationResult = {
  /** Dissipation after the mains factor, watts. */
  watts: number;
  /** Suggested rating, watts (a standard step, never below the original rating; fuse-role parts keep the original). */
  suggestedWatts: number;
  /** Working voltage warning, or null when E is within the limit used. */
  voltageWarning: string | null;
  notes: { code: DissipationNoteCode; text: string }[];
};

export type DissipationProblem = { field: string; message: string };

export class DissipationInputError extends Error {
  readonly problems: DissipationProblem[];
  constructor(problems: DissipationProblem[]) {
    super(`invalid dissipation input: ${problems.map((p) => `${p.field}: ${p.message}`).join('; ')}`);
    this.name = 'DissipationInputError';
    this.problems = problems;
  }
}

const isFiniteNumber = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

/** Problems with a dissipation input (empty when usable). */
export function dissipationInputProblems(input: DissipationInput): DissipationProblem[] {
  const problems: DissipationProblem[] = [];
  if (!(isFiniteNumber(input.ohms) && input.ohms > 0)) problems.push({ field: 'ohms', message: 'a positive number of ohms' });
  if (input.volts === undefined && input.amps === undefined) problems.push({ field: 'volts', message: 'give the voltage across the part or the current through it' });
  if (input.volts !== undefined && !isFiniteNumber(input.volts)) problems.push({ field: 'volts', message: 'a number of volts' });
  if (input.amps !== undefined && !isFiniteNumber(input.amps)) problems.push({ field: 'amps', message: 'a number of amperes' });
  if (input.ratedWatts !== undefined && !(isFiniteNumber(input.ratedWatts) && input.ratedWatts > 0)) problems.push({ field: 'ratedWatts', message: 'a positive number of watts' });
  if (input.ratedVolts !== undefined && !(isFiniteNumber(input.ratedVolts) && input.ratedVolts > 0)) problems.push({ field: 'ratedVolts', message: 'a positive number of volts' });
  if (input.mainsFactor !== undefined && !(isFiniteNumber(input.mainsFactor) && input.mainsFactor > 0)) {
    problems.push({ field: 'mainsFactor', message: 'a positive voltage ratio (125/117 ≈ 1.07)' });
  }
  if (input.role !== undefined && input.role !== null && input.role !== 'fuse' && input.role !== 'mains-side') {
    problems.push({ field: 'role', message: '`fuse`, `mains-side` or null' });
  }
  return problems;
}

/** The smallest standard step at or above `watts`; null above the largest step. */
export function nextStandardStep(watts: number): number | null {
  for (const step of STANDARD_WATT_STEPS) if (step >= watts * (1 - 1e-12)) return step;
  return null;
}

/** The style's typical working-voltage limit for a rating, or null when the table has none. */
export function styleVoltageLimit(watts: number): number | null {
  return STYLE_VOLTAGE_LIMITS.find((s) => s.watts === watts)?.volts ?? null;
}

const wattsText = (w: number): string =>
  ({ 0.125: '⅛ W', 0.25: '¼ W', 0.5: '½ W' })[w] ?? `${+w.toPrecision(4)} W`;

/** Dissipation, suggested rating and working-voltage check for one part. */
export function dissipation(input: DissipationInput): DissipationResult {
  const problems = dissipationInputProblems(input);
  if (problems.length) throw new DissipationInputError(problems);
  const notes: DissipationResult['notes'] = [];
  const R = input.ohms;
  const f = input.mainsFactor ?? DEFAULT_MAINS_FACTOR;

  const fromVolts = input.volts !== undefined ? (input.volts * input.volts) / R : null;
  const fromAmps = input.amps !== undefined ? input.amps * input.amps * R : null;
  let base: number;
  if (fromVolts !== null && fromAmps !== null) {
    base = Math.max(fromVolts, fromAmps);
    notes.push({ code: 'volts-and-amps', text: `both voltage and current given: the larger dissipation (${+base.toPrecision(4)} W) is used` });
  } else if (fromVolts !== null) {
    base = fromVolts;
    notes.push({ code: 'from-volts', text: 'P = V²/R' });
  } else {
    base = fromAmps as number;
    notes.push({ code: 'from-amps', text: 'P = I²R' });
  }
  const watts = base * f * f;
  if (f !== 1) notes.push({ code: 'mains-factor', text: `scaled by the mains factor squared (${f}² = ${+(f * f).toPrecision(4)})` });

  const needed = DERATING_FACTOR * watts;
  notes.push({ code: 'derating', text: `rating at least ${DERATING_FACTOR} × P = ${+needed.toPrecision(4)} W (run at ≤ 50 % of rating; common practice, consistent with NAVSEA SD-18)` });
  if (input.kind && !RESISTOR_KINDS.includes(input.kind)) {
    notes.push({ code: 'not-a-resistor', text: `a ${input.kind} is not sized by a resistor power rating: the figure is for information` });
  }
  if (input.ratedWatts !== undefined && watts > input.ratedWatts / DERATING_FACTOR) {
    notes.push({ code: 'original-overloaded', text: `the original ${wattsText(input.ratedWatts)} part runs above half its rating` });
  }

  let suggestedWatts: number;
  if (input.role === 'fuse' && input.ratedWatts !== undefined) {
    suggestedWatts = input.ratedWatts;
    notes.push({ code: 'kept-original-rating', text: 'fuse-role part: the original rating is kept' });
  } else {
    const target = Math.max(needed, input.ratedWatts ?? 0);
    const step = nextStandardStep(target);
    if (step === null) {
      suggestedWatts = Math.ceil(target);
      notes.push({ code: 'above-standard-steps', text: `above the largest standard step (25 W): a power resistor of at least ${suggestedWatts} W` });
    } else suggestedWatts = step;
    if (input.ratedWatts !== undefined && suggestedWatts === nextStandardStep(input.ratedWatts) && input.ratedWatts >= needed) {
      notes.push({ code: 'kept-original-rating', text: 'never below the original rating' });
    }
  }
  if (input.role === 'fuse') {
    notes.push({
      code: 'fuse-role',
      text: 'fuse-role part: replace with the same rating and the same type (fusible or flameproof); a larger part would not open as designed',
    });
  }
  if (input.role === 'mains-side') notes.push({ code: 'mains-side-flameproof', text: 'mains-side part: use a flameproof type' });

  // Working voltage E = √(P·R) (the voltage across the part after the mains factor).
  const E = Math.sqrt(watts * R);
  const limit = input.ratedVolts ?? styleVoltageLimit(suggestedWatts);
  let voltageWarning: string | null = null;
  if (limit === null) {
    notes.push({ code: 'no-voltage-limit', text: `E = ${+E.toPrecision(4)} V; no typical working-voltage limit is known for a ${wattsText(suggestedWatts)} style: check the part’s datasheet` });
  } else {
    const source = input.ratedVolts !== undefined ? 'the part’s rated' : `the ${wattsText(suggestedWatts)} style’s typical (from memory)`;
    notes.push({ code: 'working-voltage', text: `E = √(P·R) = ${+E.toPrecision(4)} V against ${source} ${limit} V` });
    if (E > limit) {
      const better = STYLE_VOLTAGE_LIMITS.find((s) => s.volts >= E && s.watts >= suggestedWatts);
      voltageWarning =
        `working voltage ${+E.toPrecision(4)} V exceeds ${source} limit of ${limit} V` +
        (better ? `: use a part rated for the voltage (a ${wattsText(better.watts)} style is typically ${better.volts} V), or a series pair` : ': use a high-voltage style or a series pair');
    }
  }
  return { watts, suggestedWatts, voltageWarning, notes };
}
