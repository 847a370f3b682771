/**
 * Bench rows for the API specs (meter profiles, sets, surveys, readings), inserted directly into
 * the database: fast, and independent of the routes under test. Each returns the ids a spec
 * needs. The template behind a set is the sample chassis of ./template-fixtures (test points
 * `tp-r1` — R1 10 MΩ ±20 % grid leak V1.1–chassis, `tp-r2` — R2 250 kΩ ±10 % plate load V1.7–B+1,
 * `tp-v1p` — chart reading V1.7 to B+1, 250 kΩ ±20 %; components `c-r1`, `c-r2`, `c-c1`).
 */
import { eq, sql } from 'drizzle-orm';
import { parseResistance } from '../../api/domain/notation';
import type { MeterProfile } from '../../api/domain/meter';
import type { SetDeviation, SurveyConditions } from '../../api/domain/set-format';
import { DEFAULT_RULE, type AcceptanceRule } from '../../api/domain/verdict';
import type { Method, ReadingState, SurveyPurpose, SurveyState } from '../../api/domain/words';
import { liftedLeads, meterProfiles, readings, setShares, sets, surveys, templateVersions, type Role } from '../../schema/index';
import { apiEnv, makeUser } from './api-env';
import { workedMeter } from './meters';
import { makeTemplate } from './template-fixtures';

export const SAMPLE_CONDITIONS: SurveyConditions = { tubesIn: true, speakerConnected: true, controls: 'volume max', ambientC: 21, note: '' };

export interface MadeMeterProfile {
  id: number;
  ownerId: number;
  profile: MeterProfile;
}

/** A meter profile of `ownerId` (a fresh technician when absent): the worked 2000-count meter, a 10 kΩ ±1 % check resistor. */
export async function makeMeterProfile(
  opts: { ownerId?: number; name?: string; profile?: MeterProfile; checkResistorOhms?: number | null; checkResistorTolerancePct?: number | null; archived?: boolean } = {},
): Promise<MadeMeterProfile> {
  const env = await apiEnv();
  const ownerId = opts.ownerId ?? (await makeUser(['technician'])).id;
  const profile = opts.profile ?? workedMeter({ autorange: true });
  const [row] = await env.database.db
    .insert(meterProfiles)
    .values({
      ownerId,
      name: opts.name ?? 'Bench DMM 2000-count',
      profile,
      checkKind: 'check',
      checkDate: '2026-06-01',
      checkResistorOhms: opts.checkResistorOhms === undefined ? 10_000 : opts.checkResistorOhms,
      checkResistorTolerancePct: opts.checkResistorTolerancePct === undefined ? 1 : opts.checkResistorTolerancePct,
      archived: opts.archived ?? false,
    })
    .returning({ id: meterProfiles.id });
  return { id: row.id, ownerId, profile };
}

export interface MadeSet {
  id: number;
  ownerId: number;
  templateId: number;
  /** The id of the template's version 1 (published). */
  templateVersionId: number;
  tube: string;
}

/**
 * A set owned by `ownerId` (a fresh technician when absent) following a fresh sample template
 * with one published version (owned by the set's owner unless `templateId` is given), optionally
 * shared with `sharedWith`.
 */
export async function makeSet(
  opts: {
    ownerId?: number;
    ownerRoles?: Role[];
    templateId?: number;
    label?: string;
    serial?: string;
    customer?: string;
    accessionNumber?: string;
    jobStatus?: string;
    deviations?: SetDeviation[];
    sharedWith?: number[];
  } = {},
): Promise<MadeSet> {
  const env = await apiEnv();
  const db = env.database.db;
  const ownerId = opts.ownerId ?? (await makeUser(opts.ownerRoles ?? ['technician'])).id;
  let templateId = opts.templateId;
  let tube = '';
  if (templateId === undefined) {
    const t = await makeTemplate({ ownerId, published: 1 });
    templateId = t.id;
    tube = t.tube;
  }
  const [v] = await db
    .select({ id: templateVersions.id, tube: sql<string>`${templateVersions.tubeTypes}[1]` })
    .from(templateVersions)
    .where(sql`${templateVersions.templateId} = ${templateId} and ${templateVersions.state} = 'published'`)
    .orderBy(sql`${templateVersions.number} desc`)
    .limit(1);
  if (!v) throw new Error(`makeSet: template ${templateId} has no published version`);
  const [row] = await db
    .insert(sets)
    .values({
      ownerId,
      templateId,
      label: opts.label ?? 'Bench spec set',
      serial: opts.serial ?? 'SN-4471',
      customer: opts.customer ?? '',
      accessionNumber: opts.accessionNumber ?? '',
      jobStatus: opts.jobStatus ?? 'intake',
      deviations: opts.deviations ?? [],
    })
    .returning({ id: sets.id });
  if (opts.sharedWith?.length) await db.insert(setShares).values(opts.sharedWith.map((userId) => ({ setId: row.id, userId })));
  return { id: row.id, ownerId, templateId, templateVersionId: v.id, tube: tube || v.tube };
}

export interface MadeSurvey {
  id: number;
  setId: number;
  ownerId: number;
  templateId: number;
  templateVersionId: number;
  meterProfileId: number | null;
}

/**
 * A survey of a set (a fresh set of `ownerId`'s when `setId` is absent) against the set's
 * template version 1: draft unless `state` says otherwise, with a meter profile of the owner's
 * (the worked meter) unless `meter: false`.
 */
export async function makeSurvey(
  opts: {
    setId?: number;
    ownerId?: number;
    state?: SurveyState;
    purpose?: SurveyPurpose;
    meter?: boolean;
    meterProfileId?: number;
    rule?: AcceptanceRule;
    conditions?: SurveyConditions;
    createdAt?: Date;
  } = {},
): Promise<MadeSurvey> {
  const env = await apiEnv();
  const db = env.database.db;
  let setId = opts.setId;
  let ownerId: number;
  let templateId: number;
  let templateVersionId: number;
  if (setId === undefined) {
    const s = await makeSet({ ownerId: opts.ownerId });
    setId = s.id;
    ownerId = s.ownerId;
    templateId = s.templateId;
    templateVersionId = s.templateVersionId;
  } else {
    const [s] = await db.select({ ownerId: sets.ownerId, templateId: sets.templateId }).from(sets).where(eq(sets.id, setId));
    ownerId = s.ownerId;
    templateId = s.templateId;
    const [v] = await db
      .select({ id: templateVersions.id })
      .from(templateVersions)
      .where(sql`${templateVersions.templateId} = ${templateId} and ${templateVersions.state} = 'published'`)
      .orderBy(sql`${templateVersions.number} asc`)
      .limit(1);
    templateVersionId = v.id;
  }
  let meterProfileId: number | null = opts.meterProfileId ?? null;
  let meter: { name: string; profile: MeterProfile; checkDate: string | null; checkResistorOhms: number | null; checkResistorTolerancePct: number | null } | null = null;
  if (opts.meter !== false) {
    if (meterProfileId === null) meterProfileId = (await makeMeterProfile({ ownerId })).id;
    const [m] = await db.select().from(meterProfiles).where(eq(meterProfiles.id, meterProfileId));
    meter = { name: m.name, profile: m.profile as MeterProfile, checkDate: m.checkDate, checkResistorOhms: m.checkResistorOhms, checkResistorTolerancePct: m.checkResistorTolerancePct };
  }
  const state = opts.state ?? 'draft';
  const [row] = await db
    .insert(surveys)
    .values({
      setId,
      templateVersionId,
      versionNumber: 1,
      purpose: opts.purpose ?? 'intake',
      state,
      meterProfileId: opts.meter === false ? null : meterProfileId,
      meter,
      rule: opts.rule ?? { ...DEFAULT_RULE },
      conditions: opts.conditions ?? SAMPLE_CONDITIONS,
      startedBy: ownerId,
      completedAt: state === 'complete' ? sql`now()` : null,
      completedBy: state === 'complete' ? ownerId : null,
      ...(opts.createdAt ? { createdAt: opts.createdAt, updatedAt: opts.createdAt } : {}),
    })
    .returning({ id: surveys.id });
  return { id: row.id, setId, ownerId, templateId, templateVersionId, meterProfileId: opts.meter === false ? null : meterProfileId };
}

let keySeq = 0;
/** A client key as the app makes them (16–64 of [A-Za-z0-9_-]). */
export const clientKey = () => `spec${Date.now().toString(36)}${(keySeq++).toString(36)}${Math.random().toString(36).slice(2, 10)}`;

/**
 * A reading of a survey, inserted directly: `text` is parsed by the domain's notation (a state
 * key without text when `state` is given). Returns the reading id.
 */
export async function addReading(
  surveyId: number,
  opts: {
    testPointKey?: string;
    text?: string;
    state?: Exclude<ReadingState, 'value'>;
    method?: Method;
    liftedEnd?: 0 | 1 | null;
    followsReadingId?: number | null;
    rangeIndex?: number | null;
    note?: string;
    enteredBy?: number | null;
    clientKey?: string;
    takenAt?: Date;
  } = {},
): Promise<number> {
  const env = await apiEnv();
  let state: ReadingState;
  let ohms: number | null = null;
  const text = opts.state !== undefined ? (opts.text ?? '') : (opts.text ?? '250k');
  if (opts.state !== undefined) state = opts.state;
  else {
    const p = parseResistance(text);
    if (!p.ok) throw new Error(`addReading: "${text}" does not parse: ${p.message}`);
    state = p.state;
    ohms = p.ohms;
  }
  const [row] = await env.database.db
    .insert(readings)
    .values({
      surveyId,
      testPointKey: opts.testPointKey ?? 'tp-r2',
      clientKey: opts.clientKey ?? clientKey(),
      followsReadingId: opts.followsReadingId ?? null,
      text,
      state,
      ohms,
      method: opts.method ?? 'in-circuit',
      liftedEnd: opts.liftedEnd ?? null,
      rangeIndex: opts.rangeIndex ?? null,
      note: opts.note ?? '',
      enteredBy: opts.enteredBy ?? null,
      ...(opts.takenAt ? { takenAt: opts.takenAt } : {}),
    })
    .returning({ id: readings.id });
  return row.id;
}

/**
 * An open lifted lead of a set (R2's end 1 at B+1 by default), inserted directly. Returns its id.
 */
export async function makeLiftedLead(
  setId: number,
  opts: { surveyId?: number | null; componentKey?: string; componentRef?: string; end?: 0 | 1; node?: string; liftedBy?: number | null; promptedByReadingId?: number | null; resoldered?: boolean } = {},
): Promise<number> {
  const env = await apiEnv();
  const [row] = await env.database.db
    .insert(liftedLeads)
    .values({
      setId,
      surveyId: opts.surveyId ?? null,
      componentKey: opts.componentKey ?? 'c-r2',
      componentRef: opts.componentRef ?? 'R2',
      end: opts.end ?? 1,
      node: opts.node ?? 'B+1',
      liftedBy: opts.liftedBy ?? null,
      promptedByReadingId: opts.promptedByReadingId ?? null,
      ...(opts.resoldered ? { resolderedAt: new Date() } : {}),
    })
    .returning({ id: liftedLeads.id });
  return row.id;
}
