/**
 * Surveys (DESIGN.md §2 "survey", issue #5 items 1, 5, 7): starting one (carrying over the
 * conditions and bench order of the set's newest survey — never its values), the meter's check
 * resistor at the start, changes while draft, completing, joint checks, and the lifted-lead list.
 */
import { and, eq, isNull, sql } from 'drizzle-orm';
import { liftedLeads, meterProfiles, surveys } from '../../schema/index';
import type { Ctx } from '../context';
import { expandedUncertainty, inferRange, type MeterProfile } from '../domain/meter';
import { formatOhms } from '../domain/notation';
import { GridInputError, parseReadingText } from '../domain/survey-grid';
import type { LiftedLeadRecord, MeterCheck, ReadingEvaluation, SurveyConditions, SurveyStart, SurveySummary, SurveyView } from '../domain/set-format';
import { DEFAULT_RULE, type AcceptanceRule } from '../domain/verdict';
import type { SurveyPurpose } from '../domain/words';
import type { Tx } from '../db';
import { AppError, badRequest, conflict, notFound } from '../http/errors';
import { ownProfile } from '../meter-profiles/meter-profiles.use-cases';
import { editableSet, visibleSet, type Actor } from '../sets/sets.repository';
import { countSurveyOnTemplate } from '../sets/sets.use-cases';
import { checkTakesReading, notChangeable } from './readings.use-cases';
import { currentReadings, gridOf, gridReadingOf, publishedVersion, surveySummaries, surveyViewOf, versionDoc } from './survey-view';
import * as repo from './surveys.repository';

/** The meter snapshot a survey keeps, from one of the caller's profiles (archived ones refused). */
export async function meterSnapshot(tx: Tx, actor: Actor, meterProfileId: number, field = 'meterProfileId'): Promise<repo.MeterSnapshot> {
  let p;
  try {
    p = await ownProfile(tx, actor, meterProfileId);
  } catch (e) {
    if (e instanceof AppError && e.status === 404) throw badRequest(`"${field}": you have no meter profile ${meterProfileId}.`, field, 'validation');
    throw e;
  }
  if (p.archived) throw badRequest(`"${field}": meter profile ${meterProfileId} is archived.`, field, 'validation');
  return { name: p.name, profile: p.profile as MeterProfile, checkDate: p.checkDate, checkResistorOhms: p.checkResistorOhms, checkResistorTolerancePct: p.checkResistorTolerancePct };
}

/** GET /api/sets/:id/surveys */
export async function listSurveys(ctx: Ctx, actor: Actor, setId: number): Promise<SurveySummary[]> {
  const a = await visibleSet(ctx.db, actor, setId);
  return (await surveySummaries(ctx.db, a.set)).reverse();
}

/** POST /api/sets/:id/surveys — a new draft survey; carries over the newest survey's conditions, rule and order. */
export async function startSurvey(ctx: Ctx, actor: Actor, setId: number, start: SurveyStart): Promise<SurveyView> {
  return ctx.db.transaction(async (tx) => {
    const a = await editableSet(tx, actor, setId);
    const set = a.set;
    const number = start.versionNumber ?? set.template.latestPublishedNumber;
    if (number === null) throw conflict("The set's template has no published version to survey against.", 'template-not-published');
    const v = await publishedVersion(tx, set.templateId, number);
    if (!v) throw badRequest(`"versionNumber": the set's template has no published version ${number}.`, 'versionNumber', 'validation');
    if (v.state === 'retired') throw conflict(`Version ${number} of the template is retired: survey against a published version.`, 'version-retired');
    const doc = (await versionDoc(tx, v.id)).document;
    const previous = (await repo.surveysOfSet(tx, setId)).at(-1);

    const base: SurveyConditions = previous
      ? (previous.conditions as SurveyConditions)
      : { tubesIn: doc.conditions.tubesIn, speakerConnected: doc.conditions.speakerConnected, controls: doc.conditions.controls, ambientC: null, note: '' };
    const conditions: SurveyConditions = { ...base, ...(start.conditions ?? {}) };
    const rule: AcceptanceRule = start.rule ?? (previous?.rule as AcceptanceRule | undefined) ?? { ...DEFAULT_RULE };

    let meterProfileId: number | null = null;
    let meter: repo.MeterSnapshot | null = null;
    if (start.meterProfileId != null) {
      meter = await meterSnapshot(tx, actor, start.meterProfileId);
      meterProfileId = start.meterProfileId;
    } else if (start.meterProfileId === undefined && previous?.meterProfileId != null) {
      // The previous survey's meter, when it is the caller's own and still in use.
      const [p] = await tx.select().from(meterProfiles).where(and(eq(meterProfiles.id, previous.meterProfileId), eq(meterProfiles.ownerId, actor.id), eq(meterProfiles.archived, false)));
      if (p) {
        meterProfileId = p.id;
        meter = { name: p.name, profile: p.profile as MeterProfile, checkDate: p.checkDate, checkResistorOhms: p.checkResistorOhms, checkResistorTolerancePct: p.checkResistorTolerancePct };
      }
    }

    const [row] = await tx
      .insert(surveys)
      .values({
        setId,
        templateVersionId: v.id,
        versionNumber: number,
        purpose: start.purpose,
        meterProfileId,
        meter,
        rule,
        conditions,
        carriedFromSurveyId: previous?.id ?? null,
        startedBy: actor.id,
      })
      .returning({ id: surveys.id });
    await countSurveyOnTemplate(tx, set.templateId);
    const survey = (await repo.findSurvey(tx, row.id))!;
    return surveyViewOf(tx, survey, a);
  });
}

export interface SurveyPatch {
  version: number;
  purpose?: SurveyPurpose;
  conditions?: Partial<SurveyConditions>;
  rule?: AcceptanceRule;
  meterProfileId?: number | null;
}

/** PATCH /api/surveys/:id — conditions, rule, meter or purpose while draft (with the version). */
export async function patchSurvey(ctx: Ctx, actor: Actor, surveyId: number, patch: SurveyPatch): Promise<SurveyView> {
  return ctx.db.transaction(async (tx) => {
    const found = await repo.writableSurvey(tx, actor, surveyId, true);
    const { survey } = found;
    let meter: repo.MeterSnapshot | null | undefined;
    if (patch.meterProfileId === null) meter = null;
    else if (patch.meterProfileId !== undefined) meter = await meterSnapshot(tx, actor, patch.meterProfileId);
    if (survey.assignmentId !== null && (patch.rule !== undefined || patch.purpose !== undefined))
      throw conflict('A class survey follows its assignment: its rule and purpose are the assignment\u2019s.', 'set-by-assignment');
    if (survey.state !== 'draft') throw notChangeable(survey);
    if (survey.version !== patch.version) throw conflict(`This survey was changed since you opened it (version ${survey.version}, yours ${patch.version}).`, 'stale-version', { currentVersion: survey.version });
    await tx
      .update(surveys)
      .set({
        ...(patch.purpose !== undefined ? { purpose: patch.purpose } : {}),
        ...(patch.conditions !== undefined ? { conditions: { ...(survey.conditions as SurveyConditions), ...patch.conditions } } : {}),
        ...(patch.rule !== undefined ? { rule: patch.rule } : {}),
        ...(meter !== undefined ? { meter, meterProfileId: patch.meterProfileId ?? null } : {}),
        version: survey.version + 1,
        updatedAt: sql`now()`,
      })
      .where(eq(surveys.id, surveyId));
    return surveyViewOf(tx, (await repo.findSurvey(tx, surveyId))!, found.access, false, undefined, found);
  });
}

/**
 * POST /api/surveys/:id/meter-check — the check resistor read at the start. `ok` is false when the
 * reading's interval (reading less the lead resistance, ± U of the meter at that value) does not
 * meet the resistor's known value ± its tolerance.
 */
export async function meterCheck(ctx: Ctx, actor: Actor, surveyId: number, body: { text: string; rangeIndex?: number | null }): Promise<MeterCheck> {
  return ctx.db.transaction(async (tx) => {
    const { survey } = await repo.writableSurvey(tx, actor, surveyId, true);
    const snap = survey.meter as repo.MeterSnapshot | null;
    let parsed;
    try {
      parsed = parseReadingText(body.text, snap?.profile ?? null, body.rangeIndex);
    } catch (e) {
      if (e instanceof GridInputError) throw badRequest(e.message, 'text', 'unparsable-reading');
      throw e;
    }
    if (snap && body.rangeIndex != null && body.rangeIndex >= snap.profile.ranges.length) throw badRequest(`"rangeIndex": the survey's meter has ${snap.profile.ranges.length} range(s), numbered from 0.`, 'rangeIndex', 'validation');
    if (survey.state !== 'draft') throw notChangeable(survey);
    if (!snap) throw conflict('This survey has no meter profile: choose one before checking it.', 'no-meter');
    if (snap.checkResistorOhms == null) throw conflict(`The meter profile "${snap.name}" names no check resistor: add its value to the profile.`, 'no-check-resistor');
    const known = snap.checkResistorOhms;
    const tol = snap.checkResistorTolerancePct ?? 1;
    const lowK = known * (1 - tol / 100);
    const highK = known * (1 + tol / 100);
    let ok = false;
    let message: string;
    const knownText = `${formatOhms(known)} ±${tol} %`;
    if (parsed.state !== 'value' || parsed.ohms === null) {
      message = `The meter reads the check resistor (${knownText}) as ${parsed.display}: check the leads, the range and the battery before taking any reading.`;
    } else {
      const corrected = Math.max(0, parsed.ohms - snap.profile.leadOhms);
      let U = 0;
      try {
        U = expandedUncertainty(snap.profile, parsed.ohms, body.rangeIndex ?? inferRange(snap.profile, parsed.ohms));
      } catch {
        U = 0;
      }
      ok = corrected + U >= lowK && corrected - U <= highK;
      message = ok
        ? `The meter reads the check resistor ${formatOhms(parsed.ohms)} against ${knownText}: within its limits.`
        : `The meter reads the check resistor ${formatOhms(parsed.ohms)}, off its known value ${knownText} beyond the meter's own uncertainty: check the meter (battery, leads, zero) before taking any reading.`;
    }
    const check: MeterCheck = { text: body.text.trim(), ohms: parsed.ohms, knownOhms: known, tolerancePct: tol, ok, message, at: new Date().toISOString() };
    await tx.update(surveys).set({ meterCheck: check, updatedAt: sql`now()` }).where(eq(surveys.id, surveyId));
    return check;
  });
}

/** POST /api/surveys/:id/complete — draft → complete; read-only afterwards (amendments only). */
export async function completeSurvey(ctx: Ctx, actor: Actor, surveyId: number): Promise<SurveyView> {
  return ctx.db.transaction(async (tx) => {
    const { survey, access } = await repo.writableSurvey(tx, actor, surveyId, true);
    if (survey.assignmentId !== null) throw conflict('A class survey is not completed: submit it for review.', 'submit-instead');
    if (survey.state !== 'draft') throw conflict(`This survey is ${survey.state} already.`, 'survey-not-draft');
    await tx.update(surveys).set({ state: 'complete', completedAt: sql`now()`, completedBy: actor.id, version: survey.version + 1, updatedAt: sql`now()` }).where(eq(surveys.id, surveyId));
    return surveyViewOf(tx, (await repo.findSurvey(tx, surveyId))!, access);
  });
}

/** POST /api/surveys/:id/joint-checks — mark (or unmark) the joints and contacts of a test point's path checked. */
export async function jointCheck(ctx: Ctx, actor: Actor & { name?: string }, surveyId: number, body: { testPointKey: string; checked: boolean }): Promise<{ jointChecks: SurveyView['survey']['jointChecks']; evaluation: ReadingEvaluation | null }> {
  return ctx.db.transaction(async (tx) => {
    const { survey, access } = await repo.writableSurvey(tx, actor, surveyId, true);
    const grid = await gridOf(tx, survey, access.set);
    const row = grid.row(body.testPointKey);
    if (!row || row.kind === 'pair-relation') throw badRequest(`"testPointKey": this survey's template version has no test point ${body.testPointKey} with a path to check.`, 'testPointKey', 'validation');
    checkTakesReading(survey, body.testPointKey);
    const checks = { ...(survey.jointChecks as SurveyView['survey']['jointChecks']) };
    if (body.checked) checks[body.testPointKey] = { by: { id: actor.id, name: actor.name ?? '' }, at: new Date().toISOString() };
    else delete checks[body.testPointKey];
    await tx.update(surveys).set({ jointChecks: checks, updatedAt: sql`now()` }).where(eq(surveys.id, surveyId));
    const current = currentReadings(await repo.readingsOf(tx, surveyId)).get(body.testPointKey);
    return { jointChecks: checks, evaluation: current ? grid.evaluate(gridReadingOf(current), { jointChecked: body.checked }) : null };
  });
}

// ---------------------------------------------------------------------------------------------
// Lifted leads

/** POST /api/surveys/:id/lifted-leads — a lead lifted for an out-of-circuit reading; open until re-soldered. */
export async function liftLead(
  ctx: Ctx,
  actor: Actor,
  surveyId: number,
  body: { componentKey: string; end: 0 | 1; promptedByReadingId?: number | null; note?: string },
): Promise<LiftedLeadRecord> {
  return ctx.db.transaction(async (tx) => {
    const { survey, access } = await repo.writableSurvey(tx, actor, surveyId, true);
    // A class survey's student lifts leads of the training set through their survey; otherwise the set's editors.
    if (survey.assignmentId === null) await editableSet(tx, actor, survey.setId);
    const doc = (await versionDoc(tx, survey.templateVersionId)).document;
    const c = doc.components.find((x) => x.key === body.componentKey);
    if (!c) throw badRequest(`"componentKey": this survey's template version has no component ${body.componentKey}.`, 'componentKey', 'validation');
    if (body.promptedByReadingId != null && !(await repo.findReading(tx, surveyId, body.promptedByReadingId)))
      throw badRequest(`"promptedByReadingId": reading ${body.promptedByReadingId} is not a reading of this survey.`, 'promptedByReadingId', 'validation');
    if (survey.state !== 'draft') throw notChangeable(survey);
    const node = c.nodes[body.end];
    const [open] = await tx
      .select({ id: liftedLeads.id })
      .from(liftedLeads)
      .where(and(eq(liftedLeads.setId, access.set.id), eq(liftedLeads.componentKey, c.key), eq(liftedLeads.end, body.end), isNull(liftedLeads.resolderedAt)));
    if (open) throw conflict(`${c.ref}'s lead at ${node} is lifted already (entry ${open.id}): re-solder it first.`, 'already-lifted', { leadId: open.id });
    const [row] = await tx
      .insert(liftedLeads)
      .values({ setId: access.set.id, surveyId, componentKey: c.key, componentRef: c.ref, end: body.end, node, promptedByReadingId: body.promptedByReadingId ?? null, liftedBy: actor.id, note: body.note?.trim() ?? '' })
      .returning({ id: liftedLeads.id });
    await tx.execute(sql`UPDATE sets SET updated_at = now() WHERE id = ${access.set.id}`);
    return (await repo.liftedLeadsOf(tx, access.set.id, row.id))[0];
  });
}

/** GET /api/sets/:id/lifted-leads — open ones first, newest first. */
export async function listLiftedLeads(ctx: Ctx, actor: Actor, setId: number): Promise<{ items: LiftedLeadRecord[] }> {
  await visibleSet(ctx.db, actor, setId);
  const all = await repo.liftedLeadsOf(ctx.db, setId);
  return { items: [...all.filter((l) => l.resolderedAt === null), ...all.filter((l) => l.resolderedAt !== null)] };
}

/** POST /api/sets/:id/lifted-leads/:leadId/resolder — 409 when re-soldered already. */
export async function resolder(ctx: Ctx, actor: Actor, setId: number, leadId: number, body: { recheckReadingId?: number | null; note?: string }): Promise<LiftedLeadRecord> {
  return ctx.db.transaction(async (tx) => {
    await editableSet(tx, actor, setId);
    const [lead] = await repo.liftedLeadsOf(tx, setId, leadId, true);
    if (!lead) throw notFound('No such lifted lead on this set.');
    if (body.recheckReadingId != null) {
      const r = await tx.execute(sql`SELECT 1 FROM readings r JOIN surveys sv ON sv.id = r.survey_id WHERE r.id = ${body.recheckReadingId} AND sv.set_id = ${setId}`);
      if (r.rows.length === 0) throw badRequest(`"recheckReadingId": reading ${body.recheckReadingId} is not a reading of this set.`, 'recheckReadingId', 'validation');
    }
    if (lead.resolderedAt !== null) throw conflict(`${lead.componentRef}'s lead at ${lead.node} was re-soldered already.`, 'already-resoldered');
    const note = body.note?.trim() ? (lead.note ? `${lead.note}\nRe-soldered: ${body.note.trim()}` : `Re-soldered: ${body.note.trim()}`) : lead.note;
    await tx
      .update(liftedLeads)
      .set({ resolderedAt: sql`now()`, resolderedBy: actor.id, recheckReadingId: body.recheckReadingId ?? null, note })
      .where(eq(liftedLeads.id, leadId));
    await tx.execute(sql`UPDATE sets SET updated_at = now() WHERE id = ${setId}`);
    return (await repo.liftedLeadsOf(tx, setId, leadId))[0];
  });
}
