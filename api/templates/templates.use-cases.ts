/**
 * Chassis templates: creation and import, the draft (optimistic revisions), publishing immutable
 * versions, retiring, copies crediting their origin, sharing, diffs and the canonical export.
 *
 * Object-level access is decided here: the owner does everything; an admin reads everything;
 * others read what sharing allows (someone else's private template is a 404) and may copy it or
 * send a correction; a write that only the owner may do is a 403 for anyone else who can see it.
 */
import type { Role } from '../../schema/index';
import type { TemplateVisibility } from '../../schema/index';
import { checkCapacitors } from '../domain/capacitor-checks';
import { assembleNetwork } from '../domain/chassis-network';
import { TEMPLATE_FORMAT, TEMPLATE_FORMAT_VERSION, hotChassisFor, type ChassisInfo, type TemplateDocument, type TemplateProblem } from '../domain/template-format';
import { disagreementsOf, templateNetwork } from '../domain/template-network';
import type { Db, Tx } from '../db';
import { AppError, badRequest, conflict, forbidden, notFound } from '../http/errors';
import { problemsError } from '../tube-types/tube-types.use-cases';
import { canonicalDocument, canonicalJson, sameDocument } from './canonical';
import { diffDocuments } from './template-diff';
import { ruleProblems, tubeTypesOf } from './template-rules';
import { shapeProblems } from './template-schema';
import * as repo from './templates.repository';

export interface Actor {
  id: number;
  roles: readonly Role[];
}
type Deps = { db: Db };

// ---------------------------------------------------------------------------------------------
// Documents

/** A warning about a document that checks out: it is saved, and the warning returned beside it. */
export interface TemplateWarning extends TemplateProblem {
  code: string;
  values?: Record<string, unknown>;
}

const CHART_DISAGREES = 'chart reading disagrees with the network beyond its tolerance — an error in the template or in the service data';

/**
 * Every problem of a document (shape first; the domain rules only on a well-shaped one; then the
 * chassis network's errors that the rules do not report at the same path), and — only when there
 * is none — the warnings: the network's (a heater at its hot V/I), the capacitor list's rule
 * checks, and the chart readings that disagree with the network.
 */
export async function documentCheck(tx: Tx, doc: unknown, prefix = ''): Promise<{ problems: TemplateProblem[]; warnings: TemplateWarning[] }> {
  const shape = shapeProblems(doc, prefix);
  if (shape.length) return { problems: shape, warnings: [] };
  const d = doc as TemplateDocument;
  const tubes = await repo.tubeTypeRecords(tx, tubeTypesOf(d));
  const problems = ruleProblems(d, tubes, prefix);
  const at = (path: string) => (prefix ? `${prefix}.${path}` : path);
  const taken = new Set(problems.map((p) => p.path));
  const network = [...assembleNetwork(d, tubes, { tubesIn: true }).problems, ...assembleNetwork(d, tubes, { tubesIn: false }).problems];
  const seen = new Set<string>();
  const warnings: TemplateWarning[] = [];
  for (const p of network) {
    // A tube type's own tie problem is the library's, not the document's: warn at no document path.
    const path = p.path.startsWith('tubeTypes.') ? p.path : at(p.path);
    if (seen.has(`${path} ${p.message}`)) continue;
    seen.add(`${path} ${p.message}`);
    if (p.severity === 'error' && !p.path.startsWith('tubeTypes.')) {
      if (!taken.has(path)) problems.push({ path, message: p.message });
    } else warnings.push({ path, code: 'network', message: p.message });
  }
  if (problems.length) return { problems, warnings: [] };
  for (const f of checkCapacitors(d, tubes)) warnings.push({ path: at(f.path), code: `capacitor-${f.code}`, message: f.message, values: { ...f.values, severity: f.severity } });
  for (const x of disagreementsOf(templateNetwork(d, tubes))) {
    warnings.push({
      path: at(x.path),
      code: 'chart-disagrees',
      message: `${CHART_DISAGREES}: ${x.message}`,
      values: { printed: x.printed, networkOhms: x.networkOhms, deviationPct: x.deviationPct, tolerancePct: x.tolerancePct },
    });
  }
  return { problems, warnings };
}

/** Every problem of a document (see documentCheck); warnings aside. */
export async function documentProblems(tx: Tx, doc: unknown, prefix = ''): Promise<TemplateProblem[]> {
  return (await documentCheck(tx, doc, prefix)).problems;
}

async function checkDocument(tx: Tx, doc: unknown, prefix = ''): Promise<{ doc: TemplateDocument; warnings: TemplateWarning[] }> {
  const { problems, warnings } = await documentCheck(tx, doc, prefix);
  if (problems.length) throw problemsError(problems, 'The template');
  return { doc: canonicalDocument(doc as TemplateDocument), warnings };
}

export function derivedOf(doc: TemplateDocument): repo.Derived {
  return { tubeTypes: tubeTypesOf(doc), stageCount: doc.stages.length, testPointCount: doc.testPoints.length, componentCount: doc.components.length };
}

export type NewChassis = Pick<ChassisInfo, 'maker' | 'model' | 'kind' | 'power'> & Partial<ChassisInfo>;

/** A new, empty document for a chassis (stages, components and test points come later). */
export function emptyDocument(c: NewChassis): TemplateDocument {
  return {
    format: TEMPLATE_FORMAT,
    formatVersion: TEMPLATE_FORMAT_VERSION,
    chassis: {
      maker: c.maker.trim(),
      model: c.model.trim(),
      chassisNumber: c.chassisNumber?.trim() ?? '',
      variants: c.variants ?? [],
      yearFrom: c.yearFrom ?? null,
      yearTo: c.yearTo ?? null,
      kind: c.kind,
      power: c.power,
      hotChassis: c.hotChassis ?? hotChassisFor(c.power),
      hazardNotes: c.hazardNotes ?? '',
      sources: c.sources ?? [],
    },
    conditions: { tubesIn: true, speakerConnected: true, controls: '' },
    stages: [],
    junctions: [],
    components: [],
    testPoints: [],
  };
}

// ---------------------------------------------------------------------------------------------
// Access

export interface Access {
  t: repo.TemplateRow;
  owner: boolean;
  admin: boolean;
}

export async function visible(tx: Tx, actor: Actor, id: number, lock = false): Promise<Access> {
  const t = await repo.findTemplate(tx, id, lock);
  const owner = t?.ownerId === actor.id;
  const admin = actor.roles.includes('admin');
  if (!t) throw notFound('No such template.');
  if (owner || admin || t.visibility === 'public' || (t.visibility === 'shared' && (await repo.isSharedWith(tx, id, actor.id)))) return { t, owner, admin };
  throw notFound('No such template.');
}

export function ownerOnly(a: Access, what: string): void {
  if (!a.owner) throw forbidden(`Only the template's owner may ${what}.`, 'not-owner');
}

// ---------------------------------------------------------------------------------------------
// Reading

function versionShape(v: Awaited<ReturnType<typeof repo.listVersions>>[number]) {
  return {
    number: v.number!,
    state: v.state,
    changelog: v.changelog,
    publishedAt: v.publishedAt?.toISOString() ?? null,
    publishedBy: v.publishedBy !== null ? { id: v.publishedBy, name: v.publishedByName ?? '' } : null,
    retiredAt: v.retiredAt?.toISOString() ?? null,
    retiredReason: v.retiredReason,
    stageCount: v.stageCount,
    testPointCount: v.testPointCount,
    componentCount: v.componentCount,
  };
}

export function summaryOf(t: repo.TemplateRow, viewerId: number) {
  return {
    id: t.id,
    maker: t.maker,
    model: t.model,
    chassisNumber: t.chassisNumber,
    kind: t.kind,
    power: t.power,
    yearFrom: t.yearFrom,
    yearTo: t.yearTo,
    owner: { id: t.ownerId, name: t.ownerName },
    authorName: t.ownerName,
    own: t.ownerId === viewerId,
    visibility: t.visibility,
    latestVersion: t.latestPublishedNumber,
    versionCount: t.versionCount,
    stageCount: t.stageCount,
    testPointCount: t.testPointCount,
    componentCount: t.componentCount,
    surveyCount: t.surveyCount,
    tubeTypes: t.tubeTypes,
    copiedFrom: t.originAuthorName !== null ? { templateId: t.copiedFromTemplateId, versionNumber: t.copiedFromVersionNumber, authorName: t.originAuthorName } : null,
    updatedAt: t.updatedAt.toISOString(),
  };
}

export async function listLibrary(ctx: Deps, actor: Actor, q: Omit<repo.LibraryFilter, 'viewerId' | 'all'>) {
  const r = await repo.listLibrary(ctx.db, { ...q, q: q.q?.trim() || undefined, viewerId: actor.id, all: actor.roles.includes('admin') });
  return { items: r.items.map((t) => summaryOf(t, actor.id)), total: r.total, page: q.page, pageSize: q.pageSize };
}

export async function getTemplate(ctx: Deps, actor: Actor, id: number) {
  return templateView(ctx.db, actor, await visible(ctx.db, actor, id));
}

export async function templateView(tx: Tx, actor: Actor, a: Access) {
  const versions = await repo.listVersions(tx, a.t.id);
  const draft = a.owner || a.admin ? await repo.findDraft(tx, a.t.id) : undefined;
  return {
    ...summaryOf(a.t, actor.id),
    createdAt: a.t.createdAt.toISOString(),
    canEdit: a.owner,
    revision: a.owner || a.admin ? a.t.revision : undefined,
    draft: a.owner || a.admin ? (draft ? { revision: draft.revision, updatedAt: draft.updatedAt.toISOString() } : null) : undefined,
    sharedWith: a.owner || a.admin ? await repo.sharesOf(tx, a.t.id) : undefined,
    versions: versions.map(versionShape),
  };
}

/** The draft, or (none yet) the content a new draft starts from, with the revision to send back. */
export async function getDraft(ctx: Deps, actor: Actor, id: number) {
  const a = await visible(ctx.db, actor, id);
  if (!a.owner && !a.admin) throw forbidden("Only the template's owner works on its draft.", 'not-owner');
  return draftView(ctx.db, a.t);
}

async function draftView(tx: Tx, t: repo.TemplateRow) {
  const draft = await repo.findDraft(tx, t.id);
  const base = draft ? undefined : await repo.latestSnapshot(tx, t.id);
  return {
    templateId: t.id,
    exists: draft !== undefined,
    revision: t.revision,
    basedOn: draft ? null : (base?.number ?? null),
    content: canonicalDocument((draft ?? base)!.content as TemplateDocument),
  };
}

export type VersionRef = number | 'draft';

/** A version's content by number, or the draft (owner and admin only). */
async function contentOf(tx: Tx, a: Access, ref: VersionRef, field: string): Promise<TemplateDocument> {
  if (ref === 'draft') {
    if (!a.owner && !a.admin) throw forbidden("Only the template's owner sees its draft.", 'not-owner');
    const d = await repo.findDraft(tx, a.t.id);
    if (!d) throw notFound(`This template has no draft (${field}).`);
    return d.content as TemplateDocument;
  }
  const v = await repo.findVersion(tx, a.t.id, ref);
  if (!v) throw notFound(`This template has no version ${ref} (${field}).`);
  return v.content as TemplateDocument;
}

export async function getVersion(ctx: Deps, actor: Actor, id: number, ref: VersionRef) {
  const a = await visible(ctx.db, actor, id);
  if (ref === 'draft') {
    if (!a.owner && !a.admin) throw forbidden("Only the template's owner works on its draft.", 'not-owner');
    return draftView(ctx.db, a.t);
  }
  const v = await repo.findVersion(ctx.db, id, ref);
  if (!v) throw notFound(`This template has no version ${ref}.`);
  const [listed] = (await repo.listVersions(ctx.db, id)).filter((x) => x.number === ref);
  return { templateId: id, ...versionShape(listed), content: canonicalDocument(v.content as TemplateDocument) };
}

export async function diffVersions(ctx: Deps, actor: Actor, id: number, from: VersionRef, to: VersionRef) {
  const a = await visible(ctx.db, actor, id);
  const before = await contentOf(ctx.db, a, from, 'from');
  const after = await contentOf(ctx.db, a, to, 'to');
  return { templateId: id, from, to, ...diffDocuments(before, after) };
}

/**
 * The in-circuit expectation of every test point of a version (or the owner's draft): per test
 * point key the expected reading (null = open), the parallel paths and any chart disagreement,
 * from one factorization per condition set (api/domain/template-network.ts).
 */
export async function versionNetwork(ctx: Deps, actor: Actor, id: number, ref: VersionRef) {
  const a = await visible(ctx.db, actor, id);
  const doc = await contentOf(ctx.db, a, ref, 'version');
  const answer = templateNetwork(doc, await repo.tubeTypeRecords(ctx.db, tubeTypesOf(doc)));
  return { templateId: id, version: ref, ...answer };
}

/** The canonical export: the document only (no ids, no timestamps), keys in canonical order. */
export async function exportVersion(ctx: Deps, actor: Actor, id: number, ref: VersionRef | undefined) {
  const a = await visible(ctx.db, actor, id);
  let chosen: VersionRef;
  if (ref !== undefined) chosen = ref;
  else if (a.t.latestPublishedNumber !== null) chosen = a.t.latestPublishedNumber;
  else if (a.owner || a.admin) chosen = 'draft';
  else throw notFound('This template has no published version to export.');
  const doc = await contentOf(ctx.db, a, chosen, 'version');
  const slug = `${doc.chassis.maker}-${doc.chassis.model}`
    .normalize('NFKD')
    .replace(/[^A-Za-z0-9]+/g, '-')
    .replace(/^-|-$/g, '')
    .toLowerCase()
    .slice(0, 80);
  return { filename: `${slug || 'template'}-${chosen === 'draft' ? 'draft' : `v${chosen}`}.driftmark.json`, text: canonicalJson(doc) };
}

// ---------------------------------------------------------------------------------------------
// Creating, importing, copying

async function createWith(tx: Tx, ownerId: number, doc: TemplateDocument, origin: Pick<repo.TemplateInsert, 'copiedFromTemplateId' | 'copiedFromVersionId' | 'copiedFromVersionNumber' | 'originAuthorName'> = {}) {
  const c = doc.chassis;
  const id = await repo.insertTemplate(tx, {
    ownerId,
    maker: c.maker,
    model: c.model,
    chassisNumber: c.chassisNumber,
    kind: c.kind,
    power: c.power,
    yearFrom: c.yearFrom,
    yearTo: c.yearTo,
    visibility: 'private',
    revision: 1,
    ...origin,
  });
  await repo.insertDraft(tx, id, doc, 1, derivedOf(doc));
  await repo.refreshLibrary(tx, id);
  return id;
}

/** A new template and its first draft, from a chassis or a whole document (checked first). */
export async function createTemplate(ctx: Deps, actor: Actor, input: { chassis: NewChassis } | { document: unknown }) {
  return ctx.db.transaction(async (tx) => {
    const { doc } = 'document' in input ? await checkDocument(tx, input.document, 'document') : await checkDocument(tx, emptyDocument(input.chassis));
    const id = await createWith(tx, actor.id, doc);
    return templateView(tx, actor, await visible(tx, actor, id));
  });
}

/** A private copy of a version (or of the owner's draft): keys kept, origin and author credited. */
export async function copyTemplate(ctx: Deps, actor: Actor, id: number, ref: VersionRef) {
  return ctx.db.transaction(async (tx) => {
    const a = await visible(tx, actor, id);
    const doc = await contentOf(tx, a, ref, 'version');
    const version = ref === 'draft' ? undefined : await repo.findVersion(tx, id, ref);
    const copyId = await createWith(tx, actor.id, canonicalDocument(doc), {
      copiedFromTemplateId: id,
      copiedFromVersionId: version?.id ?? null,
      copiedFromVersionNumber: version?.number ?? null,
      originAuthorName: a.t.ownerName,
    });
    return templateView(tx, actor, await visible(tx, actor, copyId));
  });
}

// ---------------------------------------------------------------------------------------------
// The draft and its versions

const staleRevision = (yours: number, current: number) =>
  conflict(`The draft has changed since you loaded it (your revision ${yours}, now ${current}): reload it and apply your change again.`, 'stale-revision', {
    yourRevision: yours,
    currentRevision: current,
  });

/** Writes the draft (creating it from the latest version when there is none) at the next revision. */
export async function writeDraft(tx: Tx, t: repo.TemplateRow, doc: TemplateDocument): Promise<number> {
  const revision = t.revision + 1;
  const draft = await repo.findDraft(tx, t.id);
  if (draft) await repo.updateDraft(tx, draft.id, doc, revision, derivedOf(doc));
  else await repo.insertDraft(tx, t.id, doc, revision, derivedOf(doc));
  await repo.setRevision(tx, t.id, revision);
  await repo.refreshLibrary(tx, t.id);
  return revision;
}

export async function saveDraft(ctx: Deps, actor: Actor, id: number, body: { revision: number; content: unknown }) {
  return ctx.db.transaction(async (tx) => {
    const a = await visible(tx, actor, id, true);
    ownerOnly(a, 'edit its draft');
    const { doc, warnings } = await checkDocument(tx, body.content, 'content');
    if (body.revision !== a.t.revision) throw staleRevision(body.revision, a.t.revision);
    await writeDraft(tx, a.t, doc);
    return { ...(await draftView(tx, (await repo.findTemplate(tx, id))!)), warnings };
  });
}

/** Published and retired versions never change: an edit addressed to one is a conflict. */
export async function saveVersion(ctx: Deps, actor: Actor, id: number, ref: VersionRef, body: { revision: number; content: unknown }) {
  if (ref === 'draft') return saveDraft(ctx, actor, id, body);
  const a = await visible(ctx.db, actor, id);
  ownerOnly(a, 'edit its versions');
  const v = await repo.findVersion(ctx.db, id, ref);
  if (!v) throw notFound(`This template has no version ${ref}.`);
  throw conflict(`Version ${ref} is ${v.state}: its content never changes. Edit the draft and publish a new version.`, 'version-immutable', { state: v.state });
}

export async function publish(ctx: Deps, actor: Actor, id: number, changelog: string) {
  return ctx.db.transaction(async (tx) => {
    const a = await visible(tx, actor, id, true);
    ownerOnly(a, 'publish it');
    const draft = await repo.findDraft(tx, id);
    if (!draft) throw conflict('There is no draft to publish: edit the template first.', 'no-draft');
    const last = await repo.latestSnapshot(tx, id);
    if (last && sameDocument(last.content as TemplateDocument, draft.content as TemplateDocument))
      throw conflict(`The draft equals version ${last.number}: there is nothing new to publish.`, 'unchanged', { versionNumber: last.number });
    // Tube types may have changed since the draft was saved: the snapshot must still hold.
    const problems = await documentProblems(tx, draft.content, 'draft');
    if (problems.length) throw new AppError(409, 'draft-invalid', `The draft no longer checks out: "${problems[0].path}" ${problems[0].message}`, { field: problems[0].path, problems });
    const doc = canonicalDocument(draft.content as TemplateDocument);
    const number = await repo.nextNumber(tx, id);
    await repo.insertPublished(tx, { templateId: id, number, content: doc, revision: draft.revision, changelog: changelog.trim(), publishedBy: actor.id, ...derivedOf(doc) });
    await repo.deleteDraft(tx, draft.id);
    await repo.setRevision(tx, id, a.t.revision + 1);
    await repo.refreshLibrary(tx, id);
    return templateView(tx, actor, await visible(tx, actor, id));
  });
}

export async function retire(ctx: Deps, actor: Actor, id: number, number: number, reason: string) {
  return ctx.db.transaction(async (tx) => {
    const a = await visible(tx, actor, id, true);
    ownerOnly(a, 'retire its versions');
    const v = await repo.findVersion(tx, id, number);
    if (!v) throw notFound(`This template has no version ${number}.`);
    if (v.state === 'retired') throw conflict(`Version ${number} is retired already.`, 'already-retired');
    await repo.retireVersion(tx, v.id, actor.id, reason.trim());
    await repo.refreshLibrary(tx, id);
    return templateView(tx, actor, await visible(tx, actor, id));
  });
}

// ---------------------------------------------------------------------------------------------
// Sharing

export async function share(ctx: Deps, actor: Actor, id: number, body: { visibility: TemplateVisibility; userIds: number[] }) {
  return ctx.db.transaction(async (tx) => {
    const a = await visible(tx, actor, id, true);
    ownerOnly(a, 'change who sees it');
    if (body.visibility === 'shared' && body.userIds.length === 0) throw badRequest('Name at least one user to share with (or choose private or public).', 'userIds');
    if (body.visibility !== 'shared' && body.userIds.length > 0) throw badRequest(`A ${body.visibility} template is shared with nobody by name: send an empty userIds.`, 'userIds');
    const self = body.userIds.indexOf(actor.id);
    if (self >= 0) throw badRequest('You own this template already.', `userIds[${self}]`);
    const found = new Set((await repo.activeUsers(tx, body.userIds)).map((u) => u.id));
    const missing = body.userIds.findIndex((u) => !found.has(u));
    if (missing >= 0) throw badRequest(`No active user ${body.userIds[missing]}.`, `userIds[${missing}]`);
    await repo.replaceShares(tx, id, body.visibility, body.userIds);
    return { templateId: id, visibility: body.visibility, sharedWith: await repo.sharesOf(tx, id) };
  });
}
