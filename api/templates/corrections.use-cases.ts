/**
 * Corrections: anyone who can see a template proposes a change to one component or test point of
 * a version, with a note; the owner accepts (the change goes into the draft, which starts from the
 * latest version when there is none, at the next revision) or declines, with a note.
 */
import type { CorrectionTarget } from '../../schema/index';
import type { Component, TemplateDocument, TemplateProblem, TestPoint } from '../domain/template-format';
import type { Db } from '../db';
import { AppError, badRequest, conflict, notFound } from '../http/errors';
import { problemsError } from '../tube-types/tube-types.use-cases';
import { canonicalDocument, sameDocument } from './canonical';
import { COMPONENT_FIELDS, TEST_POINT_FIELDS } from './template-schema';
import { documentProblems, ownerOnly, visible, writeDraft, type Actor } from './templates.use-cases';
import * as repo from './templates.repository';

type Deps = { db: Db };

export interface CorrectionInput {
  versionNumber: number;
  target: { kind: CorrectionTarget; key: string };
  change: Record<string, unknown>;
  note: string;
}

/** How a person names the target: the component's reference, or the test point's bench position. */
function targetLabel(doc: TemplateDocument | undefined, kind: string, key: string): string {
  if (kind === 'component') return `component ${doc?.components.find((x) => x.key === key)?.ref ?? key}`;
  const i = doc?.testPoints.findIndex((t) => t.key === key) ?? -1;
  return i >= 0 ? `test point ${i + 1}` : `test point ${key}`;
}

function shape(c: repo.CorrectionRow, doc?: TemplateDocument) {
  return {
    targetLabel: targetLabel(doc, c.targetKind, c.targetKey),
    id: c.id,
    templateId: c.templateId,
    versionNumber: c.versionNumber,
    target: { kind: c.targetKind, key: c.targetKey },
    change: c.change as Record<string, unknown>,
    note: c.note,
    author: c.authorId !== null ? { id: c.authorId, name: c.authorName ?? '' } : null,
    state: c.state,
    decisionNote: c.decisionNote,
    decidedAt: c.decidedAt?.toISOString() ?? null,
    createdAt: c.createdAt.toISOString(),
  };
}

/** The document with the change applied to its target, and the target's path; null when the key is not there. */
function applyChange(doc: TemplateDocument, kind: CorrectionTarget, key: string, change: Record<string, unknown>): { doc: TemplateDocument; path: string } | null {
  const out = structuredClone(doc);
  const list = (kind === 'component' ? out.components : out.testPoints) as (Component | TestPoint)[];
  const i = list.findIndex((x) => x.key === key);
  if (i < 0) return null;
  list[i] = { ...list[i], ...change } as Component & TestPoint;
  return { doc: out, path: `${kind === 'component' ? 'components' : 'testPoints'}[${i}]` };
}

/** Problems inside the target read as problems of the proposed change (`change.nominal.text`). */
const asChange = (problems: TemplateProblem[], targetPath: string) =>
  problems.map((p) => (p.path === targetPath ? { ...p, path: 'change' } : p.path.startsWith(`${targetPath}.`) ? { ...p, path: `change${p.path.slice(targetPath.length)}` } : p));

export async function proposeCorrection(ctx: Deps, actor: Actor, id: number, input: CorrectionInput) {
  return ctx.db.transaction(async (tx) => {
    await visible(tx, actor, id);
    const allowed = input.target.kind === 'component' ? COMPONENT_FIELDS : TEST_POINT_FIELDS;
    const wrong = Object.keys(input.change).find((f) => !allowed.includes(f));
    if (wrong) throw badRequest(`"${wrong}" is not a field of a ${input.target.kind}.`, `change.${wrong}`);
    const v = await repo.findVersion(tx, id, input.versionNumber);
    if (!v) throw badRequest(`This template has no version ${input.versionNumber}.`, 'versionNumber');
    const doc = v.content as TemplateDocument;
    const applied = applyChange(doc, input.target.kind, input.target.key, input.change);
    if (!applied) throw badRequest(`Version ${input.versionNumber} has no ${input.target.kind} "${input.target.key}".`, 'target.key');
    const problems = asChange(await documentProblems(tx, applied.doc), applied.path);
    if (problems.length) throw problemsError(problems, 'The correction');
    if (sameDocument(doc, applied.doc)) throw badRequest(`The change equals version ${input.versionNumber} already.`, 'change');
    const cid = await repo.insertCorrection(tx, {
      templateId: id,
      versionId: v.id,
      versionNumber: input.versionNumber,
      targetKind: input.target.kind,
      targetKey: input.target.key,
      change: input.change,
      note: input.note.trim(),
      authorId: actor.id,
    });
    return shape((await repo.findCorrection(tx, id, cid))!, doc);
  });
}

/** The owner (and an admin) sees every correction; anyone else their own. */
export async function listCorrections(ctx: Deps, actor: Actor, id: number) {
  const a = await visible(ctx.db, actor, id);
  const rows = await repo.listCorrections(ctx.db, id, a.owner || a.admin ? null : actor.id);
  // Each correction's target is named in the version it was written against.
  const docs = new Map<number, TemplateDocument | undefined>();
  for (const n of new Set(rows.map((r) => r.versionNumber))) docs.set(n, (await repo.findVersion(ctx.db, id, n))?.content as TemplateDocument | undefined);
  return { items: rows.map((r) => shape(r, docs.get(r.versionNumber))) };
}

export async function decideCorrection(ctx: Deps, actor: Actor, id: number, correctionId: number, body: { decision: 'accept' | 'decline'; note?: string }) {
  return ctx.db.transaction(async (tx) => {
    const a = await visible(tx, actor, id, true);
    ownerOnly(a, 'decide corrections');
    const c = await repo.findCorrection(tx, id, correctionId, true);
    if (!c) throw notFound('No such correction.');
    const against = (await repo.findVersion(tx, id, c.versionNumber))?.content as TemplateDocument | undefined;
    if (c.state !== 'open') throw conflict(`This correction is ${c.state} already.`, 'correction-decided', { state: c.state });
    const note = body.note?.trim() || null;
    if (body.decision === 'decline') {
      await repo.decideCorrection(tx, c.id, 'declined', actor.id, note);
      return { correction: shape((await repo.findCorrection(tx, id, c.id))!, against), draft: null };
    }
    const draft = (await repo.findDraft(tx, id)) ?? (await repo.latestSnapshot(tx, id));
    const applied = applyChange(draft!.content as TemplateDocument, c.targetKind, c.targetKey, c.change as Record<string, unknown>);
    if (!applied) throw conflict(`The draft has no ${c.targetKind} "${c.targetKey}" any more: the correction cannot be applied.`, 'correction-target-gone');
    const problems = await documentProblems(tx, applied.doc);
    if (problems.length)
      throw new AppError(409, 'correction-does-not-apply', `Applied to the draft, the correction leaves a problem: "${problems[0].path}" ${problems[0].message}`, { field: problems[0].path, problems });
    const revision = await writeDraft(tx, a.t, canonicalDocument(applied.doc));
    await repo.decideCorrection(tx, c.id, 'accepted', actor.id, note);
    return { correction: shape((await repo.findCorrection(tx, id, c.id))!, against), draft: { revision } };
  });
}
