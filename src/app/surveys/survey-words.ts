import type { GridAdvice, VerdictCounts } from '@domain/set-format';
import { formatOhms } from '@domain/notation';
import type { GridRow } from '@domain/survey-grid';
import type { Method, ReadingState, SurveyPurpose, SurveyState } from '@domain/words';

/** The single keys of the grid (typed into an empty reading field), always shown in the legend. */
export type StateKey = Exclude<ReadingState, 'value' | 'over-range'>;
export const STATE_KEYS: Readonly<Record<string, StateKey>> = {
  o: 'open',
  s: 'short',
  c: 'climbing',
  u: 'unstable',
  n: 'no-access',
};

export const STATE_WORDS: Readonly<Record<ReadingState, string>> = {
  value: 'value',
  open: 'open',
  'over-range': 'over range (OL)',
  short: 'short',
  climbing: 'climbing',
  unstable: 'unstable',
  'no-access': 'no access',
};

export const METHOD_WORDS: Readonly<Record<Method, string>> = {
  'in-circuit': 'in circuit',
  'lead-lifted': 'lead lifted',
  'out-of-circuit': 'out of circuit',
};

export const PURPOSE_WORDS: Readonly<Record<SurveyPurpose, string>> = {
  intake: 'Intake',
  'after-repair': 'After repair',
  periodic: 'Periodic',
  assignment: 'Assignment',
};

export const SURVEY_STATE_WORDS: Readonly<Record<SurveyState, string>> = {
  draft: 'draft',
  complete: 'complete',
  submitted: 'submitted',
  returned: 'returned',
  accepted: 'accepted',
};

/** What each advice code asks of the technician (rendered from codes, never parsed). */
export const ADVICE_WORDS: Readonly<Record<GridAdvice, string>> = {
  'lift-a-lead': 'Lift a lead to decide: the network does not explain this reading in circuit.',
  'path-high': 'Path high: check the joints and contacts, then the part.',
  'check-parallel-capacitor': 'A short across a resistor: suspect a shorted capacitor in parallel first.',
  'not-low-high-not-ruled-out': 'Not low; a high part is not ruled out in circuit.',
  'take-higher-range': 'Over range on this range: take a higher range.',
  recheck: 'The meter did not settle: read again.',
  'meter-check-failed': 'The meter read its check resistor off its value: check the meter before trusting this.',
};

/** The legend's rows: key, what it does. */
export const LEGEND: readonly { key: string; words: string; action: string }[] = [
  { key: 'Enter', words: 'save, next row', action: 'enter' },
  { key: 'o', words: 'open', action: 'o' },
  { key: 's', words: 'short', action: 's' },
  { key: 'c', words: 'climbing', action: 'c' },
  { key: 'u', words: 'unstable', action: 'u' },
  { key: 'n', words: 'no access', action: 'n' },
  { key: 'l', words: 'lead lifted', action: 'l' },
  { key: 'j', words: 'joints checked', action: 'j' },
  { key: 'OL', words: 'over range (type it)', action: 'OL' },
  { key: '↑ ↓', words: 'row', action: '' },
  { key: 'PgUp PgDn', words: 'stage', action: '' },
  { key: 'F2', words: 'correct', action: 'F2' },
  { key: 'Esc', words: 'clear', action: 'Escape' },
];

/** `+12.3 %`, `−4.0 %`. */
export function driftText(pct: number | null): string {
  if (pct === null || !Number.isFinite(pct)) return '';
  const sign = pct > 0 ? '+' : pct < 0 ? '−' : '±';
  return `${sign}${Math.abs(pct).toFixed(1)} %`;
}

/** A computed value (an expectation, an implied value, an interval's end) to three figures, or a dash. */
export function ohmsOrDash(ohms: number | null | undefined): string {
  return ohms === null || ohms === undefined || !Number.isFinite(ohms) ? '—' : formatOhms(ohms === 0 ? 0 : +ohms.toPrecision(3));
}

/** `−10 % / +10 %`, or `±10 %` when symmetric. */
export function bandText(band: { lowPct: number; highPct: number } | null): string {
  if (band === null) return '';
  if (-band.lowPct === band.highPct) return `±${band.highPct} %`;
  return `${band.lowPct === 0 ? '0' : `−${Math.abs(band.lowPct)}`} % / +${band.highPct} %`;
}

/** `12 in band · 1 near limit · 2 out · 0 inconclusive · 5 unread`, leaving zeros out (but never empty). */
export function countsText(c: VerdictCounts): string {
  const parts = [
    c.inBand ? `${c.inBand} in band` : '',
    c.nearLimit ? `${c.nearLimit} near limit` : '',
    c.out ? `${c.out} out` : '',
    c.inconclusive ? `${c.inconclusive} inconclusive` : '',
    c.unread ? `${c.unread} unread` : '',
  ].filter(Boolean);
  return parts.length ? parts.join(' · ') : 'no test points';
}

/** A test point in a sentence: `R2 (V1 pin 7)`, `B+ → chassis`. */
export function pointLabel(row: GridRow): string {
  const what = row.component?.ref ?? (row.pair ? 'pair relation' : `${row.from ?? ''} → ${row.to ?? ''}`);
  return row.socket ? `${what} (${row.socket.designator} pin ${row.socket.pin})` : what;
}
