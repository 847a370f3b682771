/**
 * What is read out of a set's surveys: the replacement list, part history and the before/after
 * comparison, the printable record, the public provenance page and the user's export
 * (DESIGN.md §2 "replacement list", §3.8, §6; issue 5 "After the survey").
 *
 * Verdicts come from the survey grid (api/domain/survey-grid.ts through api/surveys/survey-view.ts),
 * the same computation the grid screen shows.
 */
import { eq, asc } from 'drizzle-orm';
import { sets } from '../../schema/index';
import { checkCapacitors } from '../domain/capacitor-checks';
import { compareRows, partInstances, type CompareRow, type CompareSide, type HistoryPointInput, type PartInstance, type PartReplacementInput } from '../domain/part-history';
import { replacementCsv, replacementList, type OutFinding, type ReplacementList } from '../domain/replacement-list';
import type { BringUpEntry, LiftedLeadRecord, PartsRecordLine, ReadingRecord, SetDetail, SurveySummary, SurveyView, VerdictCounts } from '../domain/set-format';
import { setDetailOf } from '../sets/sets.use-cases';
import { replacementDecision, type GridRow, type SurveyGrid } from '../domain/survey-grid';
import type { Tx } from '../db';
import type { Ctx } from '../context';
import { notFound } from '../http/errors';
import { findSet, visibleSet, type Actor, type SetAccess, type SetRow } from '../sets/sets.repository';
import { currentReadings, evaluateSurvey, gridOf, gridReadingOf, summaryOf, surveyViewOf, versionDoc } from '../surveys/survey-view';
import { liftedLeadsOf, readingsOf, readingsOfSurveys, surveysOfSet, type MeterSnapshot, type SurveyRow } from '../surveys/surveys.repository';
import { tubeTypeRecords } from '../templates/templates.repository';
import { tubeTypesOf } from '../templates/template-rules';
import * as repo from './records.repository';
import { gatesOf, hashToken, type Gates } from './records.use-cases';
import { surveyPoints } from './history-points';
import { csvField } from '../domain/replacement-list';
import type { ReplacementsQuery } from './records.schema';

type Deps = Pick<Ctx, 'db'>;

const COMPLETE_STATES = new Set(['complete', 'accepted']);

async function surveyOfSet(tx: Tx, set: SetRow, surveyId: number | undefined): Promise<SurveyRow | null> {
  const list = await surveysOfSet(tx, set.id);
  if (surveyId === undefined) return list.length ? list[list.length - 1] : null;
  const s = list.find((x) => x.id === surveyId);
  if (!s) throw notFound('This set has no such survey.');
  return s;
}

// ---------------------------------------------------------------------------------------------
// Replacement list

export interface ReplacementsView extends ReplacementList {
  setId: number;
  surveyId: number | null;
  /** The survey the list is drawn from (the newest unless asked), or null when the set has none yet. */
  survey: { id: number; purpose: string; state: string; startedAt: string } | null;
}

/** The out findings of a survey: each current reading the grid says is out, with its decision. */
export function findingsOf(grid: SurveyGrid, readings: readonly ReadingRecord[], jointChecks: Readonly<Record<string, unknown>>): OutFinding[] {
  const out: OutFinding[] = [];
  for (const [key, r] of currentReadings(readings)) {
    const row = grid.row(key);
    if (!row) continue;
    const gr = gridReadingOf(r);
    const jointChecked = key in jointChecks;
    const ev = grid.evaluate(gr, { jointChecked });
    const d = replacementDecision(row, gr, ev, jointChecked);
    if (!d) continue;
    out.push({
      testPointKey: key,
      componentKey: row.kind === 'component-check' ? (row.component?.key ?? null) : null,
      from: row.from,
      to: row.to,
      readingId: r.id,
      text: r.text || r.state,
      verdict: ev.verdict,
      method: r.method,
      decision: d,
    });
  }
  return out;
}

export async function getReplacements(ctx: Deps, user: Actor, setId: number, q: ReplacementsQuery): Promise<ReplacementsView> {
  const db = ctx.db;
  const { set } = await visibleSet(db, user, setId);
  const survey = await surveyOfSet(db, set, q.surveyId);
  let findings: OutFinding[] = [];
  let versionId: number;
  if (survey) {
    const [grid, readings] = await Promise.all([gridOf(db, survey, set), readingsOf(db, survey.id)]);
    findings = findingsOf(grid, readings, survey.jointChecks as Record<string, unknown>);
    versionId = survey.templateVersionId;
  } else {
    const v = await repo.newestVersion(db, set.templateId);
    if (!v) throw notFound('The set\u2019s template has no published version.');
    versionId = v.id;
  }
  const v = await versionDoc(db, versionId);
  const tubes = await tubeTypeRecords(db, tubeTypesOf(v.document));
  const capacitorWarnings: Record<string, string[]> = {};
  for (const f of checkCapacitors(v.document, tubes, { mainsFactor: q.mainsFactor })) {
    const m = /^components\[(\d+)\]/.exec(f.path);
    const c = m ? v.document.components[Number(m[1])] : undefined;
    if (c) (capacitorWarnings[c.key] ??= []).push(f.message);
  }
  const list = replacementList({
    document: v.document,
    deviations: set.deviations,
    findings,
    series: q.series,
    mainsFactor: q.mainsFactor,
    recap: q.recap,
    marks: await repo.marksOf(db, set.id),
    capacitorWarnings,
  });
  return { setId: set.id, surveyId: survey?.id ?? null, survey: survey ? { id: survey.id, purpose: survey.purpose, state: survey.state, startedAt: survey.createdAt.toISOString() } : null, ...list };
}

export { replacementCsv };

// ---------------------------------------------------------------------------------------------
// History and comparison

export interface HistoryView {
  setId: number;
  /** The complete surveys the points come from, oldest first. */
  surveys: { id: number; purpose: string; startedAt: string; completedAt: string | null; meterName: string | null }[];
  parts: PartInstance[];
}

const labelOf = (row: GridRow): string => row.component?.ref ?? (row.from && row.to ? `${row.from} to ${row.to}` : row.testPointKey);

export async function getHistory(ctx: Deps, user: Actor, setId: number): Promise<HistoryView> {
  const db = ctx.db;
  const { set } = await visibleSet(db, user, setId);
  const list = (await surveysOfSet(db, set.id)).filter((s) => COMPLETE_STATES.has(s.state));
  const readings = await repo.historyReadingsOf(
    db,
    list.map((s) => s.id),
  );
  const points = new Map<string, { ref: string; points: HistoryPointInput[] }>();
  for (const s of list) {
    // Each survey's points: computed with its grid, or kept from an earlier answer while nothing they come from changed.
    for (const { componentKey, ref, point } of await surveyPoints(s, set, readings.get(s.id) ?? [], () => gridOf(db, s, set))) {
      const entry = points.get(componentKey) ?? { ref, points: [] };
      entry.points.push(point);
      points.set(componentKey, entry);
    }
  }
  const replacements = new Map<string, { ref: string; list: PartReplacementInput[] }>();
  for (const l of await repo.partsRecordOf(db, set.id)) {
    if (l.action !== 'replaced') continue;
    const e = replacements.get(l.componentKey) ?? { ref: l.componentRef, list: [] };
    e.list.push({ lineId: l.id, at: l.createdAt, text: l.newPart?.text ?? '' });
    replacements.set(l.componentKey, e);
  }
  const parts: PartInstance[] = [];
  for (const key of new Set([...points.keys(), ...replacements.keys()])) {
    const ref = points.get(key)?.ref ?? replacements.get(key)!.ref;
    parts.push(...partInstances(key, ref, points.get(key)?.points ?? [], replacements.get(key)?.list ?? []));
  }
  return {
    setId: set.id,
    surveys: list.map((s) => ({ id: s.id, purpose: s.purpose, startedAt: s.createdAt.toISOString(), completedAt: s.completedAt?.toISOString() ?? null, meterName: (s.meter as MeterSnapshot | null)?.name ?? null })),
    parts,
  };
}

export interface CompareView {
  setId: number;
  a: SurveySummary;
  b: SurveySummary;
  rows: CompareRow[];
}

export async function compareSurveys(ctx: Deps, user: Actor, setId: number, aId: number, bId: number): Promise<CompareView> {
  const db = ctx.db;
  const { set } = await visibleSet(db, user, setId);
  const a = (await surveyOfSet(db, set, aId))!;
  const b = (await surveyOfSet(db, set, bId))!;
  const side = async (s: SurveyRow) => {
    const [grid, readings] = await Promise.all([gridOf(db, s, set), readingsOf(db, s.id)]);
    const jc = s.jointChecks as Record<string, unknown>;
    const { evaluations, counts } = evaluateSurvey(grid, readings, jc);
    const sides = new Map<string, CompareSide>();
    for (const [key, r] of currentReadings(readings)) {
      const ev = evaluations[r.id];
      if (!ev) continue;
      sides.set(key, { readingId: r.id, text: r.text, state: r.state, ohms: r.ohms, method: r.method, verdict: ev.verdict, driftPct: ev.driftPct });
    }
    return { grid, sides, summary: summaryOf(s, set.templateId, counts) };
  };
  const [sa, sb] = await Promise.all([side(a), side(b)]);
  // Bench order of the later survey's version, then any test point only the other has.
  const seen = new Set<string>();
  const rows = [];
  for (const g of [sb.grid, sa.grid]) {
    for (const row of g.rows) {
      if (seen.has(row.testPointKey)) continue;
      seen.add(row.testPointKey);
      rows.push({ testPointKey: row.testPointKey, stageName: row.stageName, label: labelOf(row), a: sa.sides.get(row.testPointKey) ?? null, b: sb.sides.get(row.testPointKey) ?? null });
    }
  }
  return { setId: set.id, a: sa.summary, b: sb.summary, rows: compareRows(rows) };
}

// ---------------------------------------------------------------------------------------------
// The printable record

export interface SetRecord {
  generatedAt: string;
  /** As GET /api/sets/:id answers it. */
  set: SetDetail;
  surveys: SurveyView[];
  partsRecord: PartsRecordLine[];
  gates: Gates;
  liftedLeads: LiftedLeadRecord[];
  bringUp: BringUpEntry[];
}

export async function getRecord(ctx: Deps, user: Actor, setId: number): Promise<SetRecord> {
  const db = ctx.db;
  const access = await visibleSet(db, user, setId);
  return recordOf(db, user, access);
}

async function recordOf(db: Tx, user: Actor, access: SetAccess): Promise<SetRecord> {
  const set = access.set;
  const list = await surveysOfSet(db, set.id);
  const surveys: SurveyView[] = [];
  for (const s of list) surveys.push(await surveyViewOf(db, s, access));
  const [parts, gates, leads, bringUp] = await Promise.all([repo.partsRecordOf(db, set.id), gatesOf(db, set), liftedLeadsOf(db, set.id), repo.bringUpOf(db, set.id)]);
  return {
    generatedAt: new Date().toISOString(),
    set: await setDetailOf(db, user, access),
    surveys,
    partsRecord: parts.map(({ setId: _s, ...l }) => l),
    gates,
    liftedLeads: [...leads].reverse(),
    bringUp,
  };
}

// ---------------------------------------------------------------------------------------------
// The public provenance page (no owner identity)

export interface PublicRecord {
  chassis: { maker: string; model: string; chassisNumber: string; yearFrom: number | null; yearTo: number | null };
  serial: string;
  restorationLevel: string;
  /** Complete surveys, oldest first; `date` is when the survey was completed (else started). */
  surveys: { purpose: string; state: string; date: string; startedAt: string; completedAt: string | null; counts: VerdictCounts }[];
  /** `text`: the new part's value as recorded (`240k`, `0.047 µF 630 V`); `date`: when the line was recorded. */
  partsReplaced: { ref: string; text: string; date: string }[];
  firstPowerAt: string | null;
  /** Gate items signed (titles and dates only: no names). */
  gatesSigned: { title: string; at: string }[];
  notice: string;
}

export const PUBLIC_NOTICE = 'A read-only record of what was measured and replaced on this set. It is a record, not a certification.';

export async function publicRecord(ctx: Deps, token: string): Promise<PublicRecord> {
  const db = ctx.db;
  const setId = await repo.setOfLabel(db, hashToken(token));
  if (setId === undefined) throw notFound('No such label, or it was revoked.');
  const found = await findSet(db, setId, 0);
  if (!found) throw notFound('No such label, or it was revoked.');
  const set = found.set;
  const list = (await surveysOfSet(db, set.id)).filter((s) => COMPLETE_STATES.has(s.state));
  const readings = await readingsOfSurveys(
    db,
    list.map((s) => s.id),
  );
  const surveys: PublicRecord['surveys'] = [];
  for (const s of list) {
    const grid = await gridOf(db, s, set);
    const { counts } = evaluateSurvey(grid, readings.get(s.id) ?? [], s.jointChecks as Record<string, unknown>);
    const completedAt = s.completedAt?.toISOString() ?? null;
    surveys.push({ purpose: s.purpose, state: s.state, date: completedAt ?? s.createdAt.toISOString(), startedAt: s.createdAt.toISOString(), completedAt, counts });
  }
  const v = await repo.newestVersion(db, set.templateId);
  const gates = await gatesOf(db, set);
  const parts = await repo.partsRecordOf(db, set.id);
  return {
    chassis: { maker: set.template.maker, model: set.template.model, chassisNumber: set.template.chassisNumber, yearFrom: v?.document.chassis.yearFrom ?? null, yearTo: v?.document.chassis.yearTo ?? null },
    serial: set.serial,
    restorationLevel: set.restorationLevel,
    surveys,
    partsReplaced: parts
      .filter((l) => l.action === 'replaced')
      .map((l) => ({ ref: l.componentRef, text: l.newPart?.text ?? '', date: l.createdAt })),
    firstPowerAt: set.firstPowerAt?.toISOString() ?? null,
    gatesSigned: gates.items.filter((i) => !i.open && i.latest).map((i) => ({ title: i.title, at: i.latest!.at })),
    notice: PUBLIC_NOTICE,
  };
}

// ---------------------------------------------------------------------------------------------
// Export: the caller's own sets, so records outlive the account

export const EXPORT_FORMAT = 'driftmark-sets-export';

export async function exportSets(ctx: Deps, user: Actor) {
  const db = ctx.db;
  const own = await db.select({ id: sets.id }).from(sets).where(eq(sets.ownerId, user.id)).orderBy(asc(sets.id));
  const out = [];
  for (const { id } of own) {
    const found = await findSet(db, id, user.id);
    if (!found) continue;
    const set = found.set;
    const list = await surveysOfSet(db, set.id);
    const readings = await readingsOfSurveys(
      db,
      list.map((s) => s.id),
    );
    const [parts, gates, leads, bringUp] = await Promise.all([repo.partsRecordOf(db, set.id), repo.gateRecords(db, set.id), liftedLeadsOf(db, set.id), repo.bringUpOf(db, set.id)]);
    out.push({
      id: set.id,
      label: set.label,
      accessionNumber: set.accessionNumber,
      customer: set.customer,
      jobStatus: set.jobStatus,
      serial: set.serial,
      restorationLevel: set.restorationLevel,
      condition: set.condition,
      complaint: set.complaint,
      intakeNotes: set.intakeNotes,
      deviations: set.deviations,
      template: { id: set.templateId, maker: set.template.maker, model: set.template.model, chassisNumber: set.template.chassisNumber },
      firstPowerAt: set.firstPowerAt?.toISOString() ?? null,
      createdAt: set.createdAt.toISOString(),
      surveys: list.map((s) => ({
        id: s.id,
        purpose: s.purpose,
        state: s.state,
        templateVersion: s.versionNumber,
        meter: s.meter,
        rule: s.rule,
        conditions: s.conditions,
        startedAt: s.createdAt.toISOString(),
        completedAt: s.completedAt?.toISOString() ?? null,
        readings: (readings.get(s.id) ?? []).map(({ clientKey: _k, version: _v, updatedAt: _u, ...r }) => r),
      })),
      partsRecord: parts.map(({ setId: _s, ...l }) => l),
      gateRecords: gates,
      liftedLeads: leads,
      bringUp,
    });
  }
  return { format: EXPORT_FORMAT, formatVersion: 1, exportedAt: new Date().toISOString(), sets: out };
}

export const EXPORT_CSV_HEADER = [
  'set id', 'set label', 'accession number', 'serial', 'maker', 'model', 'survey id', 'purpose', 'survey state', 'template version', 'survey started',
  'test point', 'reading id', 'follows reading', 'text', 'state', 'ohms', 'method', 'lifted end', 'range', 'note', 'taken at',
];

/** One row per reading with its set and survey columns (RFC 4180, header row first). */
export function exportCsv(doc: Awaited<ReturnType<typeof exportSets>>): string {
  const rows: (string | number | null)[][] = [EXPORT_CSV_HEADER];
  for (const s of doc.sets) {
    for (const sv of s.surveys) {
      for (const r of sv.readings) {
        rows.push([
          s.id, s.label, s.accessionNumber, s.serial, s.template.maker, s.template.model, sv.id, sv.purpose, sv.state, sv.templateVersion, sv.startedAt,
          r.testPointKey, r.id, r.followsReadingId, r.text, r.state, r.ohms, r.method, r.liftedEnd, r.rangeIndex, r.note, r.takenAt,
        ]);
      }
    }
  }
  return rows.map((r) => r.map(csvField).join(',')).join('\r\n') + '\r\n';
}
