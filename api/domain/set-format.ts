/**
 * The bench's words and wire shapes (DESIGN.md §2 "set", "survey", "reading", "meter profile",
 * "lifted-lead list", "safety gates", "parts record", "bring-up log"): what the API answers and
 * accepts for sets and surveys, shared by the API and the Angular app so both read one contract.
 *
 * Dates travel as ISO 8601 strings. Ids are numbers.
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import type { Classwork } from './class-format';
import type { MeterProfile } from './meter';
import type { Nominal, TemplateDocument, TubeTypeRecord } from './template-format';
import type { AcceptanceRule, VerdictResult } from './verdict';
import type { Method, ReadingState, SurveyPurpose, SurveyState } from './words';

// ---------------------------------------------------------------------------------------------
// Sets

export const RESTORATION_LEVELS = ['conserve', 'repair', 'refurbish', 'restore'] as const;
export type RestorationLevel = (typeof RESTORATION_LEVELS)[number];

/** A shop's job status (museum and hobby sets may leave it at `intake`). */
export const JOB_STATUSES = ['intake', 'surveying', 'waiting-parts', 'repairing', 'testing', 'done', 'returned'] as const;
export type JobStatus = (typeof JOB_STATUSES)[number];

export const TUBE_STATUSES = ['present', 'missing', 'wrong-type', 'replaced'] as const;
export type TubeStatus = (typeof TUBE_STATUSES)[number];

export const DEVIATION_KINDS = ['non-original', 'factory-change'] as const;
export type DeviationKind = (typeof DEVIATION_KINDS)[number];

/**
 * A difference of this set from its template, recorded on the set without forking the template:
 * the survey expects the deviation's value instead of the template's for that component.
 */
export interface SetDeviation {
  /** Stable key (`dv-…`), made by the client or the API. */
  key: string;
  kind: DeviationKind;
  /** The template component it replaces (its key). */
  componentKey: string;
  /** The value the set really has. */
  nominal: Nominal;
  /** Null: keep the template's tolerance. */
  tolerancePct: number | null;
  note: string;
}

export interface TubeRecord {
  socketKey: string;
  status: TubeStatus;
  foundType: string;
  testResult: string;
  note: string;
  recordedBy: PersonRef | null;
  updatedAt: string;
}

export interface PersonRef {
  id: number;
  name: string;
}

/** A set in a list. */
export interface SetSummary {
  id: number;
  label: string;
  accessionNumber: string;
  customer: string;
  jobStatus: JobStatus;
  serial: string;
  restorationLevel: RestorationLevel;
  template: { id: number; maker: string; model: string; chassisNumber: string; power: string; hotChassis: boolean };
  owner: PersonRef;
  /** True when the caller is not the owner (shared with them, or an admin). */
  sharedWithMe: boolean;
  surveyCount: number;
  lastSurvey: { id: number; state: SurveyState; purpose: SurveyPurpose; startedAt: string } | null;
  openLiftedLeads: number;
  firstPowerAt: string | null;
  updatedAt: string;
}

/** GET /api/sets/:id */
export interface SetDetail extends SetSummary {
  condition: string;
  complaint: string;
  intakeNotes: string;
  deviations: SetDeviation[];
  tubeRecords: TubeRecord[];
  sharedWith: PersonRef[];
  surveys: SurveySummary[];
  /** The newest published version of the template (a new survey defaults to it). */
  latestPublishedVersion: number | null;
  version: number;
  createdAt: string;
}

/** POST /api/sets and PATCH /api/sets/:id (PATCH: every field optional, `version` required). */
export interface SetInput {
  templateId: number;
  label: string;
  accessionNumber?: string;
  customer?: string;
  jobStatus?: JobStatus;
  serial?: string;
  restorationLevel?: RestorationLevel;
  condition?: string;
  complaint?: string;
  intakeNotes?: string;
  deviations?: SetDeviation[];
}

// ---------------------------------------------------------------------------------------------
// Meter profiles

export const METER_CHECK_KINDS = ['calibration', 'check'] as const;
export type MeterCheckKind = (typeof METER_CHECK_KINDS)[number];

export interface MeterProfileRecord {
  id: number;
  name: string;
  profile: MeterProfile;
  checkKind: MeterCheckKind;
  /** YYYY-MM-DD */
  checkDate: string | null;
  checkResistorOhms: number | null;
  checkResistorTolerancePct: number | null;
  archived: boolean;
  version: number;
  updatedAt: string;
}

// ---------------------------------------------------------------------------------------------
// Surveys

/** The conditions a survey was taken under. */
export interface SurveyConditions {
  tubesIn: boolean;
  speakerConnected: boolean;
  /** Control and switch positions. */
  controls: string;
  ambientC: number | null;
  note: string;
}

export interface SurveySummary {
  id: number;
  setId: number;
  purpose: SurveyPurpose;
  state: SurveyState;
  templateId: number;
  versionNumber: number;
  meterName: string | null;
  startedBy: PersonRef | null;
  startedAt: string;
  completedAt: string | null;
  /** Stage-summary totals over the whole survey. */
  counts: VerdictCounts;
}

/** How many test points of a stage (or survey) have each summed-up outcome. */
export interface VerdictCounts {
  inBand: number;
  nearLimit: number;
  out: number;
  inconclusive: number;
  unread: number;
}

/** POST /api/sets/:id/surveys */
export interface SurveyStart {
  purpose: SurveyPurpose;
  /** A published version number of the set's template (default: the newest). */
  versionNumber?: number;
  meterProfileId?: number | null;
  rule?: AcceptanceRule;
  conditions?: Partial<SurveyConditions>;
}

/** The meter's check resistor read at the start of a survey. */
export interface MeterCheck {
  text: string;
  ohms: number | null;
  knownOhms: number;
  tolerancePct: number;
  /** False: the meter reads the check resistor off its known value: warn before any reading. */
  ok: boolean;
  message: string;
  at: string;
}

/** One stored reading. */
export interface ReadingRecord {
  id: number;
  testPointKey: string;
  clientKey: string;
  followsReadingId: number | null;
  text: string;
  state: ReadingState;
  ohms: number | null;
  method: Method;
  liftedEnd: 0 | 1 | null;
  rangeIndex: number | null;
  note: string;
  prediction: string | null;
  enteredBy: PersonRef | null;
  takenAt: string;
  version: number;
  updatedAt: string;
}

/** POST /api/surveys/:id/readings */
export interface ReadingInput {
  testPointKey: string;
  /** 16–64 characters of [A-Za-z0-9_-]; made with crypto.getRandomValues. */
  clientKey: string;
  followsReadingId?: number | null;
  /** As typed: `470k`, `OL`, `open`. Either text or a state key. */
  text?: string;
  /** A state key without text (open, short, climbing, unstable, no-access, over-range). */
  state?: Exclude<ReadingState, 'value'>;
  method?: Method;
  liftedEnd?: 0 | 1 | null;
  rangeIndex?: number | null;
  note?: string;
  prediction?: string | null;
  /** ISO time the reading was taken (the queue keeps the bench time). */
  takenAt?: string;
}

/** PATCH /api/surveys/:id/readings/:readingId (draft survey): the fields to change and the version edited. */
export interface ReadingEdit {
  version: number;
  text?: string;
  state?: Exclude<ReadingState, 'value'>;
  method?: Method;
  liftedEnd?: 0 | 1 | null;
  rangeIndex?: number | null;
  note?: string;
}

/** POST answer: the stored reading and its verdict; `replayed` when the client key was already stored. */
export interface ReadingSaved {
  reading: ReadingRecord;
  evaluation: ReadingEvaluation;
  replayed: boolean;
}

/** 409 body details of a stale edit: both values, so the screen can show them. */
export interface ReadingConflict {
  current: ReadingRecord;
  yours: ReadingEdit;
}

/** The verdict of one reading in its survey's context (api/domain/survey-grid.ts). */
export interface ReadingEvaluation {
  readingId: number;
  testPointKey: string;
  verdict: VerdictResult['verdict'];
  reason: VerdictResult['reason'];
  driftPct: number | null;
  uncertaintyOhms: number | null;
  /**
   * The plain verdict of the reading against the expected reading (or the nominal), with its whole
   * explanation. Null in the survey view (400 explanations would weigh a megabyte: the browser
   * recomputes them with the same domain module); present in a save's answer.
   */
  result: VerdictResult | null;
  /** Where the template has a network and the reading is in circuit: the part's implied value. */
  implied: { ohms: number | null; lowOhms: number | null; highOhms: number | null; explainable: boolean | null } | null;
  /** What to do next: lift a lead, check the joint, … (codes, rendered by the screens). */
  advice: GridAdvice[];
  /** The parse problem when the stored text no longer parses (should not happen: refused at entry). */
  error?: string;
}

export const GRID_ADVICE = ['lift-a-lead', 'path-high', 'check-parallel-capacitor', 'not-low-high-not-ruled-out', 'take-higher-range', 'recheck', 'meter-check-failed'] as const;
export type GridAdvice = (typeof GRID_ADVICE)[number];

export interface AmendmentRecord {
  id: number;
  readingId: number | null;
  reason: string;
  change: { before: unknown; after: unknown };
  amendedBy: PersonRef | null;
  createdAt: string;
}

/** GET /api/surveys/:id — everything the grid needs, also offline (cached in IndexedDB). */
export interface SurveyView {
  survey: SurveySummary & {
    meter: { name: string; profile: MeterProfile; checkDate: string | null } | null;
    rule: AcceptanceRule;
    conditions: SurveyConditions;
    meterCheck: MeterCheck | null;
    carriedFromSurveyId: number | null;
    jointChecks: Record<string, { by: PersonRef | null; at: string }>;
    version: number;
    /** The caller may add readings (draft and theirs to edit). */
    editable: boolean;
  };
  set: { id: number; label: string; serial: string; deviations: SetDeviation[]; hotChassis: boolean; power: string };
  template: { id: number; versionNumber: number; document: TemplateDocument };
  /** The tube types the document's sockets name. */
  tubeTypes: TubeTypeRecord[];
  readings: ReadingRecord[];
  /** By reading id. */
  evaluations: Record<number, ReadingEvaluation>;
  amendments: AmendmentRecord[];
  /** Test point keys in the order of the survey this one carried over (empty: the template's order). */
  order: string[];
  /** A class survey (assignment): the assignment's options and the caller's place; null outside a class. */
  classwork?: Classwork | null;
  /** A student reading the reference survey of an assignment (after their own was accepted): that assignment. */
  referenceFor?: { assignmentId: number; title: string } | null;
  /** The previous survey's readings of the same set, shown only after a new value is keyed. */
  previous: { surveyId: number; startedAt: string; readings: { testPointKey: string; text: string; state: ReadingState; ohms: number | null }[] } | null;
}

// ---------------------------------------------------------------------------------------------
// Lifted leads, gates, parts record, bring-up, replacement list, labels

export interface LiftedLeadRecord {
  id: number;
  setId: number;
  surveyId: number | null;
  componentKey: string;
  componentRef: string;
  end: 0 | 1;
  node: string;
  promptedByReadingId: number | null;
  liftedBy: PersonRef | null;
  liftedAt: string;
  resolderedBy: PersonRef | null;
  resolderedAt: string | null;
  recheckReadingId: number | null;
  note: string;
}

export const PARTS_ACTIONS = ['kept', 'replaced', 'left'] as const;
export type PartsAction = (typeof PARTS_ACTIONS)[number];

export interface NewPart {
  text: string;
  ohms: number | null;
  uF: number | null;
  watts: number | null;
  volts: number | null;
  kind: string;
  measuredText: string;
  measuredOhms: number | null;
}

export interface PartsRecordLine {
  id: number;
  componentKey: string;
  componentRef: string;
  action: PartsAction;
  newPart: NewPart | null;
  readingId: number | null;
  reason: string;
  note: string;
  recordedBy: PersonRef | null;
  createdAt: string;
}

export const BRING_UP_STEPS = ['limiter-lamp', 'variac', 'direct'] as const;
export type BringUpStep = (typeof BRING_UP_STEPS)[number];
export const BRING_UP_OBSERVATIONS = ['smoke', 'smell', 'hum', 'arcing', 'hot-part', 'no-sound', 'normal'] as const;

export interface BringUpEntry {
  id: number;
  step: BringUpStep;
  setting: string;
  mainsVolts: number | null;
  currentAmps: number | null;
  bPlus: { node: string; volts: number }[];
  observations: string[];
  note: string;
  recordedBy: PersonRef | null;
  createdAt: string;
}
