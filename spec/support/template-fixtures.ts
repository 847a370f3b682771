/**
 * Templates and tube types for the API specs, made through the real use cases (own rows: each
 * tube type gets a unique designation, each template a fresh owner unless one is given).
 *
 * The sample chassis is invented: one audio stage around a 7-pin miniature duplex-diode triode
 * (pinout as the common 12AV6 — grid 1, cathode 2, heater 3-4, diode plates 5 and 6, plate 7 —
 * from memory, check against a tube manual), a 10 MΩ grid leak, a 250 kΩ plate load to B+1 and a
 * coupling capacitor.
 */
import { randomBytes } from 'node:crypto';
import type { Role } from '../../schema/index';
import * as corrections from '../../api/templates/corrections.use-cases';
import * as templates from '../../api/templates/templates.use-cases';
import type { TemplateDocument, TubePin } from '../../api/domain/template-format';
import { createTubeType } from '../../api/tube-types/tube-types.use-cases';
import { apiEnv, makeUser } from './api-env';

export const TRIODE_PINS: TubePin[] = [
  { pin: 1, electrode: 'g', label: 'grid' },
  { pin: 2, electrode: 'k', label: 'cathode' },
  { pin: 3, electrode: 'h', label: 'heater' },
  { pin: 4, electrode: 'h', label: 'heater' },
  { pin: 5, electrode: 'd', label: 'diode plate 1' },
  { pin: 6, electrode: 'd', label: 'diode plate 2' },
  { pin: 7, electrode: 'p', label: 'plate' },
];

export const uniqueDesignation = () => `SPEC-${randomBytes(4).toString('hex').toUpperCase()}`;

/** A tube type of the spec's own (7-pin miniature, 12.6 V 0.15 A heater), created by `by`. */
export async function makeTubeType(by?: number, pins: TubePin[] = TRIODE_PINS): Promise<string> {
  const env = await apiEnv();
  const creator = by ?? (await makeUser(['author'])).id;
  const designation = uniqueDesignation();
  await createTubeType({ db: env.database.db }, { id: creator, roles: ['author'] }, { designation, base: 'miniature-7', heating: 'indirect', heaterVolts: 12.6, heaterAmps: 0.15, pins });
  return designation;
}

/** The sample document (fixed keys) around a socket of tube type `tube`. */
export function sampleDocument(tube: string, maker = 'Quillmere Radio Co.', model = 'Wren 3'): TemplateDocument {
  const base = { tolerancePct: 10, ratedWatts: 0.5, ratedVolts: null, voltsAcross: null, critical: null, fuseRole: false, mainsSide: false, nonLinear: false, valueSource: 'service-data' as const, capacitor: null, note: '', wiper: null };
  return {
    format: 'driftmark-template',
    formatVersion: 1,
    chassis: {
      maker,
      model,
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
    stages: [{ key: 'st-audio', name: 'Detector and first audio', sockets: [{ key: 'so-v1', designator: 'V1', tubeType: tube }] }],
    junctions: [{ name: 'B+1', note: 'second filter output' }],
    components: [
      { ...base, key: 'c-r1', ref: 'R1', kind: 'carbon-composition', stageKey: 'st-audio', nodes: ['V1.1', 'chassis'], nominal: { ohms: 10e6, text: '10M' }, tolerancePct: 20 },
      { ...base, key: 'c-r2', ref: 'R2', kind: 'carbon-composition', stageKey: 'st-audio', nodes: ['V1.7', 'B+1'], nominal: { ohms: 250000, text: '250k' }, voltsAcross: 45 },
      {
        ...base,
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
    ],
    testPoints: [
      { key: 'tp-r1', stageKey: 'st-audio', kind: 'component-check', componentKey: 'c-r1' },
      { key: 'tp-r2', stageKey: 'st-audio', kind: 'component-check', componentKey: 'c-r2' },
      { key: 'tp-v1p', stageKey: 'st-audio', kind: 'chart-reading', from: 'V1.7', to: 'B+1', expected: { ohms: 250000 }, tolerancePct: 20, conditions: {}, valueSource: 'service-data' },
    ],
  };
}

let sharedTube: Promise<string> | null = null;
/** One tube type for the many templates a spec makes. */
export const specTube = () => (sharedTube ??= makeTubeType());

export interface MadeTemplate {
  id: number;
  ownerId: number;
  tube: string;
  doc: TemplateDocument;
}

/**
 * A template owned by `ownerId` (a fresh author when absent): `published` versions published
 * (each a small change of R2's tolerance), then optionally a changed draft, a visibility and an
 * open correction sent by `correctionBy`.
 */
export async function makeTemplate(
  opts: { ownerId?: number; ownerRoles?: Role[]; published?: number; changedDraft?: boolean; visibility?: 'private' | 'public'; correctionBy?: number; maker?: string; model?: string } = {},
): Promise<MadeTemplate & { correctionId?: number }> {
  const env = await apiEnv();
  const deps = { db: env.database.db };
  const ownerId = opts.ownerId ?? (await makeUser(['author'])).id;
  const owner = { id: ownerId, roles: opts.ownerRoles ?? (['author'] as Role[]) };
  const tube = await specTube();
  const doc = sampleDocument(tube, opts.maker, opts.model);
  const t = await templates.createTemplate(deps, owner, { document: doc });
  let revision = t.revision!;
  for (let n = 1; n <= (opts.published ?? 0); n++) {
    if (n > 1) revision = (await templates.saveDraft(deps, owner, t.id, { revision, content: withR2Tolerance(doc, 10 - n) })).revision;
    revision = (await templates.publish(deps, owner, t.id, `Version ${n}`)).revision!;
  }
  if (opts.changedDraft) await templates.saveDraft(deps, owner, t.id, { revision, content: withR2Tolerance(doc, 1) });
  if (opts.visibility && opts.visibility !== 'private') await templates.share(deps, owner, t.id, { visibility: opts.visibility, userIds: [] });
  let correctionId: number | undefined;
  if (opts.correctionBy !== undefined) {
    const by = { id: opts.correctionBy, roles: ['technician'] as Role[] };
    correctionId = (await corrections.proposeCorrection(deps, opts.correctionBy === ownerId ? owner : by, t.id, { versionNumber: 1, target: { kind: 'component', key: 'c-r2' }, change: { tolerancePct: 5 }, note: 'Sheet says 5 %.' })).id;
  }
  return { id: t.id, ownerId, tube, doc, correctionId };
}

/** The document with R2's tolerance changed (a small, valid edit). */
export function withR2Tolerance(doc: TemplateDocument, pct: number): TemplateDocument {
  const out = structuredClone(doc);
  out.components[1].tolerancePct = pct;
  return out;
}
