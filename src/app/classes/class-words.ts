import type { FeedbackHint, NotComparableReason, ReadingComparison, StudentStatus } from '@domain/class-format';
import type { ReadingRecord } from '@domain/set-format';
import { formatOhms } from '@domain/notation';

/** Screen words for a student's standing on an assignment (class-format.ts StudentStatus). */
export const STUDENT_STATUS_LABELS: Readonly<Record<StudentStatus, string>> = {
  'not-started': 'not started',
  draft: 'in progress',
  submitted: 'submitted',
  returned: 'returned',
  accepted: 'accepted',
};

/** A glyph per status, so the chip never rests on colour alone. */
export const STUDENT_STATUS_ICONS: Readonly<Record<StudentStatus, string>> = {
  'not-started': 'radio_button_unchecked',
  draft: 'edit_note',
  submitted: 'outbox',
  returned: 'undo',
  accepted: 'task_alt',
};

export const NOT_COMPARABLE_LABELS: Readonly<Record<NotComparableReason, string>> = {
  'method-differs': 'the methods differ',
  'conditions-differ': 'the conditions differ',
  'no-reference': 'no reference reading',
  'not-read': 'not read',
  'no-uncertainty': 'no meter uncertainty (no meter profile)',
  'state-pending': 'a state that settles nothing (climbing, unstable, no access)',
  'value-against-state': 'a value against a state',
  'ambiguous-state': 'an over-range against a value',
};

export const HINT_LABELS: Readonly<Record<FeedbackHint, string>> = {
  'fingers-across-probes': 'A high-megohm reading far low: were fingers across the probes?',
  'over-range-on-low-range': 'Over-range on a low range: try the next range up.',
  'far-from-prediction': 'Far from the prediction: check the parallel paths in circuit.',
};

/** The agreement in words (the chip's text): `agree`, `disagree` or `not comparable`. */
export function agreementText(c: ReadingComparison | null): string {
  if (!c) return '—';
  if (c.agreement === 'agree') return 'agree';
  if (c.agreement === 'disagree') return 'disagree';
  return 'not comparable';
}

/** Why a pair is not comparable, or the lenient note: the API's words first, ours otherwise. */
export function agreementNote(c: ReadingComparison | null): string | null {
  if (!c) return null;
  if (c.note) return c.note;
  if (c.reason) return NOT_COMPARABLE_LABELS[c.reason] ?? c.reason;
  return null;
}

/** E_n to two decimals, or a dash. */
export function enText(en: number | null | undefined): string {
  return en === null || en === undefined || !Number.isFinite(en) ? '—' : en.toFixed(2);
}

/** A reading as read: `4.62 kΩ`, or its state, with the method when it is not in circuit. */
export function readingText(r: ReadingRecord | null): string {
  if (!r) return 'not read';
  const value = r.state === 'value' && r.ohms !== null ? formatOhms(r.ohms) : r.state.replace(/-/g, ' ');
  return r.method === 'in-circuit' ? value : `${value} (${r.method.replace(/-/g, ' ')})`;
}

/** Ohms as the bench writes them (`430 Ω`, `4.7 kΩ`). */
export function ohmsText(ohms: number): string {
  return formatOhms(ohms);
}

/** `+12.5 %` / `−3.0 %` with a true minus sign. */
export function signedPct(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return '—';
  const sign = p > 0 ? '+' : p < 0 ? '−' : '';
  return `${sign}${Math.abs(p).toFixed(1)} %`;
}

/** A date-time input value (`YYYY-MM-DDTHH:mm`, local time) as ISO 8601, or null when empty or invalid. */
export function isoOfLocal(value: string): string | null {
  if (!value) return null;
  const d = new Date(value);
  return Number.isNaN(d.getTime()) ? null : d.toISOString();
}

/** A date as a `datetime-local` input shows it (local time). */
export function localOfIso(iso: string): string {
  const d = new Date(iso);
  const p = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}T${p(d.getHours())}:${p(d.getMinutes())}`;
}
