import type { MeterProfileRecord, SetDetail, SurveySummary, SurveyView } from '@domain/set-format';
import { DEFAULT_RULE } from '@domain/verdict';
import type { PartInstance } from '@domain/part-history';
import { TUBE, sampleDocument } from '../../templates/testing/template-fixtures';
import type { GatesView } from '../sets-api';

/** Spec data: invented sets, people and meters (fictional makers and owners). */
export const ADA = { id: 7, name: 'Ada Voss' };
export const BRAM = { id: 9, name: 'Bram Oduya' };

export function surveySummary(over: Partial<SurveySummary> = {}): SurveySummary {
  return {
    id: 31,
    setId: 5,
    purpose: 'intake',
    state: 'complete',
    templateId: 11,
    versionNumber: 2,
    meterName: 'Bench DMM',
    startedBy: ADA,
    startedAt: '2024-03-02T10:00:00Z',
    completedAt: '2024-03-02T12:00:00Z',
    counts: { inBand: 2, nearLimit: 0, out: 1, inconclusive: 0, unread: 0 },
    ...over,
  };
}

export function setDetail(over: Partial<SetDetail> = {}): SetDetail {
  return {
    id: 5,
    label: 'Wren on the shelf',
    accessionNumber: 'ACC-0042',
    customer: '',
    jobStatus: 'surveying',
    serial: 'QW3-118',
    restorationLevel: 'conserve',
    template: { id: 11, maker: 'Quillmere Radio Co.', model: 'Wren 3', chassisNumber: 'QW-3', power: 'ac-dc', hotChassis: true },
    owner: ADA,
    sharedWithMe: false,
    surveyCount: 1,
    lastSurvey: { id: 31, state: 'complete', purpose: 'intake', startedAt: '2024-03-02T10:00:00Z' },
    openLiftedLeads: 0,
    firstPowerAt: null,
    updatedAt: '2026-03-01T10:00:00Z',
    condition: 'dusty, cabinet cracked',
    complaint: 'silent',
    intakeNotes: '',
    deviations: [],
    tubeRecords: [],
    sharedWith: [],
    surveys: [surveySummary()],
    latestPublishedVersion: 2,
    version: 3,
    createdAt: '2024-03-01T10:00:00Z',
    ...over,
  };
}

export function meterRecord(over: Partial<MeterProfileRecord> = {}): MeterProfileRecord {
  return {
    id: 4,
    name: 'Bench DMM',
    profile: { kind: 'digital', autorange: false, leadOhms: 0.2, ranges: [{ fullScaleOhms: 1999, resolutionOhms: 1, pctOfReading: 0.8, counts: 2 }, { fullScaleOhms: 19990, resolutionOhms: 10, pctOfReading: 0.8, counts: 2 }] },
    checkKind: 'check',
    checkDate: '2026-01-15',
    checkResistorOhms: 10000,
    checkResistorTolerancePct: 0.1,
    archived: false,
    version: 2,
    updatedAt: '2026-01-15T10:00:00Z',
    ...over,
  };
}

export function gatesView(over: Partial<GatesView> = {}): GatesView {
  return {
    notice: 'These gates record who checked what, and when.',
    kind: { power: 'ac-dc', hotChassis: true },
    items: [
      { key: 'load-connected', title: 'Speaker or output load connected', caution: 'Connect the speaker before power. Follow your local electrical codes and licensed practice.', scope: 'every-set', source: 'common practice', latest: null, open: true },
      {
        key: 'fuse-in-hot-lead',
        title: 'Fuse in the hot lead',
        caution: 'A fuse ahead of the switch. Follow your local electrical codes and licensed practice.',
        scope: 'mains',
        source: 'common practice',
        latest: { id: 3, itemKey: 'fuse-in-hot-lead', action: 'signed', note: '1 A slow', by: BRAM, at: '2026-03-02T10:00:00Z' },
        open: false,
      },
    ],
    history: [],
    openLiftedLeads: [],
    firstPower: null,
    blockers: [{ kind: 'gate-item', itemKey: 'load-connected', title: 'Speaker or output load connected' }],
    ...over,
  };
}

/** A complete survey of the sample document: R1 read high on its own leads, R2 in band. */
export function surveyView(): SurveyView {
  const reading = (id: number, testPointKey: string, text: string, ohms: number, method: 'in-circuit' | 'out-of-circuit', followsReadingId: number | null = null) => ({
    id,
    testPointKey,
    clientKey: `ck-${id}-abcdefghijklmnop`,
    followsReadingId,
    text,
    state: 'value' as const,
    ohms,
    method,
    liftedEnd: null,
    rangeIndex: null,
    note: '',
    prediction: null,
    enteredBy: ADA,
    takenAt: '2024-03-02T10:30:00Z',
    version: 1,
    updatedAt: '2024-03-02T10:30:00Z',
  });
  const evaluation = (readingId: number, testPointKey: string, verdict: 'in-band' | 'high', driftPct: number) => ({
    readingId,
    testPointKey,
    verdict,
    reason: null,
    driftPct,
    uncertaintyOhms: null,
    result: null,
    implied: null,
    advice: [],
  });
  return {
    survey: {
      ...surveySummary(),
      meter: null,
      rule: { ...DEFAULT_RULE },
      conditions: { tubesIn: false, speakerConnected: true, controls: 'volume max', ambientC: 21, note: '' },
      meterCheck: null,
      carriedFromSurveyId: null,
      jointChecks: {},
      version: 4,
      editable: false,
    },
    set: { id: 5, label: 'Wren on the shelf', serial: 'QW3-118', deviations: [], hotChassis: true, power: 'ac-dc' },
    template: { id: 11, versionNumber: 2, document: sampleDocument() },
    tubeTypes: [{ ...TUBE }] as unknown as SurveyView['tubeTypes'],
    readings: [reading(101, 'tp-r1', '13M', 13e6, 'in-circuit'), reading(102, 'tp-r1', '14M', 14e6, 'out-of-circuit', 101), reading(103, 'tp-r2', '240k', 240000, 'in-circuit')],
    evaluations: { 101: evaluation(101, 'tp-r1', 'high', 30), 102: evaluation(102, 'tp-r1', 'high', 40), 103: evaluation(103, 'tp-r2', 'in-band', -4) },
    amendments: [{ id: 1, readingId: 103, reason: 'typo in the value', change: { before: '204k', after: '240k' }, amendedBy: ADA, createdAt: '2024-03-03T09:00:00Z' }],
    order: [],
    previous: null,
  };
}

/** R2 across three surveys (invented values), band ±10 %, U 1 % of nominal. */
export function partInstance(over: Partial<PartInstance> = {}): PartInstance {
  const point = (readingId: number, at: string, years: number, ohms: number) => ({
    surveyId: readingId,
    readingId,
    at,
    state: 'value' as const,
    ohms,
    valueFrom: 'reading' as const,
    nominalOhms: 250000,
    uncertaintyOhms: 2500,
    band: { lowPct: -10, highPct: 10 },
    verdict: 'in-band' as const,
    method: 'out-of-circuit' as const,
    meter: 'Bench DMM',
    years,
    driftPct: ((ohms - 250000) / 250000) * 100,
    uncertaintyPct: 1,
    marks: [] as ('meter-changed' | 'method-changed' | 'value-implied')[],
  });
  return {
    componentKey: 'c-r2',
    ref: 'R2',
    instance: 1,
    original: true,
    startedBy: null,
    endedBy: null,
    points: [point(1, '2020-01-01T00:00:00Z', 0, 250000), point(2, '2022-01-01T00:00:00Z', 2, 255000), { ...point(3, '2024-01-01T00:00:00Z', 4, 260000), meter: 'Grey analogue', marks: ['meter-changed'] }],
    rate: { slopePctPerYear: 1, interval: { low: 0.4, high: 1.6 }, n: 3, interceptPct: 0, standardErrorPctPerYear: 0.1, standardErrorFrom: 'readings', degreesOfFreedom: 1, t: 12.706, lastYears: 4 },
    leftOut: 0,
    projection: { extrapolation: true, note: 'extrapolation: a straight line carried beyond the surveys', edge: 'high', fromDriftPct: 4, fromYears: 4, yearsAhead: 6, atYears: 10, range: { soonestYearsAhead: 3.75, latestYearsAhead: 15 } },
    ...over,
  };
}
