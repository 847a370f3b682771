/**
 * The survey as the grid sees it (GET /api/surveys/:id, SurveyView in api/domain/set-format.ts):
 * the template version's document, the tube types, the set's deviations, the readings and the
 * verdict of each, computed by api/domain/survey-grid.ts — the same module the browser runs.
 *
 * Grids are kept in a small LRU cache keyed by what they are built from (template version, the
 * set's deviations, meter, rule, tubes in), shared by every survey with the same inputs; a survey
 * finds its grid again by (survey id, survey version, set version): its rule, meter and conditions
 * change only with its version, the deviations only with the set's version, and the template
 * version of a survey never changes. (A tube-type library edit is not seen by a cached grid until
 * the process restarts.)
 */
import { and, eq, inArray, sql } from 'drizzle-orm';
import { templateVersions } from '../../schema/index';
import type { Classwork } from '../domain/class-format';
import type { MeterProfile } from '../domain/meter';
import type { ReadingEvaluation, ReadingRecord, SurveyConditions, SurveySummary, SurveyView, VerdictCounts } from '../domain/set-format';
import { SurveyGrid, type GridReading } from '../domain/survey-grid';
import type { TemplateDocument, TubeTypeRecord } from '../domain/template-format';
import type { AcceptanceRule } from '../domain/verdict';
import type { Db, Tx } from '../db';
import { notFound } from '../http/errors';
import type { Actor, SetAccess, SetRow } from '../sets/sets.repository';
import { findSet } from '../sets/sets.repository';
import { tubeTypesOf } from '../templates/template-rules';
import { tubeTypeRecords } from '../templates/templates.repository';
import * as repo from './surveys.repository';

type Deps = { db: Db };

// ---------------------------------------------------------------------------------------------
// Template versions (immutable once published: cached by id)

export interface VersionDoc {
  id: number;
  templateId: number;
  number: number;
  document: TemplateDocument;
  tubeTypes: TubeTypeRecord[];
}

const VERSION_CACHE_MAX = 64;
const versionCache = new Map<number, Promise<VersionDoc>>();

/** A template version's document and tube types (cached: published versions never change). */
export function versionDoc(tx: Tx, templateVersionId: number): Promise<VersionDoc> {
  let p = versionCache.get(templateVersionId);
  if (p === undefined) {
    p = (async () => {
      const [v] = await tx
        .select({ id: templateVersions.id, templateId: templateVersions.templateId, number: templateVersions.number, content: templateVersions.content })
        .from(templateVersions)
        .where(eq(templateVersions.id, templateVersionId));
      if (!v) throw notFound('No such template version.');
      const document = v.content as TemplateDocument;
      const tubes = await tubeTypeRecords(tx, tubeTypesOf(document));
      return { id: v.id, templateId: v.templateId, number: v.number ?? 0, document, tubeTypes: [...tubes.values()] };
    })();
    p.catch(() => versionCache.delete(templateVersionId));
    versionCache.set(templateVersionId, p);
    if (versionCache.size > VERSION_CACHE_MAX) versionCache.delete(versionCache.keys().next().value!);
  }
  return p;
}

/** The published version `number` of a template (id and document), or undefined. */
export async function publishedVersion(tx: Tx, templateId: number, number: number): Promise<{ id: number; state: string } | undefined> {
  const [v] = await tx
    .select({ id: templateVersions.id, state: templateVersions.state })
    .from(templateVersions)
    .where(and(eq(templateVersions.templateId, templateId), eq(templateVersions.number, number), inArray(templateVersions.state, ['published', 'retired'])));
  return v;
}

// ---------------------------------------------------------------------------------------------
// Grids

/**
 * Grids are shared by every survey that would build the same one: same template version, set
 * deviations, meter, rule and tubes-in condition (the sets of one chassis surveyed with one meter —
 * a shop's, a class's). A grid holds three factored networks, so the cache is small.
 */
const GRID_CACHE_MAX = 64;
const gridCache = new Map<string, SurveyGrid>();
/** (survey id, survey version, set version) → the content key of its grid. */
const gridOfSurvey = new Map<string, string>();
/** Test point keys and kinds per survey (a survey's template version never changes). */
const rowCache = new Map<number, { meter: MeterProfile | null; rows: Map<string, { kind: string; componentKey: string | null }> }>();

const gridKey = (surveyId: number, surveyVersion: number, setVersion: number) => `${surveyId}:${surveyVersion}:${setVersion}`;
const contentKey = (survey: repo.SurveyRow, set: Pick<SetRow, 'deviations'>): string =>
  JSON.stringify([survey.templateVersionId, set.deviations, meterOf(survey), survey.rule, (survey.conditions as SurveyConditions).tubesIn]);

function lookup(key: string): SurveyGrid | undefined {
  const g = gridCache.get(key);
  if (g !== undefined) {
    gridCache.delete(key);
    gridCache.set(key, g);
  }
  return g;
}

/** The cached grid of a survey at these versions, if any. */
export function cachedGrid(surveyId: number, surveyVersion: number, setVersion: number): SurveyGrid | undefined {
  const k = gridOfSurvey.get(gridKey(surveyId, surveyVersion, setVersion));
  return k === undefined ? undefined : lookup(k);
}

export function meterOf(survey: repo.SurveyRow): MeterProfile | null {
  return (survey.meter as repo.MeterSnapshot | null)?.profile ?? null;
}

/** The grid of a survey row and its set row (shared by surveys whose grid inputs are the same). */
export async function gridOf(tx: Tx, survey: repo.SurveyRow, set: Pick<SetRow, 'version' | 'deviations'>): Promise<SurveyGrid> {
  const k = contentKey(survey, set);
  let grid = lookup(k);
  if (grid === undefined) {
    const v = await versionDoc(tx, survey.templateVersionId);
    grid = new SurveyGrid({
      document: v.document,
      tubeTypes: v.tubeTypes,
      deviations: set.deviations,
      meter: meterOf(survey),
      rule: survey.rule as AcceptanceRule,
      conditions: survey.conditions as SurveyConditions,
    });
    gridCache.set(k, grid);
    if (gridCache.size > GRID_CACHE_MAX) gridCache.delete(gridCache.keys().next().value!);
  }
  const sk = gridKey(survey.id, survey.version, set.version);
  if (gridOfSurvey.get(sk) !== k || !rowCache.has(survey.id)) {
    // A new version of this survey or its set (or a first sight): its rows and meter as of now.
    gridOfSurvey.set(sk, k);
    if (gridOfSurvey.size > GRID_CACHE_MAX * 64) gridOfSurvey.delete(gridOfSurvey.keys().next().value!);
    rowCache.set(survey.id, { meter: meterOf(survey), rows: new Map(grid.rows.map((r) => [r.testPointKey, { kind: r.kind, componentKey: r.component?.key ?? null }])) });
    if (rowCache.size > GRID_CACHE_MAX * 64) rowCache.delete(rowCache.keys().next().value!);
  }
  return grid;
}

/** Test point keys (and kinds) of a survey when known in this process; undefined otherwise. */
export function cachedRows(surveyId: number) {
  return rowCache.get(surveyId);
}

/**
 * The grid of a survey, without an access check (callers check access first, e.g. with
 * visibleSurvey or visibleSet). Throws 404 when the survey does not exist.
 */
export async function surveyGridFor(ctx: Deps, surveyId: number): Promise<SurveyGrid> {
  const survey = await repo.findSurvey(ctx.db, surveyId);
  if (!survey) throw notFound('No such survey.');
  const found = await findSet(ctx.db, survey.setId, 0);
  if (!found) throw notFound('No such survey.');
  return gridOf(ctx.db, survey, found.set);
}

export const gridReadingOf = (r: ReadingRecord): GridReading => ({
  id: r.id,
  testPointKey: r.testPointKey,
  followsReadingId: r.followsReadingId,
  text: r.text,
  state: r.state,
  ohms: r.ohms,
  method: r.method,
  liftedEnd: r.liftedEnd,
  rangeIndex: r.rangeIndex,
});

/** The current reading per test point: the newest one no follow-up supersedes (as SurveyGrid.current). */
export function currentReadings<R extends { id: number; testPointKey: string; followsReadingId: number | null }>(readings: readonly R[]): Map<string, R> {
  const superseded = new Set<number>();
  for (const r of readings) if (r.followsReadingId !== null) superseded.add(r.followsReadingId);
  const out = new Map<string, R>();
  for (const r of readings) {
    if (superseded.has(r.id)) continue;
    const had = out.get(r.testPointKey);
    if (had === undefined || r.id > had.id) out.set(r.testPointKey, r);
  }
  return out;
}

/**
 * Every reading's evaluation (by reading id) and the survey's counts over the current readings.
 * `slim` leaves out each evaluation's full verdict explanation (`result: null`): the survey view
 * sends 400 of them and the browser recomputes the explanation with the same domain module.
 */
export function evaluateSurvey(
  grid: SurveyGrid,
  readings: readonly ReadingRecord[],
  jointChecks: Readonly<Record<string, unknown>>,
  slim = false,
): { evaluations: Record<number, ReadingEvaluation>; counts: VerdictCounts; stages: Record<string, VerdictCounts> } {
  const evaluations: Record<number, ReadingEvaluation> = {};
  for (const r of readings) {
    if (grid.row(r.testPointKey) === undefined) continue;
    const e = grid.evaluate(gridReadingOf(r), { jointChecked: r.testPointKey in jointChecks });
    evaluations[r.id] = slim ? { ...e, result: null } : e;
  }
  const byKey = new Map<string, ReadingEvaluation>();
  for (const [key, r] of currentReadings(readings)) if (evaluations[r.id]) byKey.set(key, evaluations[r.id]);
  const { total, stages } = grid.summary(byKey);
  return { evaluations, counts: total, stages };
}

export function summaryOf(survey: repo.SurveyRow, templateId: number, counts: VerdictCounts): SurveySummary {
  return {
    id: survey.id,
    setId: survey.setId,
    purpose: survey.purpose,
    state: survey.state,
    templateId,
    versionNumber: survey.versionNumber,
    meterName: (survey.meter as repo.MeterSnapshot | null)?.name ?? null,
    startedBy: survey.startedBy === null ? null : { id: survey.startedBy, name: survey.startedByName ?? '' },
    startedAt: survey.createdAt.toISOString(),
    completedAt: survey.completedAt?.toISOString() ?? null,
    counts,
  };
}

/** The surveys of a set, oldest first, each with its verdict counts. */
export async function surveySummaries(tx: Tx, set: Pick<SetRow, 'id' | 'version' | 'deviations' | 'templateId'>): Promise<SurveySummary[]> {
  const list = await repo.surveysOfSet(tx, set.id);
  const readings = await repo.readingsOfSurveys(
    tx,
    list.map((s) => s.id),
  );
  const out: SurveySummary[] = [];
  for (const s of list) {
    const grid = await gridOf(tx, s, set);
    out.push(summaryOf(s, set.templateId, evaluateSurvey(grid, readings.get(s.id) ?? [], s.jointChecks as Record<string, unknown>).counts));
  }
  return out;
}

/** What a class survey's view adds (SurveyView.classwork), as the caller sees it. */
export async function classworkOf(tx: Tx, survey: repo.SurveyRow, link: repo.ClassLink, viewer: repo.SurveyViewer): Promise<Classwork> {
  const r = await tx.execute<{ n: number; last: string | Date | null }>(sql`SELECT count(*)::int AS n, max(submitted_at) AS last FROM attempts WHERE survey_id = ${survey.id}`);
  const { n, last } = r.rows[0];
  const due = link.dueAt.getTime();
  // Late (derived, never a state): the newest submission after the due date, or not submitted and the due date past.
  const late = last !== null ? new Date(last).getTime() > due : survey.state === 'draft' && Date.now() > due;
  return {
    assignmentId: link.assignmentId,
    classId: link.classId,
    title: link.title,
    dueAt: link.dueAt.toISOString(),
    late,
    predictFirst: link.predictFirst,
    showVerdicts: link.showVerdicts,
    remeasureKeys: survey.state === 'returned' ? (survey.remeasureKeys ?? []) : null,
    attemptCount: n,
    viewer: viewer === 'student' ? 'student' : viewer === 'instructor' ? 'instructor' : 'admin',
  };
}

/**
 * The view of a survey whose access is already decided. `who` (from visibleSurvey) says how the
 * caller sees it: a class survey has its classwork and no previous values (the set's surveys are
 * not the student's), and only its student may add readings; a reference survey read by a
 * student is read-only.
 */
export async function surveyViewOf(
  tx: Tx,
  survey: repo.SurveyRow,
  access: SetAccess,
  parallel = false,
  prefetched?: Prefetched,
  who: Pick<repo.SurveyAccess, 'viewer' | 'classLink' | 'referenceFor'> = { viewer: 'set', classLink: null },
): Promise<SurveyView> {
  const set = access.set;
  // Outside a transaction the queries go out at once (pool connections); inside one, in turn.
  const steps = [
    () => versionDoc(tx, survey.templateVersionId),
    () => prefetched?.readings ?? repo.readingsOf(tx, survey.id),
    () => prefetched?.amendments ?? repo.amendmentsOf(tx, survey.id),
    () => gridOf(tx, survey, set),
    () => prefetched?.siblings ?? repo.surveysOfSet(tx, set.id),
  ] as const;
  const [v, readings, amendments, grid, siblings] = (parallel ? await Promise.all(steps.map((f) => f())) : await inTurn(steps)) as [
    VersionDoc,
    ReadingRecord[],
    Awaited<ReturnType<typeof repo.amendmentsOf>>,
    SurveyGrid,
    repo.SurveyRow[],
  ];
  const jointChecks = survey.jointChecks as SurveyView['survey']['jointChecks'];
  const { evaluations, counts } = evaluateSurvey(grid, readings, jointChecks, true);

  // The order carried over: the earlier survey's bench order, then any test point new in this version.
  let order: string[] = [];
  if (survey.carriedFromSurveyId !== null) {
    const from = siblings.find((s) => s.id === survey.carriedFromSurveyId);
    if (from) {
      const old = await versionDoc(tx, from.templateVersionId);
      const here = new Set(v.document.testPoints.map((t) => t.key));
      order = old.document.testPoints.map((t) => t.key).filter((k) => here.has(k));
      const seen = new Set(order);
      for (const t of v.document.testPoints) if (!seen.has(t.key)) order.push(t.key);
    }
  }

  // The newest earlier survey of the set: its current values, for the grid to show once a new value is keyed.
  const earlier = siblings.filter((s) => s.createdAt < survey.createdAt || (s.createdAt.getTime() === survey.createdAt.getTime() && s.id < survey.id));
  let previous: SurveyView['previous'] = null;
  // Not for a class survey (the set's surveys are not the student's), nor for a student reading a reference.
  if (earlier.length && who.classLink === null && who.viewer !== 'reference') {
    const prev = earlier[earlier.length - 1];
    const fetched = prefetched ? await prefetched.previous : null;
    const readings = fetched !== null && fetched.surveyId === prev.id ? fetched.list : await repo.currentValuesOf(tx, prev.id);
    previous = { surveyId: prev.id, startedAt: prev.createdAt.toISOString(), readings };
  }

  const meter = survey.meter as repo.MeterSnapshot | null;
  return {
    survey: {
      ...summaryOf(survey, set.templateId, counts),
      meter: meter ? { name: meter.name, profile: meter.profile, checkDate: meter.checkDate } : null,
      rule: survey.rule as AcceptanceRule,
      conditions: survey.conditions as SurveyConditions,
      meterCheck: (survey.meterCheck as SurveyView['survey']['meterCheck']) ?? null,
      carriedFromSurveyId: survey.carriedFromSurveyId,
      jointChecks,
      version: survey.version,
      editable: who.classLink !== null ? who.viewer === 'student' && (survey.state === 'draft' || survey.state === 'returned') : who.viewer !== 'reference' && survey.state === 'draft',
    },
    set: { id: set.id, label: set.label, serial: set.serial, deviations: set.deviations, hotChassis: set.template.hotChassis, power: set.template.power },
    template: { id: set.templateId, versionNumber: survey.versionNumber, document: v.document },
    tubeTypes: v.tubeTypes,
    readings,
    evaluations,
    amendments,
    order,
    classwork: who.classLink !== null ? await classworkOf(tx, survey, who.classLink, who.viewer) : null,
    referenceFor: who.viewer === 'reference' ? (who.referenceFor ?? null) : null,
    previous,
  };
}

/** The template part of survey views, serialised once per version (a published version never changes). */
const templateJsonCache = new Map<string, string>();

/**
 * The survey view as JSON text: the template document and tube types (the bulk of a view, and
 * immutable per version) spliced in from a cache instead of serialised for every open.
 */
export function surveyViewJson(view: SurveyView): string {
  const { template, tubeTypes, ...rest } = view;
  const key = `${template.id}:${template.versionNumber}`;
  let cached = templateJsonCache.get(key);
  if (cached === undefined) {
    cached = `"template":${JSON.stringify(template)},"tubeTypes":${JSON.stringify(tubeTypes)}`;
    templateJsonCache.set(key, cached);
    if (templateJsonCache.size > VERSION_CACHE_MAX) templateJsonCache.delete(templateJsonCache.keys().next().value!);
  }
  return `{${cached},${JSON.stringify(rest).slice(1)}`;
}

/** Runs the steps one after the other (one connection: a transaction). */
export async function inTurn(steps: readonly (() => Promise<unknown>)[]): Promise<unknown[]> {
  const out: unknown[] = [];
  for (const f of steps) out.push(await f());
  return out;
}

/** Queries of a view started before its access was decided (their results are dropped on a refusal). */
interface Prefetched {
  readings: Promise<ReadingRecord[]>;
  amendments: Promise<Awaited<ReturnType<typeof repo.amendmentsOf>>>;
  siblings: Promise<repo.SurveyRow[]>;
  previous: Promise<Awaited<ReturnType<typeof repo.previousValuesOf>>>;
}

/**
 * GET /api/surveys/:id — the survey if `user` may see its set (404 otherwise). The view's own
 * queries go out together with the access check (one round trip of wall time instead of two);
 * nothing they read is used or answered unless the check passes.
 */
export async function loadSurveyView(ctx: Deps, user: Actor, surveyId: number): Promise<SurveyView> {
  const prefetched: Prefetched = {
    readings: repo.readingsOf(ctx.db, surveyId),
    amendments: repo.amendmentsOf(ctx.db, surveyId),
    siblings: repo.surveysBesides(ctx.db, surveyId),
    previous: repo.previousValuesOf(ctx.db, surveyId),
  };
  // A refused caller must not leave rejections unhandled.
  for (const p of Object.values(prefetched)) (p as Promise<unknown>).catch(() => undefined);
  const found = await repo.visibleSurvey(ctx.db, user, surveyId);
  return surveyViewOf(ctx.db, found.survey, found.access, true, prefetched, found);
}
