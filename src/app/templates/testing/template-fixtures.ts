import type { Component as Part, TemplateDocument, TubePin } from '@domain/template-format';
import type { TemplateSummary, TemplateView, TubeType } from '../templates-api';

/**
 * Spec data: an invented chassis (fictional maker and model) around a 7-pin miniature
 * duplex-diode triode. Pinout as the common 12AV6 — grid 1, cathode 2, heater 3-4, diode plates 5
 * and 6, plate 7 — from memory (check against a tube manual).
 */
export const TRIODE_PINS: TubePin[] = [
  { pin: 1, electrode: 'g', label: 'grid' },
  { pin: 2, electrode: 'k', label: 'cathode' },
  { pin: 3, electrode: 'h', label: 'heater' },
  { pin: 4, electrode: 'h', label: 'heater' },
  { pin: 5, electrode: 'd', label: 'diode plate 1' },
  { pin: 6, electrode: 'd', label: 'diode plate 2' },
  { pin: 7, electrode: 'p', label: 'plate' },
];

export const TUBE: TubeType = {
  designation: '12AV6',
  base: 'miniature-7',
  heating: 'indirect',
  heaterVolts: 12.6,
  heaterAmps: 0.15,
  pins: TRIODE_PINS,
  ties: [],
  notes: '',
  createdBy: null,
  canEdit: false,
  createdAt: '2026-01-01T00:00:00Z',
  updatedAt: '2026-01-01T00:00:00Z',
};

const part = { tolerancePct: 10, ratedWatts: 0.5, ratedVolts: null, voltsAcross: null, critical: null, fuseRole: false, mainsSide: false, nonLinear: false, valueSource: 'service-data' as const, capacitor: null, note: '', wiper: null };

export function sampleDocument(): TemplateDocument {
  const components: Part[] = [
    { ...part, key: 'c-r1', ref: 'R1', kind: 'carbon-composition', stageKey: 'st-audio', nodes: ['V1.1', 'chassis'], nominal: { ohms: 10e6, text: '10M' }, tolerancePct: 20 },
    { ...part, key: 'c-r2', ref: 'R2', kind: 'carbon-composition', stageKey: 'st-audio', nodes: ['V1.7', 'B+1'], nominal: { ohms: 250000, text: '250k' }, voltsAcross: 45 },
    {
      ...part,
      key: 'c-c1',
      ref: 'C1',
      kind: 'capacitor',
      stageKey: 'st-audio',
      nodes: ['V1.7', 'chassis'],
      nominal: { state: 'open' },
      tolerancePct: null,
      ratedWatts: null,
      valueSource: 'schematic',
      capacitor: { uF: 0.01, workingVolts: 400, dielectric: 'paper', polarised: false, can: null, safetyClass: null, lineConnected: false },
    },
  ];
  return {
    format: 'driftmark-template',
    formatVersion: 1,
    chassis: {
      maker: 'Quillmere Radio Co.',
      model: 'Wren 3',
      chassisNumber: 'QW-3',
      variants: ['QW-3A'],
      yearFrom: 1951,
      yearTo: 1953,
      kind: 'table-radio',
      power: 'ac-dc',
      hotChassis: true,
      hazardNotes: '',
      sources: [{ title: 'Invented service sheet 3', kind: 'service-data', note: '' }],
    },
    conditions: { tubesIn: true, speakerConnected: true, controls: 'volume max' },
    stages: [{ key: 'st-audio', name: 'Detector and first audio', sockets: [{ key: 'so-v1', designator: 'V1', tubeType: '12AV6' }] }],
    junctions: [{ name: 'B+1', note: 'second filter output' }],
    components,
    testPoints: [
      { key: 'tp-r1', stageKey: 'st-audio', kind: 'component-check', componentKey: 'c-r1' },
      { key: 'tp-r2', stageKey: 'st-audio', kind: 'component-check', componentKey: 'c-r2' },
      { key: 'tp-v1p', stageKey: 'st-audio', kind: 'chart-reading', from: 'V1.7', to: 'B+1', expected: { ohms: 250000 }, tolerancePct: 20, conditions: {}, valueSource: 'service-data' },
    ],
  };
}

export function summary(over: Partial<TemplateSummary> = {}): TemplateSummary {
  return {
    id: 11,
    maker: 'Quillmere Radio Co.',
    model: 'Wren 3',
    chassisNumber: 'QW-3',
    kind: 'table-radio',
    power: 'ac-dc',
    yearFrom: 1951,
    yearTo: 1953,
    owner: { id: 7, name: 'Ada Voss' },
    authorName: 'Ada Voss',
    own: false,
    visibility: 'public',
    latestVersion: 2,
    versionCount: 2,
    stageCount: 1,
    testPointCount: 3,
    componentCount: 3,
    surveyCount: 4,
    tubeTypes: ['12AV6'],
    copiedFrom: null,
    updatedAt: '2026-03-01T10:00:00Z',
    ...over,
  };
}

export function view(over: Partial<TemplateView> = {}): TemplateView {
  return {
    ...summary(over),
    createdAt: '2026-01-10T10:00:00Z',
    canEdit: false,
    versions: [
      { number: 2, state: 'published', changelog: 'R2 tolerance from the sheet', publishedAt: '2026-03-01T10:00:00Z', publishedBy: { id: 7, name: 'Ada Voss' }, retiredAt: null, retiredReason: null, stageCount: 1, testPointCount: 3, componentCount: 3 },
      { number: 1, state: 'published', changelog: 'First', publishedAt: '2026-02-01T10:00:00Z', publishedBy: { id: 7, name: 'Ada Voss' }, retiredAt: null, retiredReason: null, stageCount: 1, testPointCount: 3, componentCount: 3 },
    ],
    ...over,
  };
}
