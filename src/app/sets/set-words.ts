import type { BringUpStep, DeviationKind, JobStatus, PartsAction, RestorationLevel, TubeStatus, VerdictCounts } from '@domain/set-format';
import type { SurveyPurpose, SurveyState } from '@domain/words';

/** Screen words for the bench's API words (set-format.ts, words.ts). */
export const JOB_STATUS_LABELS: Readonly<Record<JobStatus, string>> = {
  intake: 'intake',
  surveying: 'surveying',
  'waiting-parts': 'waiting for parts',
  repairing: 'repairing',
  testing: 'testing',
  done: 'done',
  returned: 'returned to the owner',
};

export const RESTORATION_LEVEL_LABELS: Readonly<Record<RestorationLevel, string>> = {
  conserve: 'conserve (keep original parts where possible)',
  repair: 'repair (make it work)',
  refurbish: 'refurbish (work and cosmetics)',
  restore: 'restore (as from the factory)',
};

export const PURPOSE_LABELS: Readonly<Record<SurveyPurpose, string>> = {
  intake: 'intake',
  'after-repair': 'after repair',
  periodic: 'periodic',
  assignment: 'assignment',
};

export const SURVEY_STATE_LABELS: Readonly<Record<SurveyState, string>> = {
  draft: 'draft',
  complete: 'complete',
  submitted: 'submitted',
  returned: 'returned',
  accepted: 'accepted',
};

export const TUBE_STATUS_LABELS: Readonly<Record<TubeStatus, string>> = {
  present: 'present',
  missing: 'missing',
  'wrong-type': 'wrong type',
  replaced: 'replaced',
};

export const DEVIATION_KIND_LABELS: Readonly<Record<DeviationKind, string>> = {
  'non-original': 'non-original part found',
  'factory-change': 'factory change in this serial range',
};

export const PARTS_ACTION_LABELS: Readonly<Record<PartsAction, string>> = {
  kept: 'kept',
  replaced: 'replaced',
  left: 'left with a note',
};

export const BRING_UP_STEP_LABELS: Readonly<Record<BringUpStep, string>> = {
  'limiter-lamp': 'limiter lamp',
  variac: 'variac',
  direct: 'direct on the mains',
};

export const OBSERVATION_LABELS: Readonly<Record<string, string>> = {
  smoke: 'smoke',
  smell: 'smell',
  hum: 'hum',
  arcing: 'arcing',
  'hot-part': 'a part running hot',
  'no-sound': 'no sound',
  normal: 'nothing unusual',
};

/** The next step of a to-confirm line, in words the bench acts on. */
export const NEXT_STEP_LABELS: Readonly<Record<'lift-a-lead' | 'check-joint', string>> = {
  'lift-a-lead': 'Lift a lead and measure the part on its own leads',
  'check-joint': 'Check the joints and contacts of the path, then the part',
};

/** `12 in band · 2 near limit · 1 out · 0 inconclusive · 5 not read`: counts in words, never colour. */
export function countsText(c: VerdictCounts): string {
  return `${c.inBand} in band · ${c.nearLimit} near limit · ${c.out} out · ${c.inconclusive} inconclusive · ${c.unread} not read`;
}

/** `+12.5 %`, `−3.0 %`, or a dash. */
export function pctText(pct: number | null | undefined, digits = 1): string {
  if (pct === null || pct === undefined || !Number.isFinite(pct)) return '—';
  const s = Math.abs(pct).toFixed(digits);
  return `${pct > 0 ? '+' : pct < 0 ? '−' : '±'}${s} %`;
}
