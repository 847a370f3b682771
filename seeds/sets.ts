/**
 * Demo sets (issue #5): an invented scenario on the three demo templates.
 *   (1) "Kestrel 5" AC/DC table set of a private collector, surveyed three times over six years:
 *       the AVC filter and the oscillator grid leak drift up; the plate load went out of band in
 *       2022, was replaced, and reads new in 2025.
 *   (2) "Larkspur 7-P" console in a shop, mid-survey: the oscillator grid leak read low in
 *       circuit (a leaky capacitor across it), a lead was lifted and the follow-up reading taken;
 *       the lead is not yet re-soldered.
 *   (3) "QA-10" amplifier of a small museum, surveyed, capacitors replaced by policy, gates
 *       signed, first power recorded with a bring-up log, and a provenance label printed.
 *
 * Readings are what the meter would show: the chassis network with the drifted values (as set
 * deviations fed to the survey grid), rounded to three figures with a small reading scatter.
 * Names, owners and accession numbers are fictional.
 */
import { createHash, randomBytes } from 'node:crypto';
import { and, count, eq, sql } from 'drizzle-orm';
import type { Db } from '../api/db';
import { FIRST_POWER_KEY, gateItemsFor } from '../api/domain/gates';
import type { MeterProfile } from '../api/domain/meter';
import { formatCode } from '../api/domain/notation';
import type { SetDeviation, SurveyConditions } from '../api/domain/set-format';
import { parseReadingText, SurveyGrid } from '../api/domain/survey-grid';
import type { TemplateDocument, TubeTypeRecord } from '../api/domain/template-format';
import { DEFAULT_RULE, type AcceptanceRule } from '../api/domain/verdict';
import type { Method, SurveyPurpose, SurveyState } from '../api/domain/words';
import {
  bringUpEntries,
  chassisTemplates,
  gateSignatures,
  liftedLeads,
  meterProfiles,
  partsRecord,
  provenanceLabels,
  readings,
  sets,
  surveys,
  templateVersions,
  tubeTypes,
  users,
} from '../schema/index';

/** The demo technician's bench meter: a 2000-count digital meter (invented figures, typical of the class). */
export const DEMO_DIGITAL_METER: MeterProfile = {
  kind: 'digital',
  autorange: true,
  leadOhms: 0.2,
  ranges: [
    { fullScaleOhms: 199.9, resolutionOhms: 0.1, pctOfReading: 0.8, counts: 3 },
    { fullScaleOhms: 1999, resolutionOhms: 1, pctOfReading: 0.8, counts: 2 },
    { fullScaleOhms: 19_990, resolutionOhms: 10, pctOfReading: 0.8, counts: 2 },
    { fullScaleOhms: 199_900, resolutionOhms: 100, pctOfReading: 0.8, counts: 2 },
    { fullScaleOhms: 1_999_000, resolutionOhms: 1000, pctOfReading: 0.8, counts: 2 },
    { fullScaleOhms: 19_990_000, resolutionOhms: 10_000, pctOfReading: 1.2, counts: 3 },
  ],
};

/** An analogue multimeter (centre-scale values of ×1, ×100, ×10 k ranges; 3 % of arc). */
export const DEMO_ANALOGUE_METER: MeterProfile = {
  kind: 'analogue',
  leadOhms: 0.3,
  ranges: [
    { centreOhms: 12, arcFraction: 0.03 },
    { centreOhms: 1200, arcFraction: 0.03 },
    { centreOhms: 120_000, arcFraction: 0.03 },
  ],
};

const TECH_EMAIL = 'tech@driftmark.example';

/** Deterministic scatter in [−1, 1] (a linear congruential generator; demo data stays the same at every seed). */
function scatter(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return (s / 0xffffffff) * 2 - 1;
  };
}

/** What a technician types for a value: three figures in the letter code (`235K`, `2M47`, `R47`). */
export function benchText(ohms: number): string {
  if (ohms < 0.05) return 'short';
  const digits = Math.floor(Math.log10(ohms));
  const rounded = Math.round(ohms / 10 ** (digits - 2)) * 10 ** (digits - 2);
  return formatCode(+rounded.toPrecision(3));
}

export interface PlannedReading {
  testPointKey: string;
  text: string;
  method: Method;
  liftedEnd?: 0 | 1;
  follows?: string;
  note?: string;
  /** Predict-first assignments: what the student predicted before measuring. */
  prediction?: string;
  rangeIndex?: number;
}

/**
 * Readings of every test point of `doc` (or of the given stages) as the meter shows them with the
 * parts at `actual` values (component key → ohms): the survey grid's in-circuit expectation of a
 * network carrying those values, scattered by up to ±`scatterPct` and rounded to three figures.
 */
export function readingsFor(
  doc: TemplateDocument,
  types: readonly TubeTypeRecord[],
  actual: Record<string, number>,
  opts: { seed: number; scatterPct?: number; stages?: string[] },
): PlannedReading[] {
  const deviations: SetDeviation[] = Object.entries(actual).map(([componentKey, ohms], i) => ({ key: `dv-seed-${i}`, kind: 'non-original', componentKey, nominal: { ohms }, tolerancePct: null, note: '' }));
  const grid = new SurveyGrid({ document: doc, tubeTypes: types, deviations, meter: null, rule: DEFAULT_RULE, conditions: conditionsOf(doc) });
  const rnd = scatter(opts.seed);
  const pct = opts.scatterPct ?? 0.6;
  const out: PlannedReading[] = [];
  for (const row of grid.rows) {
    if (opts.stages && !opts.stages.includes(row.stageKey)) continue;
    if (row.kind === 'pair-relation') continue;
    let text: string;
    if (row.inCircuit !== null && row.inCircuit.expectedOhms === null) text = 'open';
    // The meter shows the network plus its own lead resistance.
    else if (row.inCircuit !== null) text = benchText(row.inCircuit.expectedOhms! * (1 + (rnd() * pct) / 100) + DEMO_DIGITAL_METER.leadOhms);
    else if (row.expected !== null && 'state' in row.expected) text = row.expected.state;
    else continue;
    out.push({ testPointKey: row.testPointKey, text, method: 'in-circuit' });
  }
  return out;
}

export function conditionsOf(doc: TemplateDocument, extra: Partial<SurveyConditions> = {}): SurveyConditions {
  return { tubesIn: doc.conditions.tubesIn, speakerConnected: doc.conditions.speakerConnected, controls: doc.conditions.controls, ambientC: 21, note: '', ...extra };
}

export interface DemoTemplate {
  templateId: number;
  versionId: number;
  versionNumber: number;
  doc: TemplateDocument;
}

export async function demoTemplate(db: Db, model: string): Promise<DemoTemplate | null> {
  const [t] = await db.select({ id: chassisTemplates.id, latest: chassisTemplates.latestPublishedNumber }).from(chassisTemplates).where(eq(chassisTemplates.model, model));
  if (!t || t.latest === null) return null;
  const [v] = await db
    .select({ id: templateVersions.id, content: templateVersions.content })
    .from(templateVersions)
    .where(and(eq(templateVersions.templateId, t.id), eq(templateVersions.number, t.latest)));
  return { templateId: t.id, versionId: v.id, versionNumber: t.latest, doc: v.content as TemplateDocument };
}

export const keyOf = (doc: TemplateDocument, ref: string): string => {
  const c = doc.components.find((x) => x.ref === ref);
  if (!c) throw new Error(`demo chassis ${doc.chassis.model} has no ${ref}`);
  return c.key;
};
export const tpOf = (doc: TemplateDocument, ref: string): string => {
  const key = keyOf(doc, ref);
  const tp = doc.testPoints.find((t) => t.kind === 'component-check' && t.componentKey === key);
  if (!tp) throw new Error(`demo chassis ${doc.chassis.model} has no check of ${ref}`);
  return tp.key;
};

let clientKeySeq = 0;
const clientKey = () => `seed${Date.now().toString(36)}${(clientKeySeq++).toString(36)}${randomBytes(6).toString('hex')}`;

export interface SurveyPlan {
  setId: number;
  t: DemoTemplate;
  by: number;
  purpose: SurveyPurpose;
  at: Date;
  meter: { id: number; name: string; profile: MeterProfile; checkDate: string };
  complete: boolean;
  readings: PlannedReading[];
  jointChecks?: string[];
  rule?: AcceptanceRule;
  carriedFrom?: number | null;
  /** Overrides `complete` (class surveys: submitted, returned, accepted). */
  state?: SurveyState;
  assignmentId?: number | null;
  remeasureKeys?: string[] | null;
}

/** Inserts a survey and its readings; returns the survey id and reading ids by test point key (the last one). */
export async function insertSurvey(db: Db, p: SurveyPlan): Promise<{ id: number; readingIds: Map<string, number> }> {
  const at = p.at;
  const jointChecks = Object.fromEntries((p.jointChecks ?? []).map((k) => [k, { by: p.by, at: at.toISOString() }]));
  const [s] = await db
    .insert(surveys)
    .values({
      setId: p.setId,
      templateVersionId: p.t.versionId,
      versionNumber: p.t.versionNumber,
      purpose: p.purpose,
      state: p.state ?? (p.complete ? 'complete' : 'draft'),
      assignmentId: p.assignmentId ?? null,
      remeasureKeys: p.remeasureKeys ?? null,
      meterProfileId: p.meter.id,
      meter: { name: p.meter.name, profile: p.meter.profile, checkDate: p.meter.checkDate },
      rule: p.rule ?? DEFAULT_RULE,
      conditions: conditionsOf(p.t.doc),
      meterCheck: { text: '100K', ohms: 100_000, knownOhms: 100_000, tolerancePct: 0.1, ok: true, message: 'The check resistor reads its known value within the meter’s limits.', at: at.toISOString() },
      carriedFromSurveyId: p.carriedFrom ?? null,
      startedBy: p.by,
      completedAt: p.complete ? new Date(at.getTime() + 3 * 3600_000) : null,
      completedBy: p.complete ? p.by : null,
      jointChecks,
      createdAt: at,
      updatedAt: at,
    })
    .returning({ id: surveys.id });
  const readingIds = new Map<string, number>();
  let minute = 0;
  for (const r of p.readings) {
    const taken = new Date(at.getTime() + (minute += 1) * 60_000);
    const grid = parseForSeed(r.text);
    const [row] = await db
      .insert(readings)
      .values({
        surveyId: s.id,
        testPointKey: r.testPointKey,
        clientKey: clientKey(),
        followsReadingId: r.follows ? (readingIds.get(r.follows) ?? null) : null,
        text: r.text,
        state: grid.state,
        ohms: grid.ohms,
        method: r.method,
        liftedEnd: r.liftedEnd ?? null,
        note: r.note ?? '',
        prediction: r.prediction ?? null,
        rangeIndex: r.rangeIndex ?? null,
        enteredBy: p.by,
        takenAt: taken,
        createdAt: taken,
        updatedAt: taken,
      })
      .returning({ id: readings.id });
    readingIds.set(r.testPointKey, row.id);
  }
  await db
    .update(chassisTemplates)
    .set({ surveyCount: sql`${chassisTemplates.surveyCount} + 1` })
    .where(eq(chassisTemplates.id, p.t.templateId));
  return { id: s.id, readingIds };
}

function parseForSeed(text: string): { state: ReturnType<typeof parseReadingText>['state']; ohms: number | null } {
  const p = parseReadingText(text, DEMO_DIGITAL_METER);
  return { state: p.state, ohms: p.ohms };
}

/**
 * Seeds the demo sets when there are none and the demo technician and templates exist. Returns how
 * many sets were made.
 */
export async function seedDemoSets(db: Db): Promise<number> {
  const [{ n }] = await db.select({ n: count() }).from(sets);
  if (n > 0) return 0;
  const [tech] = await db.select({ id: users.id }).from(users).where(sql`lower(${users.email}) = ${TECH_EMAIL}`);
  if (!tech) return 0;
  const kestrel = await demoTemplate(db, 'Kestrel 5');
  const larkspur = await demoTemplate(db, 'Larkspur 7-P');
  const quenby = await demoTemplate(db, 'QA-10');
  if (!kestrel || !larkspur || !quenby) return 0;
  const types = (await db.select().from(tubeTypes)).map((t) => ({ ...t, pins: t.pins, ties: t.ties }) as unknown as TubeTypeRecord);

  const [digital] = await db
    .insert(meterProfiles)
    .values({ ownerId: tech.id, name: 'Bench DMM (2000 count)', profile: DEMO_DIGITAL_METER, checkKind: 'check', checkDate: '2026-09-01', checkResistorOhms: 100_000, checkResistorTolerancePct: 0.1 })
    .returning({ id: meterProfiles.id });
  await db
    .insert(meterProfiles)
    .values({ ownerId: tech.id, name: 'Analogue multimeter (field)', profile: DEMO_ANALOGUE_METER, checkKind: 'check', checkDate: '2026-03-15', checkResistorOhms: 1000, checkResistorTolerancePct: 1 });
  const meter = { id: digital.id, name: 'Bench DMM (2000 count)', profile: DEMO_DIGITAL_METER, checkDate: '2026-09-01' };

  // (1) Kestrel 5: three surveys over six years.
  const k = kestrel.doc;
  const [set1] = await db
    .insert(sets)
    .values({
      ownerId: tech.id,
      templateId: kestrel.templateId,
      label: 'Holloway collection',
      accessionNumber: 'HC-0147',
      serial: 'MK52-30418',
      jobStatus: 'done',
      restorationLevel: 'repair',
      condition: 'Cabinet sound, dial glass cracked at the lower left; original line cord perished.',
      complaint: 'Weak and distorted at low volume after warming up.',
      intakeNotes: 'Hot chassis: worked through an isolation transformer throughout.',
      createdAt: new Date('2019-03-14T09:00:00Z'),
      updatedAt: new Date('2025-05-20T15:00:00Z'),
    })
    .returning({ id: sets.id });
  const r7 = keyOf(k, 'R7');
  const r9 = keyOf(k, 'R9');
  const r4 = keyOf(k, 'R4');
  const s1 = await insertSurvey(db, {
    setId: set1.id,
    t: kestrel,
    by: tech.id,
    purpose: 'intake',
    at: new Date('2019-03-14T10:00:00Z'),
    meter,
    complete: true,
    readings: readingsFor(k, types, { [r7]: 2.31e6, [r9]: 236e3, [r4]: 22.6e3 }, { seed: 2019 }),
  });
  const s2 = await insertSurvey(db, {
    setId: set1.id,
    t: kestrel,
    by: tech.id,
    purpose: 'periodic',
    at: new Date('2022-04-02T10:00:00Z'),
    meter,
    complete: true,
    carriedFrom: s1.id,
    readings: readingsFor(k, types, { [r7]: 2.4e6, [r9]: 262e3, [r4]: 23.1e3 }, { seed: 2022 }),
    jointChecks: [tpOf(k, 'R9')],
  });
  await db.insert(partsRecord).values({
    setId: set1.id,
    componentKey: r9,
    componentRef: 'R9',
    action: 'replaced',
    newPart: { text: '220K', ohms: 220e3, uF: null, watts: 0.5, volts: 350, kind: 'metal-film', measuredText: '219K', measuredOhms: 219e3 },
    readingId: s2.readingIds.get(tpOf(k, 'R9')) ?? null,
    reason: '',
    note: 'Plate load 19 % high in circuit with its joints checked; replaced with a ½ W metal film.',
    recordedBy: tech.id,
    createdAt: new Date('2022-04-09T14:00:00Z'),
  });
  await insertSurvey(db, {
    setId: set1.id,
    t: kestrel,
    by: tech.id,
    purpose: 'periodic',
    at: new Date('2025-05-20T10:00:00Z'),
    meter,
    complete: true,
    carriedFrom: s2.id,
    readings: readingsFor(k, types, { [r7]: 2.47e6, [r9]: 221e3, [r4]: 23.5e3 }, { seed: 2025 }),
  });

  // (2) Larkspur 7-P: mid-survey, a lead lifted.
  const l = larkspur.doc;
  const [set2] = await db
    .insert(sets)
    .values({
      ownerId: tech.id,
      templateId: larkspur.templateId,
      label: 'Job 2611 — R. Anselm',
      customer: 'R. Anselm',
      serial: 'L7P-11873',
      jobStatus: 'surveying',
      restorationLevel: 'refurbish',
      condition: 'Complete, dusty; rectifier replaced at some time (5Y3GT of a later make).',
      complaint: 'Dead; hum when first switched on years ago, then nothing.',
      intakeNotes: 'Not powered at intake. Filter can to be replaced by policy.',
      createdAt: new Date('2026-11-24T09:00:00Z'),
      updatedAt: new Date('2026-11-28T16:00:00Z'),
    })
    .returning({ id: sets.id });
  const stageKeys = l.stages.map((s) => s.key);
  const r3 = keyOf(l, 'R3');
  const r3tp = tpOf(l, 'R3');
  // The osc grid leak reads 22 k ∥ 15 k of a leaky capacitor in circuit; on its own leads it reads 22.4 k.
  const planned = readingsFor(l, types, { [r3]: (22.4e3 * 15e3) / (22.4e3 + 15e3) }, { seed: 2611, stages: stageKeys.slice(0, 2) });
  planned.push({ testPointKey: r3tp, text: '22K4', method: 'lead-lifted', liftedEnd: 0, follows: r3tp, note: 'Lead at V1 pin 1 lifted.' });
  const s3 = await insertSurvey(db, { setId: set2.id, t: larkspur, by: tech.id, purpose: 'intake', at: new Date('2026-11-28T13:00:00Z'), meter, complete: false, readings: planned });
  const r3c = l.components.find((c) => c.key === r3)!;
  await db.insert(liftedLeads).values({
    setId: set2.id,
    surveyId: s3.id,
    componentKey: r3,
    componentRef: 'R3',
    end: 0,
    node: r3c.nodes[0],
    promptedByReadingId: null,
    liftedBy: tech.id,
    liftedAt: new Date('2026-11-28T14:10:00Z'),
    note: 'Suspect the 100 pF grid capacitor or the coil; re-solder after the capacitor is checked.',
  });

  // (3) QA-10: complete, capacitors replaced by policy, first power, label.
  const q = quenby.doc;
  const [set3] = await db
    .insert(sets)
    .values({
      ownerId: tech.id,
      templateId: quenby.templateId,
      label: 'Vellmar Museum of Sound',
      accessionNumber: 'VMS 1994.022',
      serial: 'QA10-2207',
      jobStatus: 'done',
      restorationLevel: 'conserve',
      condition: 'Original finish; one output tube replaced in service (date unknown).',
      complaint: 'Display piece; to be demonstrated twice a year.',
      intakeNotes: 'Conserve: keep original resistors in band; electrolytics replaced by policy, originals kept in the accession box.',
      createdAt: new Date('2026-09-29T09:00:00Z'),
      updatedAt: new Date('2026-10-12T15:00:00Z'),
      firstPowerAt: new Date('2026-10-12T10:00:00Z'),
      firstPowerBy: tech.id,
    })
    .returning({ id: sets.id });
  await insertSurvey(db, { setId: set3.id, t: quenby, by: tech.id, purpose: 'intake', at: new Date('2026-10-05T09:30:00Z'), meter, complete: true, readings: readingsFor(q, types, {}, { seed: 1994 }) });
  const electrolytics = q.components.filter((c) => c.kind === 'capacitor' && c.capacitor?.dielectric === 'electrolytic');
  for (const c of electrolytics) {
    await db.insert(partsRecord).values({
      setId: set3.id,
      componentKey: c.key,
      componentRef: c.ref,
      action: 'replaced',
      newPart: { text: `${c.capacitor!.uF} µF`, ohms: null, uF: c.capacitor!.uF, watts: null, volts: Math.max(c.capacitor!.workingVolts, 450), kind: 'electrolytic', measuredText: '', measuredOhms: null },
      readingId: null,
      reason: 'Electrolytic capacitors replaced by policy (age); originals kept in the accession box.',
      note: '',
      recordedBy: tech.id,
      createdAt: new Date('2026-10-08T11:00:00Z'),
    });
  }
  // Every gate item of a transformer set signed the morning of first power, then first power itself.
  const gateItems = gateItemsFor({ power: q.chassis.power, hotChassis: q.chassis.hotChassis });
  await db.insert(gateSignatures).values([
    ...gateItems.map((item, i) => ({ setId: set3.id, itemKey: item.key, action: 'signed', note: '', signedBy: tech.id, createdAt: new Date(Date.UTC(2026, 9, 12, 9, i * 3)) })),
    { setId: set3.id, itemKey: FIRST_POWER_KEY, action: 'signed', note: 'Limiter lamp first, then the variac.', signedBy: tech.id, createdAt: new Date('2026-10-12T10:00:00Z') },
  ]);
  await db.insert(bringUpEntries).values([
    { setId: set3.id, step: 'limiter-lamp', setting: '60 W lamp', mainsVolts: 121, currentAmps: 0.31, bPlus: [{ node: 'B+', volts: 212 }], observations: ['normal'], note: 'Lamp glowed briefly, then dim.', recordedBy: tech.id, createdAt: new Date('2026-10-12T10:05:00Z') },
    { setId: set3.id, step: 'variac', setting: 'variac 80 %', mainsVolts: 97, currentAmps: 0.42, bPlus: [{ node: 'B+', volts: 268 }], observations: ['hum'], note: 'Slight hum with the input open; normal with it shorted.', recordedBy: tech.id, createdAt: new Date('2026-10-12T10:25:00Z') },
    { setId: set3.id, step: 'direct', setting: 'full line', mainsVolts: 120, currentAmps: 0.55, bPlus: [{ node: 'B+', volts: 334 }], observations: ['normal'], note: 'Output into an 8 Ω load; no smell, no hot parts after 30 min.', recordedBy: tech.id, createdAt: new Date('2026-10-12T11:00:00Z') },
  ]);
  const token = randomBytes(24).toString('base64url');
  await db.insert(provenanceLabels).values({ setId: set3.id, tokenHash: createHash('sha256').update(token).digest('hex'), token, createdBy: tech.id, createdAt: new Date('2026-10-12T15:00:00Z') });
  return 3;
}
