/**
 * Reviewing a student's survey against the instructor's reference (DESIGN.md §3.9 "Scoring"):
 * per test point, whether the two readings agree by the normalised error
 *   E_n = |x₁ − x₂| / √(U₁² + U₂²) ≤ 1   (ISO 13528; ISO/IEC 17043 — api/domain/agreement.ts),
 * compared only where method and conditions match (otherwise "not comparable" with the reason);
 * state readings (open, short, over-range) compare by state; verdict agreement counts
 * separately. Also the prediction's error (predict-first assignments), the feedback hints for
 * classic measuring errors where the data shows them, and the suggested score.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import { compareStates, normalisedError } from './agreement';
import type { FeedbackHint, NotComparableReason, ReadingComparison } from './class-format';
import { rangeTopOhms, topRangeIndex, type MeterProfile } from './meter';
import type { SurveyConditions } from './set-format';
import { parseReadingText } from './survey-grid';
import type { Method, ReadingState, Verdict } from './words';

/** What a comparison needs of one reading: the stored reading's fields, its verdict and U. */
export interface ComparedReading {
  state: ReadingState;
  ohms: number | null;
  method: Method;
  verdict: Verdict | null;
  /** Expanded uncertainty U (k = 2) of the reading, Ω (from the survey's meter; null: unknown). */
  uncertaintyOhms: number | null;
}

export interface CompareContext {
  /** conditionDifferences(student, reference): empty when the conditions match. */
  conditionDifferences: readonly string[];
  /** Both surveys used the same meter profile. */
  sameMeter: boolean;
}

const NOT_COMPARABLE_NOTES: Record<NotComparableReason, string> = {
  'method-differs': 'measured by a different method than the reference',
  'conditions-differ': 'measured in circuit under different conditions than the reference',
  'no-reference': 'the reference has no reading of this test point',
  'not-read': 'not read',
  'no-uncertainty': 'neither reading has an uncertainty (no meter profile): E_n is undefined',
  'state-pending': 'a climbing, unstable or no-access reading is not a result to compare',
  'value-against-state': 'a value against a state: compare the verdicts instead',
  'ambiguous-state': 'OL means open only in autorange or on the top range: compare the verdicts',
};

/** Words for a not-comparable reason (the screens show them). */
export function notComparableNote(reason: NotComparableReason): string {
  return NOT_COMPARABLE_NOTES[reason];
}

const LENIENT_NOTE = 'both used the same meter: its own error is common to both readings, so E_n with each full U is lenient';

/**
 * Verdict agreement: the same verdict, where in band and near limit count as one (both pass the
 * rule; near limit is a caution, not a finding). Null when either verdict is missing or not read.
 */
export function verdictsAgree(a: Verdict | null, b: Verdict | null): boolean | null {
  if (a === null || b === null || a === 'not-read' || b === 'not-read') return null;
  const pass = (v: Verdict) => v === 'in-band' || v === 'near-limit';
  if (pass(a) && pass(b)) return true;
  return a === b;
}

function notComparable(reason: NotComparableReason, verdictAgreement: boolean | null, lenient = false): ReadingComparison {
  return { agreement: 'not-comparable', en: null, reason, note: NOT_COMPARABLE_NOTES[reason], lenient, verdictAgreement };
}

/**
 * Compares a student's reading of a test point with the reference's (DESIGN.md §3.9).
 * Conditions (tubes in, speaker, control positions) change only what a meter reads in circuit,
 * so they are compared for in-circuit readings only (common practice: a part on its own leads
 * reads the same whatever the rest of the chassis does).
 */
export function compareReadings(student: ComparedReading | null, reference: ComparedReading | null, ctx: CompareContext): ReadingComparison {
  if (!reference) return notComparable('no-reference', null);
  if (!student) return notComparable('not-read', null);
  const verdictAgreement = verdictsAgree(student.verdict, reference.verdict);
  if (student.method !== reference.method) return notComparable('method-differs', verdictAgreement);
  if (student.method === 'in-circuit' && ctx.conditionDifferences.length > 0) {
    const c = notComparable('conditions-differ', verdictAgreement);
    return { ...c, note: `${c.note}: ${ctx.conditionDifferences.join('; ')}` };
  }
  if (student.state !== 'value' || reference.state !== 'value') {
    const byState = compareStates(student.state, reference.state);
    if (byState.agree !== null) {
      return { agreement: byState.agree ? 'agree' : 'disagree', en: null, reason: null, note: 'compared by state', lenient: false, verdictAgreement };
    }
    const pending = [student.state, reference.state].some((s) => s === 'climbing' || s === 'unstable' || s === 'no-access');
    if (pending) return notComparable('state-pending', verdictAgreement);
    if (student.state === 'value' || reference.state === 'value') return notComparable('value-against-state', verdictAgreement);
    return notComparable('ambiguous-state', verdictAgreement);
  }
  const u1 = student.uncertaintyOhms ?? 0;
  const u2 = reference.uncertaintyOhms ?? 0;
  if (student.ohms === null || reference.ohms === null || !(u1 > 0 || u2 > 0) || !Number.isFinite(u1) || !Number.isFinite(u2)) {
    return notComparable('no-uncertainty', verdictAgreement);
  }
  const { en, agree } = normalisedError({ ohms: student.ohms, U: u1 }, { ohms: reference.ohms, U: u2 });
  return { agreement: agree ? 'agree' : 'disagree', en, reason: null, note: ctx.sameMeter ? LENIENT_NOTE : null, lenient: ctx.sameMeter, verdictAgreement };
}

/** The differences of two surveys' conditions that matter in circuit, in words (empty: they match). */
export function conditionDifferences(student: SurveyConditions | null, reference: SurveyConditions | null): string[] {
  if (!student || !reference) return [];
  const yes = (b: boolean) => (b ? 'yes' : 'no');
  const out: string[] = [];
  if (student.tubesIn !== reference.tubesIn) out.push(`tubes in: yours ${yes(student.tubesIn)}, reference ${yes(reference.tubesIn)}`);
  if (student.speakerConnected !== reference.speakerConnected) out.push(`speaker connected: yours ${yes(student.speakerConnected)}, reference ${yes(reference.speakerConnected)}`);
  const norm = (s: string) => s.trim().replace(/\s+/g, ' ').toLowerCase();
  if (norm(student.controls) !== norm(reference.controls)) out.push(`controls: yours “${student.controls.trim()}”, reference “${reference.controls.trim()}”`);
  return out;
}

/**
 * A prediction and its error against what was measured: (predicted − measured) / measured in
 * percent, when both are values and the measured value is above zero; the error is null otherwise
 * (an unparseable prediction keeps its text with ohms null).
 */
export function predictionOf(reading: { prediction: string | null; state: ReadingState; ohms: number | null }): { text: string; ohms: number | null; errorPct: number | null } | null {
  if (reading.prediction === null || reading.prediction.trim() === '') return null;
  let ohms: number | null = null;
  try {
    const p = parseReadingText(reading.prediction);
    ohms = p.state === 'value' ? p.ohms : p.state === 'short' ? 0 : null;
  } catch {
    ohms = null;
  }
  const errorPct = ohms !== null && reading.state === 'value' && reading.ohms !== null && reading.ohms > 0 ? ((ohms - reading.ohms) / reading.ohms) * 100 : null;
  return { text: reading.prediction, ohms, errorPct };
}

/** A reading of a part expected at or above this value is "high-megohm" for the fingers hint. */
export const FINGERS_EXPECTED_MIN_OHMS = 1e6;
/** …and reads "far low" below this fraction of what was expected. */
export const FINGERS_LOW_FRACTION = 0.7;
/** A prediction further off than this (percent, either way) earns a hint. */
export const PREDICTION_HINT_PCT = 50;

/**
 * Hints for classic measuring errors, only where the data shows them:
 * - `fingers-across-probes`: a reading far below a high-megohm expectation. Holding both probe
 *   tips puts the body's resistance in parallel (hundreds of kΩ to a few MΩ with dry skin:
 *   common practice; the figures from memory), which pulls a megohm reading down.
 * - `over-range-on-low-range`: over-range on a range that is not the meter's top range, where
 *   the expected value is beyond that range (or unknown): take a higher range.
 * - `far-from-prediction`: the prediction was off by more than PREDICTION_HINT_PCT.
 */
export function feedbackHints(input: {
  reading: { state: ReadingState; ohms: number | null; rangeIndex: number | null };
  expectedOhms: number | null;
  meter: MeterProfile | null;
  predictionErrorPct: number | null;
}): FeedbackHint[] {
  const { reading, expectedOhms, meter } = input;
  const hints: FeedbackHint[] = [];
  if (reading.state === 'value' && reading.ohms !== null && expectedOhms !== null && expectedOhms >= FINGERS_EXPECTED_MIN_OHMS && reading.ohms > 0 && reading.ohms < FINGERS_LOW_FRACTION * expectedOhms) {
    hints.push('fingers-across-probes');
  }
  if (reading.state === 'over-range' && meter && reading.rangeIndex !== null && reading.rangeIndex >= 0 && reading.rangeIndex < meter.ranges.length && reading.rangeIndex !== topRangeIndex(meter)) {
    const top = rangeTopOhms(meter, reading.rangeIndex);
    if (expectedOhms === null || expectedOhms > top) hints.push('over-range-on-low-range');
  }
  if (input.predictionErrorPct !== null && Math.abs(input.predictionErrorPct) > PREDICTION_HINT_PCT) hints.push('far-from-prediction');
  return hints;
}

/** Words for a hint (the screens show them). */
export const HINT_WORDS: Record<FeedbackHint, string> = {
  'fingers-across-probes': 'Far below a megohm expectation: were your fingers across both probe tips? Hold one probe only, or clip the leads.',
  'over-range-on-low-range': 'Over-range on a low range: take the next higher range before calling the part open.',
  'far-from-prediction': 'Your prediction was far from what you measured: trace the parallel paths again.',
};

/**
 * The suggested score: the share of comparable test points that agree, 0–100 to one decimal;
 * null when nothing was comparable. The instructor changes it.
 */
export function suggestedScore(comparisons: readonly ReadingComparison[]): number | null {
  let agree = 0;
  let compared = 0;
  for (const c of comparisons) {
    if (c.agreement === 'not-comparable') continue;
    compared++;
    if (c.agreement === 'agree') agree++;
  }
  return compared === 0 ? null : Math.round((agree / compared) * 1000) / 10;
}

/** Counts of a review's comparisons. */
export function comparisonCounts(comparisons: readonly ReadingComparison[]): { agree: number; disagree: number; notComparable: number; verdictAgree: number; verdictDisagree: number } {
  const out = { agree: 0, disagree: 0, notComparable: 0, verdictAgree: 0, verdictDisagree: 0 };
  for (const c of comparisons) {
    if (c.agreement === 'agree') out.agree++;
    else if (c.agreement === 'disagree') out.disagree++;
    else out.notComparable++;
    if (c.verdictAgreement === true) out.verdictAgree++;
    else if (c.verdictAgreement === false) out.verdictDisagree++;
  }
  return out;
}
