/**
 * Sets (DESIGN.md §2 "set"): one physical radio or amplifier following a chassis template, with
 * its deviations from the template, tube records per socket and sharing.
 *
 * Object-level access: the owner, the users the set is shared with, and admins see and edit a
 * set; anyone else gets a 404. Sharing is the owner's or an admin's (403 for a shared-with user).
 */
import { randomBytes } from 'node:crypto';
import { and, asc, eq, inArray, sql } from 'drizzle-orm';
import { chassisTemplates, setShares, sets, tubeRecords, users } from '../../schema/index';
import type { JobStatus, PersonRef, RestorationLevel, SetDeviation, SetDetail, SetInput, SetSummary, SurveySummary, TubeRecord, TubeStatus } from '../domain/set-format';
import type { TemplateDocument } from '../domain/template-format';
import type { Db, Tx } from '../db';
import { AppError, badRequest, conflict, forbidden } from '../http/errors';
import { inTurn, surveySummaries } from '../surveys/survey-view';
import { findVersion } from '../templates/templates.repository';
import { visible as visibleTemplate } from '../templates/templates.use-cases';
import { editableSet, SET_FROM, SET_SELECT, setRowOf, visibleCondition, visibleSet, type Actor, type SetAccess, type SetRow } from './sets.repository';

type Deps = { db: Db };

const escapeLike = (s: string) => s.replace(/[\\%_]/g, (c) => '\\' + c);

// ---------------------------------------------------------------------------------------------
// Shapes

type Extra = { surveyCount: number; lastSurvey: SetSummary['lastSurvey']; openLiftedLeads: number };

function summaryOf(s: SetRow, viewer: Actor, extra: Extra): SetSummary {
  return {
    id: s.id,
    label: s.label,
    accessionNumber: s.accessionNumber,
    customer: s.customer,
    jobStatus: s.jobStatus as JobStatus,
    serial: s.serial,
    restorationLevel: s.restorationLevel as RestorationLevel,
    template: { id: s.template.id, maker: s.template.maker, model: s.template.model, chassisNumber: s.template.chassisNumber, power: s.template.power, hotChassis: s.template.hotChassis },
    owner: { id: s.ownerId, name: s.ownerName },
    sharedWithMe: s.ownerId !== viewer.id,
    surveyCount: extra.surveyCount,
    lastSurvey: extra.lastSurvey,
    openLiftedLeads: extra.openLiftedLeads,
    firstPowerAt: s.firstPowerAt?.toISOString() ?? null,
    updatedAt: s.updatedAt.toISOString(),
  };
}

/** The set's own surveys only: class surveys of a training set are the class's (never counted or listed here). */
const EXTRA_SELECT = sql`
  (SELECT count(*)::int FROM surveys sv WHERE sv.set_id = s.id AND sv.assignment_id IS NULL) AS survey_count,
  (SELECT json_build_object('id', sv.id, 'state', sv.state, 'purpose', sv.purpose, 'startedAt', sv.created_at)
     FROM surveys sv WHERE sv.set_id = s.id AND sv.assignment_id IS NULL ORDER BY sv.created_at DESC, sv.id DESC LIMIT 1) AS last_survey,
  (SELECT count(*)::int FROM lifted_leads ll WHERE ll.set_id = s.id AND ll.resoldered_at IS NULL) AS open_lifted_leads`;

type RawExtra = { survey_count: number; last_survey: { id: number; state: string; purpose: string; startedAt: string } | null; open_lifted_leads: number };
const extraOf = (r: RawExtra): Extra => ({
  surveyCount: r.survey_count,
  lastSurvey: r.last_survey ? { id: r.last_survey.id, state: r.last_survey.state as never, purpose: r.last_survey.purpose as never, startedAt: new Date(r.last_survey.startedAt).toISOString() } : null,
  openLiftedLeads: r.open_lifted_leads,
});

// ---------------------------------------------------------------------------------------------
// Reading

export interface ListQuery {
  q?: string;
  status?: JobStatus;
  page: number;
  pageSize: number;
}

export async function listSets(ctx: Deps, actor: Actor, q: ListQuery): Promise<{ items: SetSummary[]; total: number; page: number; pageSize: number }> {
  const where = [visibleCondition(actor)];
  const text = q.q?.trim();
  if (text) {
    const like = `%${escapeLike(text)}%`;
    where.push(sql`(s.label ILIKE ${like} OR s.serial ILIKE ${like} OR s.accession_number ILIKE ${like} OR s.customer ILIKE ${like} OR t.maker ILIKE ${like} OR t.model ILIKE ${like})`);
  }
  if (q.status) where.push(sql`s.job_status = ${q.status}`);
  const r = await ctx.db.execute<Parameters<typeof setRowOf>[0] & RawExtra & { total: number }>(sql`
    SELECT ${SET_SELECT(actor.id)}, ${EXTRA_SELECT}, count(*) OVER ()::int AS total
    FROM ${SET_FROM}
    WHERE ${sql.join(where, sql` AND `)}
    ORDER BY s.updated_at DESC, s.id DESC
    LIMIT ${q.pageSize} OFFSET ${(q.page - 1) * q.pageSize}`);
  let total = r.rows[0]?.total ?? 0;
  if (r.rows.length === 0 && q.page > 1) {
    const c = await ctx.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM ${SET_FROM} WHERE ${sql.join(where, sql` AND `)}`);
    total = c.rows[0].n;
  }
  return { items: r.rows.map((row) => summaryOf(setRowOf(row), actor, extraOf(row))), total, page: q.page, pageSize: q.pageSize };
}

async function extraOfSet(tx: Tx, setId: number): Promise<Extra> {
  const r = await tx.execute<RawExtra>(sql`SELECT ${EXTRA_SELECT} FROM sets s WHERE s.id = ${setId}`);
  return extraOf(r.rows[0]);
}

async function tubeRecordsOf(tx: Tx, setId: number): Promise<TubeRecord[]> {
  const rows = await tx
    .select({ r: tubeRecords, name: users.name })
    .from(tubeRecords)
    .leftJoin(users, eq(users.id, tubeRecords.recordedBy))
    .where(eq(tubeRecords.setId, setId))
    .orderBy(asc(tubeRecords.socketKey));
  return rows.map(({ r, name }) => tubeRecordOf(r, name));
}

function tubeRecordOf(r: typeof tubeRecords.$inferSelect, name: string | null): TubeRecord {
  return {
    socketKey: r.socketKey,
    status: r.status as TubeStatus,
    foundType: r.foundType,
    testResult: r.testResult,
    note: r.note,
    recordedBy: r.recordedBy === null ? null : { id: r.recordedBy, name: name ?? '' },
    updatedAt: r.updatedAt.toISOString(),
  };
}

async function sharedWithOf(tx: Tx, setId: number): Promise<PersonRef[]> {
  return tx
    .select({ id: users.id, name: users.name })
    .from(setShares)
    .innerJoin(users, eq(users.id, setShares.userId))
    .where(eq(setShares.setId, setId))
    .orderBy(asc(users.name), asc(users.id));
}

/** SetDetail of a set the caller may see. */
export async function setDetailOf(tx: Tx, actor: Actor, a: SetAccess, parallel = false): Promise<SetDetail> {
  const s = a.set;
  const steps = [() => extraOfSet(tx, s.id), () => tubeRecordsOf(tx, s.id), () => sharedWithOf(tx, s.id), () => surveySummaries(tx, s)] as const;
  const [extra, tubes, sharedWith, surveys] = (parallel ? await Promise.all(steps.map((f) => f())) : await inTurn(steps)) as [Extra, TubeRecord[], PersonRef[], SurveySummary[]];
  return {
    ...summaryOf(s, actor, extra),
    condition: s.condition,
    complaint: s.complaint,
    intakeNotes: s.intakeNotes,
    deviations: s.deviations,
    tubeRecords: tubes,
    sharedWith,
    surveys,
    latestPublishedVersion: s.template.latestPublishedNumber,
    version: s.version,
    createdAt: s.createdAt.toISOString(),
  };
}

export async function getSet(ctx: Deps, actor: Actor, id: number): Promise<SetDetail> {
  return setDetailOf(ctx.db, actor, await visibleSet(ctx.db, actor, id), true);
}

// ---------------------------------------------------------------------------------------------
// Writing

/** The template's newest published document, for checking deviations and sockets. */
export async function latestDocument(tx: Tx, templateId: number, latestPublishedNumber: number | null): Promise<TemplateDocument | null> {
  if (latestPublishedNumber === null) return null;
  const v = await findVersion(tx, templateId, latestPublishedNumber);
  return (v?.content as TemplateDocument | undefined) ?? null;
}

/** Checks deviations against the template (componentKey exists, one deviation per component, keys unique); fills missing keys. */
export function checkDeviations(deviations: readonly (Omit<SetDeviation, 'key' | 'tolerancePct' | 'note'> & Partial<SetDeviation>)[], doc: TemplateDocument): SetDeviation[] {
  const components = new Map(doc.components.map((c) => [c.key, c]));
  const keys = new Set<string>();
  const parts = new Set<string>();
  return deviations.map((d, i) => {
    const c = components.get(d.componentKey);
    if (!c) throw badRequest(`"deviations[${i}].componentKey": the template has no component ${d.componentKey}.`, `deviations[${i}].componentKey`, 'validation');
    if (c.kind === 'wire') throw badRequest(`"deviations[${i}].componentKey": ${c.ref} is a wire link, which has no value to deviate.`, `deviations[${i}].componentKey`, 'validation');
    if (parts.has(d.componentKey)) throw badRequest(`"deviations[${i}].componentKey": ${c.ref} already has a deviation.`, `deviations[${i}].componentKey`, 'validation');
    parts.add(d.componentKey);
    const key = d.key ?? `dv-${randomBytes(6).toString('hex')}`;
    if (keys.has(key)) throw badRequest(`"deviations[${i}].key" is used twice.`, `deviations[${i}].key`, 'validation');
    keys.add(key);
    return { key, kind: d.kind, componentKey: d.componentKey, nominal: d.nominal, tolerancePct: d.tolerancePct ?? null, note: d.note ?? '' };
  });
}

/** A template the caller may build a set on: visible to them (else 400 on templateId) and published (else 409). */
async function usableTemplate(tx: Tx, actor: Actor, templateId: number): Promise<{ id: number; latestPublishedNumber: number }> {
  let t;
  try {
    t = (await visibleTemplate(tx, actor, templateId)).t;
  } catch (e) {
    if (e instanceof AppError && e.status === 404) throw badRequest(`"templateId": there is no template ${templateId} you can see.`, 'templateId', 'validation');
    throw e;
  }
  if (t.latestPublishedNumber === null) throw conflict('This template has no published version yet: a set follows a published version.', 'template-not-published');
  return { id: t.id, latestPublishedNumber: t.latestPublishedNumber };
}

const text = (v: string | undefined) => (v === undefined ? undefined : v.trim());

export async function createSet(ctx: Deps, actor: Actor, input: SetInput): Promise<SetDetail> {
  return ctx.db.transaction(async (tx) => {
    const t = await usableTemplate(tx, actor, input.templateId);
    const doc = await latestDocument(tx, t.id, t.latestPublishedNumber);
    const deviations = input.deviations?.length ? checkDeviations(input.deviations, doc!) : [];
    const [row] = await tx
      .insert(sets)
      .values({
        ownerId: actor.id,
        templateId: t.id,
        label: input.label.trim(),
        accessionNumber: text(input.accessionNumber) ?? '',
        customer: text(input.customer) ?? '',
        jobStatus: input.jobStatus ?? 'intake',
        serial: text(input.serial) ?? '',
        restorationLevel: input.restorationLevel ?? 'repair',
        condition: input.condition ?? '',
        complaint: input.complaint ?? '',
        intakeNotes: input.intakeNotes ?? '',
        deviations,
      })
      .returning({ id: sets.id });
    return setDetailOf(tx, actor, await visibleSet(tx, actor, row.id));
  });
}

export type SetPatch = Partial<SetInput> & { version: number };

export async function updateSet(ctx: Deps, actor: Actor, id: number, patch: SetPatch): Promise<SetDetail> {
  return ctx.db.transaction(async (tx) => {
    const a = await editableSet(tx, actor, id);
    const s = a.set;
    if (s.version !== patch.version) throw conflict(`This set was changed since you opened it (version ${s.version}, yours ${patch.version}).`, 'stale-version', { currentVersion: s.version });
    let templateId = s.templateId;
    let latest = s.template.latestPublishedNumber;
    if (patch.templateId !== undefined && patch.templateId !== s.templateId) {
      const [{ n }] = (await tx.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM surveys WHERE set_id = ${id}`)).rows;
      if (n > 0) throw conflict('This set has surveys: its template cannot change (start a new set, or record the differences as deviations).', 'set-has-surveys');
      const t = await usableTemplate(tx, actor, patch.templateId);
      templateId = t.id;
      latest = t.latestPublishedNumber;
    }
    let deviations: SetDeviation[] | undefined;
    if (patch.deviations !== undefined) {
      const doc = await latestDocument(tx, templateId, latest);
      deviations = patch.deviations.length ? checkDeviations(patch.deviations, doc!) : [];
    } else if (templateId !== s.templateId && s.deviations.length) {
      const doc = await latestDocument(tx, templateId, latest);
      deviations = checkDeviations(s.deviations, doc!);
    }
    await tx
      .update(sets)
      .set({
        templateId,
        ...(patch.label !== undefined ? { label: patch.label.trim() } : {}),
        ...(patch.accessionNumber !== undefined ? { accessionNumber: patch.accessionNumber.trim() } : {}),
        ...(patch.customer !== undefined ? { customer: patch.customer.trim() } : {}),
        ...(patch.jobStatus !== undefined ? { jobStatus: patch.jobStatus } : {}),
        ...(patch.serial !== undefined ? { serial: patch.serial.trim() } : {}),
        ...(patch.restorationLevel !== undefined ? { restorationLevel: patch.restorationLevel } : {}),
        ...(patch.condition !== undefined ? { condition: patch.condition } : {}),
        ...(patch.complaint !== undefined ? { complaint: patch.complaint } : {}),
        ...(patch.intakeNotes !== undefined ? { intakeNotes: patch.intakeNotes } : {}),
        ...(deviations !== undefined ? { deviations } : {}),
        version: s.version + 1,
        updatedAt: sql`now()`,
      })
      .where(eq(sets.id, id));
    return setDetailOf(tx, actor, await visibleSet(tx, actor, id));
  });
}

/** PUT /api/sets/:id/sharing: the owner or an admin names the users the set is shared with. */
export async function shareSet(ctx: Deps, actor: Actor, id: number, body: { userIds: number[] }): Promise<SetDetail> {
  return ctx.db.transaction(async (tx) => {
    const a = await editableSet(tx, actor, id);
    if (!a.owner && !a.admin) throw forbidden("Only the set's owner (or an admin) may change who it is shared with.", 'not-owner');
    const ids = [...new Set(body.userIds)].filter((u) => u !== a.set.ownerId);
    if (ids.length) {
      const found = await tx.select({ id: users.id }).from(users).where(and(inArray(users.id, ids), eq(users.active, true)));
      const known = new Set(found.map((u) => u.id));
      const i = body.userIds.findIndex((u) => u !== a.set.ownerId && !known.has(u));
      if (i >= 0) throw badRequest(`"userIds[${i}]": there is no active user ${body.userIds[i]}.`, `userIds[${i}]`, 'validation');
    }
    await tx.delete(setShares).where(eq(setShares.setId, id));
    if (ids.length) await tx.insert(setShares).values(ids.map((userId) => ({ setId: id, userId })));
    await tx.update(sets).set({ updatedAt: sql`now()` }).where(eq(sets.id, id));
    return setDetailOf(tx, actor, await visibleSet(tx, actor, id));
  });
}

export interface TubeRecordInput {
  status: TubeStatus;
  foundType?: string;
  testResult?: string;
  note?: string;
}

/** PUT /api/sets/:id/tube-records/:socketKey: the current record of one socket (the socket must exist in the template). */
export async function putTubeRecord(ctx: Deps, actor: Actor, id: number, socketKey: string, input: TubeRecordInput): Promise<TubeRecord> {
  return ctx.db.transaction(async (tx) => {
    const a = await editableSet(tx, actor, id);
    const doc = await latestDocument(tx, a.set.templateId, a.set.template.latestPublishedNumber);
    const socket = doc?.stages.flatMap((st) => st.sockets).find((so) => so.key === socketKey);
    if (!socket) throw new AppError(404, 'not-found', `The set's template has no socket ${socketKey}.`);
    if (input.status === 'wrong-type' && !input.foundType?.trim()) throw badRequest('"foundType": name the type found in the socket (status wrong-type).', 'foundType', 'validation');
    const values = { status: input.status, foundType: input.foundType?.trim() ?? '', testResult: input.testResult?.trim() ?? '', note: input.note ?? '', recordedBy: actor.id };
    const [row] = await tx
      .insert(tubeRecords)
      .values({ setId: id, socketKey, ...values })
      .onConflictDoUpdate({ target: [tubeRecords.setId, tubeRecords.socketKey], set: { ...values, updatedAt: sql`now()` } })
      .returning();
    await tx.update(sets).set({ updatedAt: sql`now()` }).where(eq(sets.id, id));
    const [u] = await tx.select({ name: users.name }).from(users).where(eq(users.id, actor.id));
    return tubeRecordOf(row, u?.name ?? null);
  });
}

/** Counts a survey started on the template (the library's "most used" sort). */
export async function countSurveyOnTemplate(tx: Tx, templateId: number): Promise<void> {
  await tx.update(chassisTemplates).set({ surveyCount: sql`${chassisTemplates.surveyCount} + 1` }).where(eq(chassisTemplates.id, templateId));
}
