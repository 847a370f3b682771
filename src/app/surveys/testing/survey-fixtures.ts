import type { AttemptSummary, Classwork } from '@domain/class-format';
import type { ReadingRecord, ReadingSaved, SurveyView } from '@domain/set-format';
import { SurveyGrid, parseReadingText } from '@domain/survey-grid';
import type { TemplateDocument, TubeTypeRecord } from '@domain/template-format';

const TUBE: TubeTypeRecord = { designation: '12AV6', base: 'miniature-7', heating: 'indirect', heaterVolts: 12.6, heaterAmps: 0.15, pins: TRIODE_PINS, ties: [], notes: '' };
import type { Method } from '@domain/words';
import { TRIODE_PINS, sampleDocument } from '../../templates/testing/template-fixtures';

/**
 * Spec data: the invented chassis of the template specs (Quillmere Radio Co. Wren 3, an AC/DC
 * set, so hot chassis) with a second stage (a rectifier and filter) added, and a survey of an
 * invented set on it.
 */
export function surveyDocument(): TemplateDocument {
  const doc = sampleDocument();
  const base = doc.components[0];
  doc.stages.push({ key: 'st-power', name: 'Rectifier and filter', sockets: [] });
  doc.components.push({ ...base, key: 'c-r3', ref: 'R3', kind: 'wirewound', stageKey: 'st-power', nodes: ['B+', 'B+1'], nominal: { ohms: 1200, text: '1k2' }, tolerancePct: 10 });
  doc.testPoints.push({ key: 'tp-r3', stageKey: 'st-power', kind: 'component-check', componentKey: 'c-r3' });
  return doc;
}

export function surveyView(over: Partial<SurveyView['survey']> = {}, extra: Partial<SurveyView> = {}): SurveyView {
  return {
    survey: {
      id: 5,
      setId: 3,
      purpose: 'intake',
      state: 'draft',
      templateId: 11,
      versionNumber: 2,
      meterName: null,
      startedBy: { id: 7, name: 'Ada Voss' },
      startedAt: '2026-11-30T09:00:00Z',
      completedAt: null,
      counts: { inBand: 0, nearLimit: 0, out: 0, inconclusive: 0, unread: 4 },
      meter: null,
      rule: { decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'template' },
      conditions: { tubesIn: true, speakerConnected: true, controls: 'volume max', ambientC: 21, note: '' },
      meterCheck: null,
      carriedFromSurveyId: null,
      jointChecks: {},
      version: 1,
      editable: true,
      ...over,
    },
    set: { id: 3, label: 'Kitchen Wren', serial: 'QW3-0417', deviations: [], hotChassis: true, power: 'ac-dc' },
    template: { id: 11, versionNumber: 2, document: surveyDocument() },
    tubeTypes: [TUBE],
    readings: [],
    evaluations: {},
    amendments: [],
    order: [],
    previous: null,
    ...extra,
  };
}

let nextId = 100;

/** A stored reading as the API would store it. */
export function record(testPointKey: string, text: string, over: Partial<ReadingRecord> = {}): ReadingRecord {
  const parsed = parseReadingText(text);
  return {
    id: ++nextId,
    testPointKey,
    clientKey: `spec-${nextId}-aaaaaaaaaaaaaaaa`,
    followsReadingId: null,
    text,
    state: parsed.state,
    ohms: parsed.ohms,
    method: 'in-circuit' as Method,
    liftedEnd: null,
    rangeIndex: null,
    note: '',
    prediction: null,
    enteredBy: { id: 7, name: 'Ada Voss' },
    takenAt: '2026-11-30T09:05:00Z',
    version: 1,
    updatedAt: '2026-11-30T09:05:00Z',
    ...over,
  };
}

/** The API's answer to a reading POST, with the verdict the same domain module gives. */
export function savedAnswer(view: SurveyView, rec: ReadingRecord, replayed = false): ReadingSaved {
  const grid = new SurveyGrid({
    document: view.template.document,
    tubeTypes: view.tubeTypes,
    deviations: view.set.deviations,
    meter: null,
    rule: view.survey.rule,
    conditions: view.survey.conditions,
  });
  return { reading: rec, evaluation: grid.evaluate(rec), replayed };
}

/** A class survey's classwork as the API adds it (an invented assignment of an invented class). */
export function classwork(over: Partial<Classwork> = {}): Classwork {
  return {
    assignmentId: 21,
    classId: 4,
    title: 'Wren 3: first audio stage',
    dueAt: '2099-03-01T17:00:00Z',
    late: false,
    predictFirst: false,
    showVerdicts: true,
    remeasureKeys: null,
    attemptCount: 0,
    viewer: 'student',
    ...over,
  };
}

/** A student's class survey of the spec chassis (purpose assignment). */
export function classSurveyView(cw: Partial<Classwork> = {}, over: Partial<SurveyView['survey']> = {}, extra: Partial<SurveyView> = {}): SurveyView {
  return surveyView({ purpose: 'assignment', ...over }, { classwork: classwork(cw), ...extra });
}

/** An attempt as POST /api/surveys/:id/submit answers it. */
export function attempt(over: Partial<AttemptSummary> = {}): AttemptSummary {
  return {
    id: 41,
    surveyId: 5,
    assignmentId: 21,
    number: 1,
    student: { id: 7, name: 'Ada Voss' },
    submittedAt: '2026-11-30T12:00:00Z',
    late: false,
    review: null,
    ...over,
  };
}
