/**
 * Agreement of two readings of the same test point (DESIGN.md §3.9, scoring a student's reading
 * against the instructor's reference): the normalised error
 *   E_n = |x₁ − x₂| / √(U₁² + U₂²),  agreement when E_n ≤ 1
 * (ISO 13528 and ISO/IEC 17043, proficiency testing; check-values.md §3) [STD], U being each
 * reading's expanded uncertainty (k = 2). State readings (open, short, over-range) compare by
 * state. Whether method and conditions match, and the lenient note when both used the same meter,
 * belong to the caller; verdict agreement counts separately.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import type { ReadingState } from './words';

/** Agreement limit for E_n (ISO 13528; ISO/IEC 17043): |E_n| ≤ 1 is satisfactory. */
export const EN_LIMIT = 1;

export interface ValueWithU {
  ohms: number;
  /** Expanded uncertainty U (k = 2), Ω. */
  U: number;
}

export interface NormalisedError {
  en: number;
  agree: boolean;
}

/** E_n of two readings; throws RangeError on non-finite input, a negative U, or both U zero (E_n undefined). */
export function normalisedError(a: ValueWithU, b: ValueWithU): NormalisedError {
  for (const [name, v] of [
    ['a.ohms', a.ohms],
    ['b.ohms', b.ohms],
    ['a.U', a.U],
    ['b.U', b.U],
  ] as const) {
    if (typeof v !== 'number' || !Number.isFinite(v)) throw new RangeError(`${name} must be a finite number, not ${String(v)}`);
  }
  if (a.U < 0 || b.U < 0) throw new RangeError('an expanded uncertainty cannot be negative');
  const denominator = Math.hypot(a.U, b.U);
  if (denominator === 0) {
    throw new RangeError('E_n needs an uncertainty on at least one reading (both U are zero): give the meter profile');
  }
  const en = Math.abs(a.ohms - b.ohms) / denominator;
  return { en, agree: en <= EN_LIMIT };
}

export interface StateComparison {
  /** true or false when the states can be compared; null when they cannot (reason says why). */
  agree: boolean | null;
  reason: string | null;
}

/** States that are a result of the measurement, comparable as such. */
const DEFINITE: readonly ReadingState[] = ['open', 'short', 'over-range'];

/**
 * Compare two readings by state (DESIGN.md §3.9: open and short compare by state). Two values
 * are not for this function (use normalisedError). `over-range` against `open` depends on the
 * range (OL is open only in autorange or on the top range), so it is left to the verdicts.
 */
export function compareStates(a: ReadingState, b: ReadingState): StateComparison {
  if (a === 'value' && b === 'value') {
    return { agree: null, reason: 'two values: compare them with the normalised error E_n' };
  }
  const pending = [a, b].find((s) => s === 'climbing' || s === 'unstable' || s === 'no-access');
  if (pending) {
    return { agree: null, reason: `a ${pending} reading is not a result to compare: the reading has to be taken again` };
  }
  if (a === 'value' || b === 'value') {
    return { agree: null, reason: 'a value against a state: compare the verdicts instead' };
  }
  if (DEFINITE.includes(a) && DEFINITE.includes(b)) {
    if (a === b) return { agree: true, reason: null };
    if ((a === 'open' && b === 'over-range') || (a === 'over-range' && b === 'open')) {
      return { agree: null, reason: 'OL means open only in autorange or on the top range: compare the verdicts' };
    }
    return { agree: false, reason: null };
  }
  return { agree: null, reason: 'not comparable by state' };
}
