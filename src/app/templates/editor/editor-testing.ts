/**
 * A small document for the editor's specs (invented set; values worked by hand in the specs).
 * Not imported by the app.
 */
import type { TemplateDocument, TubeTypeRecord } from '@domain/template-format';

/** A 6AV6 (miniature 7-pin, 7BT basing) — pinout from memory, check against a tube manual. */
export const SIX_AV6: TubeTypeRecord = {
  designation: '6AV6',
  base: 'miniature-7',
  heating: 'indirect',
  heaterVolts: 6.3,
  heaterAmps: 0.3,
  pins: [
    { pin: 1, electrode: 'g', label: 'grid' },
    { pin: 2, electrode: 'k', label: 'cathode' },
    { pin: 3, electrode: 'h', label: 'heater' },
    { pin: 4, electrode: 'h', label: 'heater' },
    { pin: 5, electrode: 'd', label: 'diode plate 2' },
    { pin: 6, electrode: 'd', label: 'diode plate 1' },
    { pin: 7, electrode: 'p', label: 'plate' },
  ],
  ties: [],
  notes: '',
};

export const TUBE_TYPES = new Map([[SIX_AV6.designation, SIX_AV6]]);

/**
 * One stage, one socket V1 (6AV6), three resistors: R1 220 kΩ V1.7–B+1, R2 470 kΩ V1.7–chassis,
 * R3 47 kΩ B+1–chassis; a wire W1 V1.2–chassis; test points: R1 check, chart V1.7 to chassis
 * printed 170 kΩ ±20 %, R2 check.
 */
export function smallDocument(): TemplateDocument {
  const part = (key: string, ref: string, a: string, b: string, ohms: number) => ({
    key,
    ref,
    kind: 'carbon-composition' as const,
    stageKey: 'st-a',
    nodes: [a, b] as [string, string],
    wiper: null,
    nominal: { ohms, text: `${ohms / 1000}k` },
    tolerancePct: 10,
    ratedWatts: 0.5,
    ratedVolts: null,
    voltsAcross: null,
    critical: null,
    fuseRole: false,
    mainsSide: false,
    nonLinear: false,
    valueSource: 'service-data' as const,
    capacitor: null,
    note: '',
  });
  return {
    format: 'driftmark-template',
    formatVersion: 1,
    chassis: {
      maker: 'Orrin Bay Wireless',
      model: 'Tern 3',
      chassisNumber: 'OB-3',
      variants: [],
      yearFrom: 1951,
      yearTo: 1953,
      kind: 'table-radio',
      power: 'transformer',
      hotChassis: false,
      hazardNotes: '',
      sources: [],
    },
    conditions: { tubesIn: true, speakerConnected: true, controls: '' },
    stages: [{ key: 'st-a', name: 'First audio', sockets: [{ key: 'so-a', designator: 'V1', tubeType: '6AV6' }] }],
    junctions: [{ name: 'B+1', note: '' }],
    components: [
      part('c-r1', 'R1', 'V1.7', 'B+1', 220e3),
      part('c-r2', 'R2', 'V1.7', 'chassis', 470e3),
      part('c-r3', 'R3', 'B+1', 'chassis', 47e3),
      { ...part('c-w1', 'W1', 'V1.2', 'chassis', 1), kind: 'wire', nominal: { state: 'short' }, tolerancePct: null },
    ],
    testPoints: [
      { key: 'tp-1', stageKey: 'st-a', kind: 'component-check', componentKey: 'c-r1' },
      { key: 'tp-2', stageKey: 'st-a', kind: 'chart-reading', from: 'V1.7', to: 'chassis', expected: { ohms: 170e3 }, tolerancePct: 20, conditions: {}, valueSource: 'service-data' },
      { key: 'tp-3', stageKey: 'st-a', kind: 'component-check', componentKey: 'c-r2' },
    ],
  };
}
