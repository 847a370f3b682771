/** Drizzle queries of the chassis templates: each takes `db` or a transaction `tx`. */
import { and, asc, count, desc, eq, exists, ilike, inArray, isNotNull, ne, or, sql, type SQL } from 'drizzle-orm';
import { chassisTemplates, templateCorrections, templateShares, templateVersions, tubeTypes, users, type CorrectionState, type CorrectionTarget, type TemplateVisibility } from '../../schema/index';
import type { BaseName, Heating, TemplateDocument, TubePin, TubeTypeRecord } from '../domain/template-format';
import type { Tx } from '../db';

const escapeLike = (s: string) => s.replace(/[\\%_]/g, (c) => '\\' + c);

// ---------------------------------------------------------------------------------------------
// Tube types, as the chassis network needs them

/** The whole records (pins, ties, heater) of the named tube types that exist, by designation. */
export async function tubeTypeRecords(tx: Tx, designations: string[]): Promise<Map<string, TubeTypeRecord>> {
  if (designations.length === 0) return new Map();
  const rows = await tx
    .select({ designation: tubeTypes.designation, base: tubeTypes.base, heating: tubeTypes.heating, heaterVolts: tubeTypes.heaterVolts, heaterAmps: tubeTypes.heaterAmps, pins: tubeTypes.pins, ties: tubeTypes.ties, notes: tubeTypes.notes })
    .from(tubeTypes)
    .where(inArray(tubeTypes.designation, designations));
  return new Map(
    rows.map((r) => [
      r.designation,
      { designation: r.designation, base: r.base as BaseName, heating: r.heating as Heating, heaterVolts: r.heaterVolts, heaterAmps: r.heaterAmps, pins: r.pins as TubePin[], ties: r.ties as [number, number][], notes: r.notes },
    ]),
  );
}

// ---------------------------------------------------------------------------------------------
// Templates

export type TemplateInsert = typeof chassisTemplates.$inferInsert;

export async function insertTemplate(tx: Tx, values: TemplateInsert): Promise<number> {
  const [row] = await tx.insert(chassisTemplates).values(values).returning({ id: chassisTemplates.id });
  return row.id;
}

const templateColumns = {
  id: chassisTemplates.id,
  ownerId: chassisTemplates.ownerId,
  ownerName: users.name,
  maker: chassisTemplates.maker,
  model: chassisTemplates.model,
  chassisNumber: chassisTemplates.chassisNumber,
  kind: chassisTemplates.kind,
  power: chassisTemplates.power,
  yearFrom: chassisTemplates.yearFrom,
  yearTo: chassisTemplates.yearTo,
  visibility: chassisTemplates.visibility,
  revision: chassisTemplates.revision,
  copiedFromTemplateId: chassisTemplates.copiedFromTemplateId,
  copiedFromVersionNumber: chassisTemplates.copiedFromVersionNumber,
  originAuthorName: chassisTemplates.originAuthorName,
  tubeTypes: chassisTemplates.tubeTypes,
  stageCount: chassisTemplates.stageCount,
  testPointCount: chassisTemplates.testPointCount,
  componentCount: chassisTemplates.componentCount,
  latestPublishedNumber: chassisTemplates.latestPublishedNumber,
  versionCount: chassisTemplates.versionCount,
  surveyCount: chassisTemplates.surveyCount,
  createdAt: chassisTemplates.createdAt,
  updatedAt: chassisTemplates.updatedAt,
};
export type TemplateRow = NonNullable<Awaited<ReturnType<typeof findTemplate>>>;

/** One template with its owner's name; `lock` takes the row lock for the rest of the transaction. */
export async function findTemplate(tx: Tx, id: number, lock = false) {
  const q = tx.select(templateColumns).from(chassisTemplates).innerJoin(users, eq(users.id, chassisTemplates.ownerId)).where(eq(chassisTemplates.id, id));
  const [row] = lock ? await q.for('update', { of: chassisTemplates }) : await q;
  return row;
}

export async function isSharedWith(tx: Tx, templateId: number, userId: number): Promise<boolean> {
  const [row] = await tx
    .select({ id: templateShares.id })
    .from(templateShares)
    .where(and(eq(templateShares.templateId, templateId), eq(templateShares.userId, userId)));
  return row !== undefined;
}

export async function sharesOf(tx: Tx, templateId: number) {
  return tx
    .select({ id: users.id, name: users.name })
    .from(templateShares)
    .innerJoin(users, eq(users.id, templateShares.userId))
    .where(eq(templateShares.templateId, templateId))
    .orderBy(asc(users.name), asc(users.id));
}

export async function replaceShares(tx: Tx, templateId: number, visibility: TemplateVisibility, userIds: number[]) {
  await tx.delete(templateShares).where(eq(templateShares.templateId, templateId));
  if (userIds.length) await tx.insert(templateShares).values(userIds.map((userId) => ({ templateId, userId })));
  await tx.update(chassisTemplates).set({ visibility, updatedAt: sql`now()` }).where(eq(chassisTemplates.id, templateId));
}

/** Active users among the ids. */
export async function activeUsers(tx: Tx, ids: number[]) {
  if (!ids.length) return [];
  return tx.select({ id: users.id, name: users.name }).from(users).where(and(inArray(users.id, ids), eq(users.active, true)));
}

export async function setRevision(tx: Tx, templateId: number, revision: number) {
  await tx.update(chassisTemplates).set({ revision, updatedAt: sql`now()` }).where(eq(chassisTemplates.id, templateId));
}

/**
 * Copies the library columns from the "library version" (newest published, else newest retired,
 * else the draft) and recomputes the version figures.
 */
export async function refreshLibrary(tx: Tx, templateId: number) {
  await tx.execute(sql`
    UPDATE chassis_templates t SET
      maker = v.content->'chassis'->>'maker',
      model = v.content->'chassis'->>'model',
      chassis_number = v.content->'chassis'->>'chassisNumber',
      kind = (v.content->'chassis'->>'kind')::chassis_kind,
      power = (v.content->'chassis'->>'power')::power_arrangement,
      year_from = (v.content->'chassis'->>'yearFrom')::integer,
      year_to = (v.content->'chassis'->>'yearTo')::integer,
      tube_types = v.tube_types,
      stage_count = v.stage_count,
      test_point_count = v.test_point_count,
      component_count = v.component_count,
      latest_published_number = (SELECT max(number) FROM template_versions x WHERE x.template_id = t.id AND x.state = 'published'),
      version_count = (SELECT count(*) FROM template_versions x WHERE x.template_id = t.id AND x.state <> 'draft'),
      search_text = lower(concat_ws(' ',
        v.content->'chassis'->>'maker', v.content->'chassis'->>'model', v.content->'chassis'->>'chassisNumber',
        (SELECT string_agg(e, ' ') FROM jsonb_array_elements_text(v.content->'chassis'->'variants') e),
        array_to_string(v.tube_types, ' '),
        (SELECT u.name FROM users u WHERE u.id = t.owner_id))),
      updated_at = now()
    FROM (
      SELECT * FROM template_versions
      WHERE template_id = ${templateId}
      ORDER BY CASE state WHEN 'published' THEN 0 WHEN 'retired' THEN 1 ELSE 2 END, number DESC NULLS LAST
      LIMIT 1
    ) v
    WHERE t.id = ${templateId}`);
}

// ---------------------------------------------------------------------------------------------
// The library

export interface LibraryFilter {
  viewerId: number;
  /** Admins read everything. */
  all: boolean;
  q?: string;
  maker?: string;
  model?: string;
  chassis?: string;
  tubeType?: string;
  kind?: string;
  author?: string;
  sort: 'use' | 'maker' | 'model' | 'updated';
  page: number;
  pageSize: number;
}

export async function listLibrary(tx: Tx, f: LibraryFilter) {
  const t = chassisTemplates;
  const where: (SQL | undefined)[] = [];
  if (!f.all) {
    const sharedWithMe = exists(
      tx
        .select({ one: sql`1` })
        .from(templateShares)
        .where(and(eq(templateShares.templateId, t.id), eq(templateShares.userId, f.viewerId))),
    );
    // Someone else's template shows once something is published.
    where.push(or(eq(t.ownerId, f.viewerId), and(isNotNull(t.latestPublishedNumber), or(eq(t.visibility, 'public'), and(eq(t.visibility, 'shared'), sharedWithMe)))));
  }
  if (f.q) where.push(ilike(t.searchText, `%${escapeLike(f.q.toLowerCase())}%`));
  if (f.maker) where.push(ilike(t.maker, `%${escapeLike(f.maker)}%`));
  if (f.model) where.push(ilike(t.model, `%${escapeLike(f.model)}%`));
  if (f.chassis) where.push(ilike(t.chassisNumber, `%${escapeLike(f.chassis)}%`));
  if (f.tubeType) where.push(sql`${t.tubeTypes} @> ARRAY[${f.tubeType.toUpperCase()}]::text[]`);
  if (f.kind) where.push(sql`${t.kind} = ${f.kind}`);
  if (f.author) where.push(ilike(users.name, `%${escapeLike(f.author)}%`));
  const cond = and(...where);
  const orderBy =
    f.sort === 'use'
      ? [desc(t.surveyCount), desc(t.id)]
      : f.sort === 'updated'
        ? [desc(t.updatedAt), desc(t.id)]
        : f.sort === 'maker'
          ? [asc(t.maker), asc(t.model), asc(t.id)]
          : [asc(t.model), asc(t.maker), asc(t.id)];
  const [items, [{ total }]] = await Promise.all([
    tx
      .select(templateColumns)
      .from(t)
      .innerJoin(users, eq(users.id, t.ownerId))
      .where(cond)
      .orderBy(...orderBy)
      .limit(f.pageSize)
      .offset((f.page - 1) * f.pageSize),
    tx.select({ total: count() }).from(t).innerJoin(users, eq(users.id, t.ownerId)).where(cond),
  ]);
  return { items, total };
}

// ---------------------------------------------------------------------------------------------
// Versions

export interface Derived {
  tubeTypes: string[];
  stageCount: number;
  testPointCount: number;
  componentCount: number;
}

const versionColumns = {
  id: templateVersions.id,
  templateId: templateVersions.templateId,
  state: templateVersions.state,
  number: templateVersions.number,
  revision: templateVersions.revision,
  changelog: templateVersions.changelog,
  publishedAt: templateVersions.publishedAt,
  publishedBy: templateVersions.publishedBy,
  retiredAt: templateVersions.retiredAt,
  retiredReason: templateVersions.retiredReason,
  stageCount: templateVersions.stageCount,
  testPointCount: templateVersions.testPointCount,
  componentCount: templateVersions.componentCount,
  updatedAt: templateVersions.updatedAt,
};
const withContent = { ...versionColumns, content: templateVersions.content };
export type VersionRow = NonNullable<Awaited<ReturnType<typeof findDraft>>>;

export async function findDraft(tx: Tx, templateId: number) {
  const [row] = await tx
    .select(withContent)
    .from(templateVersions)
    .where(and(eq(templateVersions.templateId, templateId), eq(templateVersions.state, 'draft')));
  return row;
}

export async function findVersion(tx: Tx, templateId: number, number: number) {
  const [row] = await tx
    .select(withContent)
    .from(templateVersions)
    .where(and(eq(templateVersions.templateId, templateId), eq(templateVersions.number, number)));
  return row;
}

/** The newest published or retired version (what a new draft starts from). */
export async function latestSnapshot(tx: Tx, templateId: number) {
  const [row] = await tx
    .select(withContent)
    .from(templateVersions)
    .where(and(eq(templateVersions.templateId, templateId), ne(templateVersions.state, 'draft')))
    .orderBy(desc(templateVersions.number))
    .limit(1);
  return row;
}

/** Published and retired versions, newest first, with the publisher's name (no content). */
export async function listVersions(tx: Tx, templateId: number) {
  return tx
    .select({ ...versionColumns, publishedByName: users.name })
    .from(templateVersions)
    .leftJoin(users, eq(users.id, templateVersions.publishedBy))
    .where(and(eq(templateVersions.templateId, templateId), ne(templateVersions.state, 'draft')))
    .orderBy(desc(templateVersions.number));
}

export async function insertDraft(tx: Tx, templateId: number, content: TemplateDocument, revision: number, d: Derived) {
  await tx.insert(templateVersions).values({ templateId, state: 'draft', content, revision, ...d });
}

export async function updateDraft(tx: Tx, id: number, content: TemplateDocument, revision: number, d: Derived) {
  await tx
    .update(templateVersions)
    .set({ content, revision, ...d, updatedAt: sql`now()` })
    .where(and(eq(templateVersions.id, id), eq(templateVersions.state, 'draft')));
}

export async function deleteDraft(tx: Tx, id: number) {
  await tx.delete(templateVersions).where(and(eq(templateVersions.id, id), eq(templateVersions.state, 'draft')));
}

export async function nextNumber(tx: Tx, templateId: number): Promise<number> {
  const [row] = await tx
    .select({ n: sql<number>`coalesce(max(${templateVersions.number}), 0) + 1` })
    .from(templateVersions)
    .where(eq(templateVersions.templateId, templateId));
  return Number(row.n);
}

export async function insertPublished(tx: Tx, v: { templateId: number; number: number; content: unknown; revision: number; changelog: string; publishedBy: number } & Derived) {
  const [row] = await tx
    .insert(templateVersions)
    .values({ ...v, state: 'published', publishedAt: sql`now()` })
    .returning({ id: templateVersions.id });
  return row.id;
}

export async function retireVersion(tx: Tx, id: number, by: number, reason: string) {
  await tx.update(templateVersions).set({ state: 'retired', retiredAt: sql`now()`, retiredBy: by, retiredReason: reason, updatedAt: sql`now()` }).where(eq(templateVersions.id, id));
}

// ---------------------------------------------------------------------------------------------
// Corrections

const correctionColumns = {
  id: templateCorrections.id,
  templateId: templateCorrections.templateId,
  versionNumber: templateCorrections.versionNumber,
  targetKind: templateCorrections.targetKind,
  targetKey: templateCorrections.targetKey,
  change: templateCorrections.change,
  note: templateCorrections.note,
  authorId: templateCorrections.authorId,
  authorName: users.name,
  state: templateCorrections.state,
  decisionNote: templateCorrections.decisionNote,
  decidedAt: templateCorrections.decidedAt,
  createdAt: templateCorrections.createdAt,
};
export type CorrectionRow = NonNullable<Awaited<ReturnType<typeof findCorrection>>>;

export async function insertCorrection(
  tx: Tx,
  v: { templateId: number; versionId: number; versionNumber: number; targetKind: CorrectionTarget; targetKey: string; change: Record<string, unknown>; note: string; authorId: number },
): Promise<number> {
  const [row] = await tx.insert(templateCorrections).values(v).returning({ id: templateCorrections.id });
  return row.id;
}

export async function findCorrection(tx: Tx, templateId: number, id: number, lock = false) {
  const q = tx
    .select(correctionColumns)
    .from(templateCorrections)
    .leftJoin(users, eq(users.id, templateCorrections.authorId))
    .where(and(eq(templateCorrections.templateId, templateId), eq(templateCorrections.id, id)));
  const [row] = lock ? await q.for('update', { of: templateCorrections }) : await q;
  return row;
}

/** Corrections of a template, newest first; only those of `authorId` when given. */
export async function listCorrections(tx: Tx, templateId: number, authorId: number | null) {
  return tx
    .select(correctionColumns)
    .from(templateCorrections)
    .leftJoin(users, eq(users.id, templateCorrections.authorId))
    .where(and(eq(templateCorrections.templateId, templateId), authorId !== null ? eq(templateCorrections.authorId, authorId) : undefined))
    .orderBy(desc(templateCorrections.createdAt), desc(templateCorrections.id));
}

export async function decideCorrection(tx: Tx, id: number, state: Exclude<CorrectionState, 'open'>, by: number, note: string | null) {
  await tx.update(templateCorrections).set({ state, decidedBy: by, decidedAt: sql`now()`, decisionNote: note }).where(eq(templateCorrections.id, id));
}
