/**
 * Classes' words and wire shapes (DESIGN.md §2 "class", "assignment", "reference survey",
 * "review", "competency sign-off"; §3.9 scoring): what the API answers and accepts for classes,
 * assignments, attempts, reviews, competencies and notifications, shared by the API and the
 * Angular app so both read one contract.
 *
 * Dates travel as ISO 8601 strings. Ids are numbers.
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import type { PersonRef, ReadingRecord, SurveyConditions } from './set-format';
import type { AcceptanceRule } from './verdict';
import type { Method, ReadingState, SurveyState, Verdict } from './words';

// ---------------------------------------------------------------------------------------------
// Competencies (a student's record, separate from any set's safety gate)

export const COMPETENCIES = [
  { key: 'discharges-and-verifies', title: 'Discharges the filter capacitors and verifies with a meter before touching' },
  { key: 'isolation-and-hot-chassis', title: 'Recognises a hot chassis and works through an isolation transformer' },
  { key: 'meter-check', title: 'Checks the meter on a known resistor and zeroes the leads' },
  { key: 'measures-out-of-circuit', title: 'Measures resistance out of circuit and reads the meter’s uncertainty' },
  { key: 'measures-in-circuit', title: 'Measures resistance in circuit and accounts for parallel paths' },
  { key: 'lifts-and-resolders-leads', title: 'Lifts a lead to confirm a part and re-solders it' },
  { key: 'builds-replacement-list', title: 'Builds a replacement list from conclusive evidence only' },
] as const;
export type CompetencyKey = (typeof COMPETENCIES)[number]['key'];

export interface CompetencySignoff {
  id: number;
  studentId: number;
  competencyKey: CompetencyKey;
  classId: number | null;
  signedBy: PersonRef | null;
  note: string;
  createdAt: string;
  withdrawnAt: string | null;
  withdrawnBy: PersonRef | null;
  withdrawnNote: string | null;
}

/** GET /api/students/:id/competencies — every competency with its current sign-off (or null) and the history. */
export interface CompetencyRecord {
  student: PersonRef;
  items: { key: CompetencyKey; title: string; current: CompetencySignoff | null }[];
  history: CompetencySignoff[];
}

// ---------------------------------------------------------------------------------------------
// Classes, students, invitations

export interface ClassSummary {
  id: number;
  name: string;
  term: string;
  instructor: PersonRef;
  /** The caller's place in the class. */
  myRole: 'instructor' | 'student' | 'admin';
  studentCount: number;
  assignmentCount: number;
  archived: boolean;
  createdAt: string;
}

export interface ClassStudent {
  student: PersonRef & { email: string };
  joinedAt: string;
  removedAt: string | null;
}

export type InvitationState = 'open' | 'accepted' | 'expired' | 'revoked';

export interface ClassInvitation {
  id: number;
  email: string;
  state: InvitationState;
  createdAt: string;
  expiresAt: string;
  acceptedAt: string | null;
}

/** GET /api/classes/:id. A student sees no roster and no invitations (empty lists). */
export interface ClassDetail extends ClassSummary {
  students: ClassStudent[];
  invitations: ClassInvitation[];
  assignments: AssignmentSummary[];
}

export interface ClassInput {
  name: string;
  term?: string;
}

export interface ClassPatch {
  name?: string;
  term?: string;
  archived?: boolean;
}

/** POST /api/classes/:id/invitations */
export interface InvitationInput {
  emails: string[];
}

/** GET /api/class-invitations/:token (public): what the link is for. */
export interface InvitationPreview {
  className: string;
  term: string;
  instructorName: string;
  email: string;
  state: InvitationState;
  /** An account with this e-mail exists: sign in and join; otherwise create one. */
  accountExists: boolean;
}

/** POST /api/class-invitations/:token/accept (public): create the account and join. */
export interface InvitationAccept {
  name: string;
  password: string;
}

// ---------------------------------------------------------------------------------------------
// Assignments

/** Where a student stands on an assignment (late is derived from the due date, not a state). */
export type StudentStatus = 'not-started' | 'draft' | 'submitted' | 'returned' | 'accepted';

export interface AssignmentSummary {
  id: number;
  classId: number;
  title: string;
  dueAt: string;
  templateId: number;
  versionNumber: number;
  maker: string;
  model: string;
  setId: number;
  setLabel: string;
  predictFirst: boolean;
  showVerdicts: boolean;
  /** Instructor: submissions waiting for review. Student: null. */
  awaitingReview: number | null;
  /** Student: their own status. Instructor: null. */
  myStatus: StudentStatus | null;
  /** Student: their survey (null until started). */
  mySurveyId: number | null;
}

export interface AssignmentInput {
  title: string;
  instructions?: string;
  templateId: number;
  versionNumber: number;
  /** The training set (its template must be templateId; the instructor must be able to edit it). */
  setId: number;
  dueAt: string;
  rule?: AcceptanceRule;
  /** The instructor's own survey of the training set (not a class survey). */
  referenceSurveyId?: number | null;
  predictFirst?: boolean;
  showVerdicts?: boolean;
}

export interface AssignmentPatch {
  title?: string;
  instructions?: string;
  dueAt?: string;
  referenceSurveyId?: number | null;
  predictFirst?: boolean;
  showVerdicts?: boolean;
}

/** One row of the submission queue. */
export interface QueueEntry {
  student: PersonRef;
  surveyId: number | null;
  status: StudentStatus;
  /** The newest attempt (null before the first submission). */
  latestAttempt: { id: number; number: number; submittedAt: string; late: boolean } | null;
  attemptCount: number;
  score: number | null;
}

/** GET /api/assignments/:id */
export interface AssignmentDetail extends AssignmentSummary {
  instructions: string;
  className: string;
  instructor: PersonRef;
  rule: AcceptanceRule;
  /** The training set's card (what the grant lets a student see). */
  set: { id: number; label: string; serial: string; maker: string; model: string; hotChassis: boolean };
  /** Instructor only (null for a student). */
  referenceSurveyId: number | null;
  /** Instructor: every student of the class. Student: empty. */
  queue: QueueEntry[];
  /** Student: their attempts, newest first. Instructor: empty. */
  myAttempts: AttemptSummary[];
}

// ---------------------------------------------------------------------------------------------
// Attempts and reviews

export type ReviewDecision = 'accepted' | 'returned';

export interface AttemptSummary {
  id: number;
  surveyId: number;
  assignmentId: number;
  number: number;
  student: PersonRef;
  submittedAt: string;
  late: boolean;
  review: ReviewRecord | null;
}

export interface ReviewRecord {
  id: number;
  decision: ReviewDecision;
  score: number | null;
  suggestedScore: number | null;
  comment: string;
  remeasureKeys: string[];
  reviewer: PersonRef | null;
  createdAt: string;
}

export interface ReadingComment {
  id: number;
  attemptId: number;
  testPointKey: string;
  readingId: number | null;
  author: PersonRef | null;
  text: string;
  createdAt: string;
}

/** Why a reading and the reference cannot be compared by E_n (DESIGN.md §3.9). */
export const NOT_COMPARABLE_REASONS = ['method-differs', 'conditions-differ', 'no-reference', 'not-read', 'no-uncertainty', 'state-pending', 'value-against-state', 'ambiguous-state'] as const;
export type NotComparableReason = (typeof NOT_COMPARABLE_REASONS)[number];

/** Feedback hints for classic errors, where the data shows them. */
export const FEEDBACK_HINTS = ['fingers-across-probes', 'over-range-on-low-range', 'far-from-prediction'] as const;
export type FeedbackHint = (typeof FEEDBACK_HINTS)[number];

/** The comparison of one test point's reading with the reference's (api/domain/review.ts). */
export interface ReadingComparison {
  /** `agree`: E_n ≤ 1 (or same state); `disagree`; `not-comparable` with a reason. */
  agreement: 'agree' | 'disagree' | 'not-comparable';
  en: number | null;
  reason: NotComparableReason | null;
  /** Words for the reason or for the lenient note. */
  note: string | null;
  /** Both used the same meter: the comparison is lenient (the meter's own error cancels). */
  lenient: boolean;
  /** Student's and reference's verdicts agree (null when either is missing). */
  verdictAgreement: boolean | null;
}

/** One test point in the review. */
export interface ReviewRow {
  testPointKey: string;
  label: string;
  stageKey: string;
  student: { reading: ReadingRecord | null; verdict: Verdict | null; uncertaintyOhms: number | null };
  /** Null for a student before acceptance. */
  reference: { reading: ReadingRecord | null; verdict: Verdict | null; uncertaintyOhms: number | null } | null;
  comparison: ReadingComparison | null;
  /** The student's prediction and its error against what they measured. */
  prediction: { text: string; ohms: number | null; errorPct: number | null } | null;
  hints: FeedbackHint[];
  comments: ReadingComment[];
  remeasureRequested: boolean;
}

/** GET /api/attempts/:id/review */
export interface ReviewView {
  attempt: AttemptSummary;
  /** `className`: the name of the assignment's class (the breadcrumb back to it). */
  assignment: { id: number; title: string; classId: number; className: string; dueAt: string; predictFirst: boolean };
  surveyState: SurveyState;
  /** The reference is shown (instructor, or the student after acceptance). */
  referenceShown: boolean;
  referenceSurveyId: number | null;
  conditions: { student: SurveyConditions | null; reference: SurveyConditions | null; differences: string[] };
  sameMeter: boolean;
  rows: ReviewRow[];
  /** Share of comparable points that agree, 0–100 (null: none comparable). The instructor changes it. */
  suggestedScore: number | null;
  counts: { agree: number; disagree: number; notComparable: number; verdictAgree: number; verdictDisagree: number };
  /** Every attempt of this survey, newest first. */
  attempts: AttemptSummary[];
}

export interface CommentInput {
  testPointKey: string;
  readingId?: number | null;
  text: string;
}

export interface ReviewInput {
  decision: ReviewDecision;
  /** 0–100 or null. */
  score: number | null;
  comment?: string;
  /** Returned: the test points to re-measure (only those are editable afterwards). */
  remeasureKeys?: string[];
}

/** What the survey view adds for a class survey (SurveyView.classwork). */
export interface Classwork {
  assignmentId: number;
  classId: number;
  title: string;
  dueAt: string;
  late: boolean;
  predictFirst: boolean;
  showVerdicts: boolean;
  /** Returned: the only test points the student may re-measure. */
  remeasureKeys: string[] | null;
  attemptCount: number;
  /** The caller's place: the student doing it or the instructor reading it. */
  viewer: 'student' | 'instructor' | 'admin';
}

// ---------------------------------------------------------------------------------------------
// Results

/** GET /api/classes/:id/results */
export interface ClassResults {
  classId: number;
  assignments: { id: number; title: string; dueAt: string }[];
  students: PersonRef[];
  /** cells[studentIndex][assignmentIndex] */
  cells: { status: StudentStatus; score: number | null; attempts: number; late: boolean }[][];
  /** Per assignment and test point: the share of students whose latest attempt agreed with the reference. */
  points: { assignmentId: number; testPointKey: string; label: string; compared: number; agreed: number; share: number | null }[];
}

// ---------------------------------------------------------------------------------------------
// Notifications

export const NOTIFICATION_KINDS = ['class-invitation', 'submission', 'review-done', 'due-soon'] as const;
export type NotificationKind = (typeof NOTIFICATION_KINDS)[number];

export interface NotificationRecord {
  id: number;
  kind: NotificationKind;
  title: string;
  body: string;
  link: string;
  createdAt: string;
  readAt: string | null;
}

export interface NotificationList {
  items: NotificationRecord[];
  unread: number;
}

/** How long before the due date the reminder goes out (hours). */
export const DUE_REMINDER_HOURS = 48;

/** Re-exported words used by class screens. */
export type { Method, ReadingState };
