/**
 * Queries of what a set records after the survey (DESIGN.md §2 "safety gates", "parts record",
 * "bring-up log", "replacement list" marks; §6 provenance label): each takes `db` or a
 * transaction `tx`. Gate signatures, parts-record lines and bring-up entries are append-only.
 */
import { and, asc, desc, eq, inArray, isNull, sql } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import { bringUpEntries, gateSignatures, partsRecord, provenanceLabels, readings, replacementMarks, sets, templateVersions, users } from '../../schema/index';
import type { GateAction, GateSignatureInput } from '../domain/gates';
import type { GridReading } from '../domain/survey-grid';
import type { BringUpEntry, BringUpStep, NewPart, PartsAction, PartsRecordLine, PersonRef } from '../domain/set-format';
import type { TemplateDocument } from '../domain/template-format';
import type { Tx } from '../db';

const person = (id: number | null, name: string | null): PersonRef | null => (id === null ? null : { id, name: name ?? '' });

// ---------------------------------------------------------------------------------------------
// Gates

export async function gateRecords(tx: Tx, setId: number): Promise<GateSignatureInput<PersonRef | null>[]> {
  const rows = await tx
    .select({ g: gateSignatures, name: users.name })
    .from(gateSignatures)
    .leftJoin(users, eq(users.id, gateSignatures.signedBy))
    .where(eq(gateSignatures.setId, setId))
    .orderBy(asc(gateSignatures.id));
  return rows.map(({ g, name }) => ({ id: g.id, itemKey: g.itemKey, action: g.action as GateAction, note: g.note, by: person(g.signedBy, name), at: g.createdAt.toISOString() }));
}

export async function addGateRecord(tx: Tx, setId: number, itemKey: string, action: GateAction, note: string, by: number): Promise<number> {
  const [row] = await tx.insert(gateSignatures).values({ setId, itemKey, action, note, signedBy: by }).returning({ id: gateSignatures.id });
  return row.id;
}

export async function recordFirstPower(tx: Tx, setId: number, by: number): Promise<Date> {
  const [row] = await tx.update(sets).set({ firstPowerAt: new Date(), firstPowerBy: by }).where(eq(sets.id, setId)).returning({ at: sets.firstPowerAt });
  return row.at!;
}

export async function userName(tx: Tx, id: number | null): Promise<PersonRef | null> {
  if (id === null) return null;
  const [u] = await tx.select({ name: users.name }).from(users).where(eq(users.id, id));
  return u ? { id, name: u.name } : null;
}

// ---------------------------------------------------------------------------------------------
// Bring-up log

export async function bringUpOf(tx: Tx, setId: number): Promise<BringUpEntry[]> {
  const rows = await tx
    .select({ b: bringUpEntries, name: users.name })
    .from(bringUpEntries)
    .leftJoin(users, eq(users.id, bringUpEntries.recordedBy))
    .where(eq(bringUpEntries.setId, setId))
    .orderBy(asc(bringUpEntries.id));
  return rows.map(({ b, name }) => ({
    id: b.id,
    step: b.step as BringUpStep,
    setting: b.setting,
    mainsVolts: b.mainsVolts,
    currentAmps: b.currentAmps,
    bPlus: b.bPlus as BringUpEntry['bPlus'],
    observations: b.observations,
    note: b.note,
    recordedBy: person(b.recordedBy, name),
    createdAt: b.createdAt.toISOString(),
  }));
}

export async function addBringUp(tx: Tx, setId: number, e: Omit<BringUpEntry, 'id' | 'recordedBy' | 'createdAt'>, by: number): Promise<number> {
  const [row] = await tx
    .insert(bringUpEntries)
    .values({ setId, step: e.step, setting: e.setting, mainsVolts: e.mainsVolts, currentAmps: e.currentAmps, bPlus: e.bPlus, observations: e.observations, note: e.note, recordedBy: by })
    .returning({ id: bringUpEntries.id });
  return row.id;
}

// ---------------------------------------------------------------------------------------------
// Parts record

export async function partsRecordOf(tx: Tx, setId: number, setIds?: number[]): Promise<(PartsRecordLine & { setId: number })[]> {
  const rows = await tx
    .select({ p: partsRecord, name: users.name })
    .from(partsRecord)
    .leftJoin(users, eq(users.id, partsRecord.recordedBy))
    .where(setIds ? inArray(partsRecord.setId, setIds.length ? setIds : [-1]) : eq(partsRecord.setId, setId))
    .orderBy(asc(partsRecord.id));
  return rows.map(({ p, name }) => ({
    id: p.id,
    setId: p.setId,
    componentKey: p.componentKey,
    componentRef: p.componentRef,
    action: p.action as PartsAction,
    newPart: (p.newPart as NewPart | null) ?? null,
    readingId: p.readingId === null ? null : Number(p.readingId),
    reason: p.reason,
    note: p.note,
    recordedBy: person(p.recordedBy, name),
    createdAt: p.createdAt.toISOString(),
  }));
}

export async function addPartsLine(
  tx: Tx,
  setId: number,
  line: { componentKey: string; componentRef: string; action: PartsAction; newPart: NewPart | null; readingId: number | null; reason: string; note: string },
  by: number,
): Promise<number> {
  const [row] = await tx
    .insert(partsRecord)
    .values({ setId, ...line, recordedBy: by })
    .returning({ id: partsRecord.id });
  return row.id;
}

// ---------------------------------------------------------------------------------------------
// Replacement marks

export async function marksOf(tx: Tx, setId: number): Promise<Record<string, { orderedAt: string | null; receivedAt: string | null }>> {
  const rows = await tx.select().from(replacementMarks).where(eq(replacementMarks.setId, setId));
  const out: Record<string, { orderedAt: string | null; receivedAt: string | null }> = {};
  for (const r of rows) out[r.componentKey] = { orderedAt: r.orderedAt?.toISOString() ?? null, receivedAt: r.receivedAt?.toISOString() ?? null };
  return out;
}

/** Sets the marks; a mark already set keeps its first time. */
export async function setMarks(tx: Tx, setId: number, componentKey: string, ordered: boolean, received: boolean, by: number): Promise<{ orderedAt: Date | null; receivedAt: Date | null }> {
  const [had] = await tx
    .select()
    .from(replacementMarks)
    .where(and(eq(replacementMarks.setId, setId), eq(replacementMarks.componentKey, componentKey)))
    .for('update');
  const now = new Date();
  const orderedAt = ordered || received ? (had?.orderedAt ?? now) : null;
  const receivedAt = received ? (had?.receivedAt ?? now) : null;
  await tx
    .insert(replacementMarks)
    .values({ setId, componentKey, orderedAt, receivedAt, updatedBy: by, updatedAt: now })
    .onConflictDoUpdate({ target: [replacementMarks.setId, replacementMarks.componentKey], set: { orderedAt, receivedAt, updatedBy: by, updatedAt: now } });
  return { orderedAt, receivedAt };
}

// ---------------------------------------------------------------------------------------------
// Provenance labels

const labelMaker = alias(users, 'label_maker');

export interface LabelRow {
  id: number;
  setId: number;
  token: string | null;
  createdBy: PersonRef | null;
  createdAt: string;
  revokedAt: string | null;
}

export async function labelsOf(tx: Tx, setId: number, labelId?: number, lock = false): Promise<LabelRow[]> {
  const q = tx
    .select({ l: provenanceLabels, name: labelMaker.name })
    .from(provenanceLabels)
    .leftJoin(labelMaker, eq(labelMaker.id, provenanceLabels.createdBy))
    .where(and(eq(provenanceLabels.setId, setId), labelId === undefined ? undefined : eq(provenanceLabels.id, labelId)))
    .orderBy(desc(provenanceLabels.id));
  const rows = lock ? await q.for('update', { of: provenanceLabels }) : await q;
  return rows.map(({ l, name }) => ({ id: l.id, setId: l.setId, token: l.token, createdBy: person(l.createdBy, name), createdAt: l.createdAt.toISOString(), revokedAt: l.revokedAt?.toISOString() ?? null }));
}

export async function addLabel(tx: Tx, setId: number, token: string, tokenHash: string, by: number): Promise<number> {
  const [row] = await tx.insert(provenanceLabels).values({ setId, token, tokenHash, createdBy: by }).returning({ id: provenanceLabels.id });
  return row.id;
}

export async function revokeLabel(tx: Tx, labelId: number): Promise<void> {
  await tx.update(provenanceLabels).set({ revokedAt: new Date(), token: null }).where(eq(provenanceLabels.id, labelId));
}

/** The set of a live (not revoked) label token hash, or undefined. */
export async function setOfLabel(tx: Tx, tokenHash: string): Promise<number | undefined> {
  const [row] = await tx
    .select({ setId: provenanceLabels.setId })
    .from(provenanceLabels)
    .where(and(eq(provenanceLabels.tokenHash, tokenHash), isNull(provenanceLabels.revokedAt)));
  return row?.setId;
}

// ---------------------------------------------------------------------------------------------
// The set's template document

/** The newest published (or retired) version of a template: id and document. */
export async function newestVersion(tx: Tx, templateId: number): Promise<{ id: number; number: number; document: TemplateDocument } | undefined> {
  const [v] = await tx
    .select({ id: templateVersions.id, number: templateVersions.number, content: templateVersions.content })
    .from(templateVersions)
    .where(and(eq(templateVersions.templateId, templateId), inArray(templateVersions.state, ['published', 'retired'])))
    .orderBy(desc(templateVersions.number))
    .limit(1);
  return v ? { id: v.id, number: v.number ?? 0, document: v.content as TemplateDocument } : undefined;
}

// ---------------------------------------------------------------------------------------------
// History

/** What a set's history reads of a reading: what the grid evaluates, and when it was taken. */
export interface HistoryReading extends GridReading {
  /** ISO 8601 in UTC with milliseconds, as in ReadingRecord.takenAt. */
  takenAt: string;
}

/**
 * The readings of several surveys, only the columns the history uses, oldest first per survey
 * (plain rows: a set's ten surveys are 2,500 readings, and building the whole reading record as
 * JSON for each made this the slowest query of the history).
 */
export async function historyReadingsOf(tx: Tx, surveyIds: number[]): Promise<Map<number, HistoryReading[]>> {
  const out = new Map<number, HistoryReading[]>(surveyIds.map((id) => [id, []]));
  if (!surveyIds.length) return out;
  const rows = await tx
    .select({
      surveyId: readings.surveyId,
      id: readings.id,
      testPointKey: readings.testPointKey,
      followsReadingId: readings.followsReadingId,
      text: readings.text,
      state: readings.state,
      ohms: readings.ohms,
      method: readings.method,
      liftedEnd: readings.liftedEnd,
      rangeIndex: readings.rangeIndex,
      // The same text as the reading record's (surveys.repository.ts readingsOfSurveys).
      takenAt: sql<string>`to_char(${readings.takenAt} AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')`,
    })
    .from(readings)
    .where(inArray(readings.surveyId, surveyIds))
    .orderBy(asc(readings.id));
  for (const r of rows) {
    out.get(r.surveyId)?.push({
      id: r.id,
      testPointKey: r.testPointKey,
      followsReadingId: r.followsReadingId,
      text: r.text,
      state: r.state,
      ohms: r.ohms,
      method: r.method,
      liftedEnd: r.liftedEnd as 0 | 1 | null,
      rangeIndex: r.rangeIndex,
      takenAt: r.takenAt,
    });
  }
  return out;
}
