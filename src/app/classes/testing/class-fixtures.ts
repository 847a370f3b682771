import type { AssignmentDetail, AssignmentSummary, AttemptSummary, ClassDetail, ClassResults, CompetencyRecord, ReviewRow, ReviewView } from '@domain/class-format';
import { COMPETENCIES } from '@domain/class-format';
import type { ReadingRecord } from '@domain/set-format';

/** Spec fixtures for the class screens: invented people and classes (example.org addresses). */

export function assignmentSummary(over: Partial<AssignmentSummary> = {}): AssignmentSummary {
  return {
    id: 41,
    classId: 3,
    title: 'Wren 3: the audio stage',
    dueAt: '2030-04-01T16:00:00Z',
    templateId: 11,
    versionNumber: 2,
    maker: 'Quillmere Radio Co.',
    model: 'Wren 3',
    setId: 5,
    setLabel: 'Bench Wren A',
    predictFirst: true,
    showVerdicts: false,
    awaitingReview: 2,
    myStatus: null,
    mySurveyId: null,
    ...over,
  };
}

export function classDetail(over: Partial<ClassDetail> = {}): ClassDetail {
  return {
    id: 3,
    name: 'Bench practice, evening group',
    term: 'Spring 2027',
    instructor: { id: 7, name: 'Ada Voss' },
    myRole: 'instructor',
    studentCount: 2,
    assignmentCount: 1,
    archived: false,
    createdAt: '2027-01-10T09:00:00Z',
    students: [
      { student: { id: 21, name: 'Tomas Brell', email: 'tomas.brell@example.org' }, joinedAt: '2027-01-12T09:00:00Z', removedAt: null },
      { student: { id: 22, name: 'Ines Marlow', email: 'ines.marlow@example.org' }, joinedAt: '2027-01-13T09:00:00Z', removedAt: null },
    ],
    invitations: [
      { id: 61, email: 'pell.orrin@example.org', state: 'open', createdAt: '2027-01-11T09:00:00Z', expiresAt: '2027-01-25T09:00:00Z', acceptedAt: null },
      { id: 62, email: 'tomas.brell@example.org', state: 'accepted', createdAt: '2027-01-11T09:00:00Z', expiresAt: '2027-01-25T09:00:00Z', acceptedAt: '2027-01-12T09:00:00Z' },
    ],
    assignments: [assignmentSummary()],
    ...over,
  };
}

export function attempt(over: Partial<AttemptSummary> = {}): AttemptSummary {
  return {
    id: 81,
    surveyId: 91,
    assignmentId: 41,
    number: 1,
    student: { id: 21, name: 'Tomas Brell' },
    submittedAt: '2030-03-30T10:00:00Z',
    late: false,
    review: null,
    ...over,
  };
}

export function assignmentDetail(over: Partial<AssignmentDetail> = {}): AssignmentDetail {
  return {
    ...assignmentSummary(),
    instructions: 'Measure the audio stage with the tubes out.',
    className: 'Bench practice, evening group',
    instructor: { id: 7, name: 'Ada Voss' },
    rule: { decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'template' },
    set: { id: 5, label: 'Bench Wren A', serial: 'QW3-118', maker: 'Quillmere Radio Co.', model: 'Wren 3', hotChassis: true },
    referenceSurveyId: 70,
    queue: [
      { student: { id: 21, name: 'Tomas Brell' }, surveyId: 91, status: 'submitted', latestAttempt: { id: 81, number: 1, submittedAt: '2030-04-02T10:00:00Z', late: true }, attemptCount: 1, score: null },
      { student: { id: 22, name: 'Ines Marlow' }, surveyId: 92, status: 'accepted', latestAttempt: { id: 82, number: 2, submittedAt: '2030-03-20T10:00:00Z', late: false }, attemptCount: 2, score: 88 },
      { student: { id: 23, name: 'Pell Orrin' }, surveyId: null, status: 'not-started', latestAttempt: null, attemptCount: 0, score: null },
    ],
    myAttempts: [],
    ...over,
  };
}

export function reading(over: Partial<ReadingRecord> = {}): ReadingRecord {
  return {
    id: 501,
    testPointKey: 'tp-r7',
    clientKey: 'client-key-0000000001',
    followsReadingId: null,
    text: '470k',
    state: 'value',
    ohms: 470_000,
    method: 'in-circuit',
    liftedEnd: null,
    rangeIndex: null,
    note: '',
    prediction: '450k',
    enteredBy: { id: 21, name: 'Tomas Brell' },
    takenAt: '2030-03-29T10:00:00Z',
    version: 1,
    updatedAt: '2030-03-29T10:00:00Z',
    ...over,
  };
}

export function reviewRows(): ReviewRow[] {
  return [
    {
      testPointKey: 'tp-r7',
      label: 'R7 plate load',
      stageKey: 'st-audio',
      student: { reading: reading(), verdict: 'in-band', uncertaintyOhms: 9400 },
      reference: { reading: reading({ id: 401, ohms: 468_000, text: '468k', prediction: null }), verdict: 'in-band', uncertaintyOhms: 9400 },
      comparison: { agreement: 'agree', en: 0.15, reason: null, note: null, lenient: false, verdictAgreement: true },
      prediction: { text: '450k', ohms: 450_000, errorPct: -4.3 },
      hints: [],
      comments: [],
      remeasureRequested: false,
    },
    {
      testPointKey: 'tp-r9',
      label: 'R9 grid leak',
      stageKey: 'st-audio',
      student: { reading: reading({ id: 502, testPointKey: 'tp-r9', text: '2.1M', ohms: 2_100_000, prediction: null }), verdict: 'low', uncertaintyOhms: 40_000 },
      reference: { reading: reading({ id: 402, testPointKey: 'tp-r9', text: '9.8M', ohms: 9_800_000, prediction: null }), verdict: 'in-band', uncertaintyOhms: 200_000 },
      comparison: { agreement: 'disagree', en: 37.7, reason: null, note: null, lenient: false, verdictAgreement: false },
      prediction: null,
      hints: ['fingers-across-probes'],
      comments: [{ id: 301, attemptId: 81, testPointKey: 'tp-r9', readingId: 502, author: { id: 7, name: 'Ada Voss' }, text: 'Hands off the probe tips.', createdAt: '2030-04-02T11:00:00Z' }],
      remeasureRequested: false,
    },
    {
      testPointKey: 'tp-v2',
      label: 'V2 pin 5 to chassis',
      stageKey: 'st-audio',
      student: { reading: reading({ id: 503, testPointKey: 'tp-v2', method: 'lead-lifted', liftedEnd: 0, prediction: null }), verdict: 'in-band', uncertaintyOhms: 9000 },
      reference: { reading: reading({ id: 403, testPointKey: 'tp-v2', prediction: null }), verdict: 'in-band', uncertaintyOhms: 9000 },
      comparison: { agreement: 'not-comparable', en: null, reason: 'method-differs', note: 'measured by a different method than the reference', lenient: false, verdictAgreement: true },
      prediction: null,
      hints: [],
      comments: [],
      remeasureRequested: false,
    },
  ];
}

export function reviewView(over: Partial<ReviewView> = {}): ReviewView {
  const a = attempt();
  return {
    attempt: a,
    assignment: { id: 41, title: 'Wren 3: the audio stage', classId: 3, className: 'Bench practice, evening group', dueAt: '2030-04-01T16:00:00Z', predictFirst: true },
    surveyState: 'submitted',
    referenceShown: true,
    referenceSurveyId: 70,
    conditions: { student: null, reference: null, differences: [] },
    sameMeter: false,
    rows: reviewRows(),
    suggestedScore: 50,
    counts: { agree: 1, disagree: 1, notComparable: 1, verdictAgree: 2, verdictDisagree: 1 },
    attempts: [a],
    ...over,
  };
}

/** The same review as its student sees it before acceptance: no reference. */
export function studentReviewView(over: Partial<ReviewView> = {}): ReviewView {
  const a = attempt({
    review: { id: 95, decision: 'returned', score: 40, suggestedScore: 50, comment: 'Re-measure R9 without touching the tips.', remeasureKeys: ['tp-r9'], reviewer: { id: 7, name: 'Ada Voss' }, createdAt: '2030-04-03T10:00:00Z' },
  });
  return reviewView({
    attempt: a,
    attempts: [a],
    surveyState: 'returned',
    referenceShown: false,
    referenceSurveyId: null,
    rows: reviewRows().map((r) => ({ ...r, reference: null, comparison: null, remeasureRequested: r.testPointKey === 'tp-r9' })),
    ...over,
  });
}

export function results(): ClassResults {
  return {
    classId: 3,
    assignments: [
      { id: 41, title: 'Wren 3: the audio stage', dueAt: '2030-04-01T16:00:00Z' },
      { id: 42, title: 'Wren 3: the rectifier', dueAt: '2030-05-01T16:00:00Z' },
    ],
    students: [
      { id: 21, name: 'Tomas Brell' },
      { id: 22, name: 'Ines Marlow' },
    ],
    cells: [
      [
        { status: 'submitted', score: null, attempts: 1, late: true },
        { status: 'not-started', score: null, attempts: 0, late: false },
      ],
      [
        { status: 'accepted', score: 88, attempts: 2, late: false },
        { status: 'draft', score: null, attempts: 0, late: false },
      ],
    ],
    points: [
      { assignmentId: 41, testPointKey: 'tp-r7', label: 'R7 plate load', compared: 2, agreed: 2, share: 100 },
      { assignmentId: 41, testPointKey: 'tp-r9', label: 'R9 grid leak', compared: 2, agreed: 1, share: 50 },
      { assignmentId: 41, testPointKey: 'tp-v3', label: 'V3 pin 2 to chassis', compared: 0, agreed: 0, share: null },
      { assignmentId: 42, testPointKey: 'tp-r1', label: 'R1 surge resistor', compared: 0, agreed: 0, share: null },
    ],
  };
}

export function competencyRecord(signedKeys: string[] = [], signerId = 7): CompetencyRecord {
  const items = COMPETENCIES.map((c, i) => ({
    key: c.key,
    title: c.title,
    current: signedKeys.includes(c.key)
      ? {
          id: 700 + i,
          studentId: 21,
          competencyKey: c.key,
          classId: 3,
          signedBy: { id: signerId, name: signerId === 7 ? 'Ada Voss' : 'Rue Halden' },
          note: 'Seen on the Wren',
          createdAt: '2027-02-01T10:00:00Z',
          withdrawnAt: null,
          withdrawnBy: null,
          withdrawnNote: null,
        }
      : null,
  }));
  return { student: { id: 21, name: 'Tomas Brell' }, items, history: items.flatMap((i) => (i.current ? [i.current] : [])) };
}
