/**
 * What a set records after the survey: safety gates and "ready for first power", the bring-up
 * log, the parts record, ordered/received marks and provenance labels (DESIGN.md §2, §6; issue 5
 * "After the survey").
 *
 * Access: whoever may see a set (owner, shared-with, admin) may read and write these; anyone else
 * gets a 404 (api/sets/sets.repository.ts visibleSet / editableSet). Refusals that depend on the
 * set's state are 409s and write nothing (each check runs inside the transaction that would write,
 * under the set's row lock).
 */
import { createHash, randomBytes } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { readings, surveys } from '../../schema/index';
import { checkCapacitors } from '../domain/capacitor-checks';
import { blockersMessage, FIRST_POWER_KEY, firstPowerBlockers, GATE_NOTICE, gateItemsFor, gateStates, isHotChassis, type GatesView } from '../domain/gates';
import { parseResistance } from '../domain/notation';
import type { BringUpEntry, LiftedLeadRecord, NewPart, PartsAction, PartsRecordLine, PersonRef } from '../domain/set-format';
import type { PowerArrangement, TemplateDocument } from '../domain/template-format';
import type { Tx } from '../db';
import type { Ctx } from '../context';
import { badRequest, conflict, notFound } from '../http/errors';
import { editableSet, visibleSet, type Actor, type SetRow } from '../sets/sets.repository';
import { liftedLeadsOf, surveysOfSet } from '../surveys/surveys.repository';
import { versionDoc } from '../surveys/survey-view';
import { tubeTypesOf } from '../templates/template-rules';
import { tubeTypeRecords } from '../templates/templates.repository';
import * as repo from './records.repository';

type Deps = Pick<Ctx, 'db'>;

// ---------------------------------------------------------------------------------------------
// The set's template document

/** The document the set is worked against: its newest survey's version, else the template's newest published one. */
export async function setDocument(tx: Tx, set: Pick<SetRow, 'id' | 'templateId'>): Promise<TemplateDocument> {
  const list = await surveysOfSet(tx, set.id);
  if (list.length) return (await versionDoc(tx, list[list.length - 1].templateVersionId)).document;
  const v = await repo.newestVersion(tx, set.templateId);
  if (!v) throw notFound('The set\u2019s template has no published version.');
  return v.document;
}

// ---------------------------------------------------------------------------------------------
// Gates

export type Gates = GatesView<PersonRef | null, LiftedLeadRecord>;

export async function gatesOf(tx: Tx, set: SetRow): Promise<Gates> {
  const kind = { power: set.template.power as PowerArrangement, hotChassis: set.template.hotChassis };
  const items = gateItemsFor(kind);
  const [records, leads] = await Promise.all([repo.gateRecords(tx, set.id), liftedLeadsOf(tx, set.id)]);
  const states = gateStates(items, records);
  const open = leads.filter((l) => l.resolderedAt === null);
  const fp = [...records].reverse().find((r) => r.itemKey === FIRST_POWER_KEY);
  const firstPower = set.firstPowerAt ? { at: set.firstPowerAt.toISOString(), by: fp?.by ?? (await repo.userName(tx, set.firstPowerBy)), note: fp?.note ?? '' } : null;
  return {
    notice: GATE_NOTICE,
    kind: { power: kind.power, hotChassis: isHotChassis(kind) },
    items: states,
    history: records,
    openLiftedLeads: open,
    firstPower,
    blockers: firstPowerBlockers(states, open),
  };
}

export async function getGates(ctx: Deps, user: Actor, setId: number): Promise<Gates> {
  const { set } = await visibleSet(ctx.db, user, setId);
  return gatesOf(ctx.db, set);
}

/** Signs (or re-opens) one gate item: an append-only record. 404 for an item not on this set's list. */
export async function markGate(ctx: Deps, user: Actor, setId: number, itemKey: string, action: 'signed' | 'reopened', note: string): Promise<Gates> {
  return ctx.db.transaction(async (tx) => {
    const { set } = await editableSet(tx, user, setId);
    const gates = await gatesOf(tx, set);
    const item = gates.items.find((i) => i.key === itemKey);
    if (!item) throw notFound(`This set has no gate item "${itemKey}".`, 'no-such-gate-item');
    if (action === 'signed' && !item.open) throw conflict(`"${item.title}" is already signed; re-open it first to sign it again.`, 'gate-already-signed');
    if (action === 'reopened' && item.open) throw conflict(`"${item.title}" is not signed: there is nothing to re-open.`, 'gate-not-signed');
    await repo.addGateRecord(tx, set.id, itemKey, action, note, user.id);
    return gatesOf(tx, set);
  });
}

/**
 * "Ready for first power": refused (409, nothing written) while a gate item is open or a lifted
 * lead is not re-soldered — the error names each — or when first power is already recorded.
 */
export async function recordFirstPower(ctx: Deps, user: Actor, setId: number, note: string): Promise<Gates> {
  return ctx.db.transaction(async (tx) => {
    const { set } = await editableSet(tx, user, setId);
    if (set.firstPowerAt) throw conflict(`First power was already recorded on ${set.firstPowerAt.toISOString().slice(0, 10)}.`, 'first-power-recorded');
    const gates = await gatesOf(tx, set);
    if (gates.blockers.length) throw conflict(blockersMessage(gates.blockers), 'first-power-blocked', { blockers: gates.blockers });
    const at = await repo.recordFirstPower(tx, set.id, user.id);
    await repo.addGateRecord(tx, set.id, FIRST_POWER_KEY, 'signed', note, user.id);
    return gatesOf(tx, { ...set, firstPowerAt: at, firstPowerBy: user.id });
  });
}

// ---------------------------------------------------------------------------------------------
// Bring-up log

/** The bring-up log, oldest step first (first power itself is on the gates: GET …/gates `firstPower`). */
export async function getBringUp(ctx: Deps, user: Actor, setId: number): Promise<BringUpEntry[]> {
  const { set } = await visibleSet(ctx.db, user, setId);
  return repo.bringUpOf(ctx.db, set.id);
}

export type BringUpInput = Partial<Omit<BringUpEntry, 'id' | 'recordedBy' | 'createdAt'>> & Pick<BringUpEntry, 'step'>;

/** Adds a bring-up step; 409 before first power is recorded (the log hangs off the first-power gate). */
export async function addBringUp(ctx: Deps, user: Actor, setId: number, input: BringUpInput): Promise<BringUpEntry> {
  return ctx.db.transaction(async (tx) => {
    const { set } = await editableSet(tx, user, setId);
    if (!set.firstPowerAt) throw conflict('Record "ready for first power" before logging the bring-up.', 'first-power-not-recorded');
    const id = await repo.addBringUp(
      tx,
      set.id,
      {
        step: input.step,
        setting: input.setting ?? '',
        mainsVolts: input.mainsVolts ?? null,
        currentAmps: input.currentAmps ?? null,
        bPlus: input.bPlus ?? [],
        observations: [...new Set(input.observations ?? [])],
        note: input.note ?? '',
      },
      user.id,
    );
    return (await repo.bringUpOf(tx, set.id)).find((e) => e.id === id)!;
  });
}

// ---------------------------------------------------------------------------------------------
// Parts record

/** Every line in the order recorded (append-only: the newest line of a component is the one that counts). */
export async function getPartsRecord(ctx: Deps, user: Actor, setId: number): Promise<PartsRecordLine[]> {
  const { set } = await visibleSet(ctx.db, user, setId);
  return (await repo.partsRecordOf(ctx.db, set.id)).map(stripSet);
}

const stripSet = ({ setId: _s, ...l }: PartsRecordLine & { setId: number }): PartsRecordLine => l;

export interface NewPartInput {
  text: string;
  uF?: number | null;
  watts?: number | null;
  volts?: number | null;
  kind?: string;
  measuredText?: string;
}

export interface PartsLineInput {
  componentKey: string;
  action: PartsAction;
  newPart?: NewPartInput | null;
  readingId?: number | null;
  reason?: string;
  note?: string;
}

export interface PartsLineSaved {
  line: PartsRecordLine;
  /** Capacitor rule findings for a replaced capacitor (capacitor-checks.ts), and notes on the new part. */
  warnings: { code: string; severity: 'error' | 'warning'; message: string }[];
}

/**
 * Adds a parts-record line. A `replaced` line needs the new part; a line with no prompting reading
 * needs a reason (e.g. capacitors replaced by policy). A resistor's value and measured value are
 * parsed by the measurement core (refused with its message); a replaced capacitor is checked with
 * the capacitor rules on the document with the new part in place (findings come back as warnings).
 */
export async function addPartsLine(ctx: Deps, user: Actor, setId: number, input: PartsLineInput): Promise<PartsLineSaved> {
  return ctx.db.transaction(async (tx) => {
    const { set } = await editableSet(tx, user, setId);
    const doc = await setDocument(tx, set);
    const component = doc.components.find((c) => c.key === input.componentKey);
    if (!component) throw badRequest(`The set\u2019s template has no component "${input.componentKey}".`, 'componentKey', 'unknown-component');
    const readingId = input.readingId ?? null;
    const reason = input.reason?.trim() ?? '';
    if (readingId === null && !reason) throw badRequest('Give the reading that prompted this line, or a reason (e.g. "replaced by policy").', 'reason', 'reason-required');
    if (readingId !== null) {
      // A reading of one of the set's own surveys (a class survey's readings are the class's).
      const [r] = await tx.select({ setId: surveys.setId, assignmentId: surveys.assignmentId }).from(readings).innerJoin(surveys, eq(surveys.id, readings.surveyId)).where(eq(readings.id, readingId));
      if (!r || r.setId !== set.id || r.assignmentId !== null) throw badRequest('That reading is not one of this set\u2019s.', 'readingId', 'unknown-reading');
    }
    if (input.action === 'replaced' && !input.newPart) throw badRequest('A replaced part needs the new part.', 'newPart', 'new-part-required');
    if (input.action !== 'replaced' && input.newPart) throw badRequest('Only a replaced part has a new part.', 'newPart', 'new-part-not-allowed');

    const warnings: PartsLineSaved['warnings'] = [];
    let newPart: NewPart | null = null;
    if (input.newPart) {
      const np = input.newPart;
      const isCap = component.kind === 'capacitor';
      let ohms: number | null = null;
      if (!isCap) {
        const p = parseResistance(np.text);
        if (!p.ok) throw badRequest(p.message, 'newPart.text', 'unparsable-value');
        if (p.state !== 'value') throw badRequest(`A new part has a value, not "${np.text}".`, 'newPart.text', 'unparsable-value');
        ohms = p.ohms;
      } else if (np.uF === undefined || np.uF === null) throw badRequest('A replaced capacitor needs its capacitance (uF).', 'newPart.uF', 'capacitance-required');
      let measuredOhms: number | null = null;
      const measuredText = np.measuredText?.trim() ?? '';
      if (measuredText) {
        const m = parseResistance(measuredText);
        if (!m.ok) throw badRequest(m.message, 'newPart.measuredText', 'unparsable-value');
        measuredOhms = m.ohms;
      }
      newPart = { text: np.text, ohms, uF: np.uF ?? null, watts: np.watts ?? null, volts: np.volts ?? null, kind: np.kind ?? '', measuredText, measuredOhms };
      if (isCap && component.capacitor) {
        const replaced: TemplateDocument = {
          ...doc,
          components: doc.components.map((c) =>
            c.key === component.key ? { ...c, capacitor: { ...c.capacitor!, uF: np.uF!, workingVolts: np.volts ?? c.capacitor!.workingVolts } } : c,
          ),
        };
        const index = doc.components.findIndex((c) => c.key === component.key);
        const tubes = await tubeTypeRecords(tx, tubeTypesOf(doc));
        for (const f of checkCapacitors(replaced, tubes)) {
          if (f.path.startsWith(`components[${index}]`)) warnings.push({ code: f.code, severity: f.severity, message: f.message });
        }
        if (np.volts === undefined || np.volts === null) warnings.push({ code: 'working-volts-unknown', severity: 'warning', message: 'no working voltage given for the new capacitor: the original\u2019s was checked' });
      }
      if (!isCap && np.watts != null && component.ratedWatts !== null && np.watts < component.ratedWatts) {
        warnings.push({ code: 'watts-below-original', severity: 'warning', message: `the new part is rated ${np.watts} W, below the original ${component.ratedWatts} W` });
      }
    }
    const id = await repo.addPartsLine(tx, set.id, { componentKey: component.key, componentRef: component.ref, action: input.action, newPart, readingId, reason, note: input.note ?? '' }, user.id);
    const line = (await repo.partsRecordOf(tx, set.id)).find((l) => l.id === id)!;
    return { line: stripSet(line), warnings };
  });
}

// ---------------------------------------------------------------------------------------------
// Replacement marks

export async function setMarks(ctx: Deps, user: Actor, setId: number, componentKey: string, marks: { ordered: boolean; received: boolean }) {
  return ctx.db.transaction(async (tx) => {
    const { set } = await editableSet(tx, user, setId);
    const doc = await setDocument(tx, set);
    if (!doc.components.some((c) => c.key === componentKey)) throw notFound(`The set\u2019s template has no component "${componentKey}".`, 'no-such-component');
    const m = await repo.setMarks(tx, set.id, componentKey, marks.ordered, marks.received, user.id);
    return { componentKey, ordered: m.orderedAt !== null, orderedAt: m.orderedAt?.toISOString() ?? null, received: m.receivedAt !== null, receivedAt: m.receivedAt?.toISOString() ?? null };
  });
}

// ---------------------------------------------------------------------------------------------
// Provenance labels

export interface LabelRecord {
  id: number;
  /** Null once revoked. */
  token: string | null;
  url: string | null;
  createdBy: PersonRef | null;
  createdAt: string;
  revokedAt: string | null;
}

export const hashToken = (token: string) => createHash('sha256').update(token).digest('hex');

const labelRecord = (base: string | null, l: repo.LabelRow): LabelRecord => ({
  id: l.id,
  token: l.token,
  url: l.token && base ? `${base}/p/${l.token}` : null,
  createdBy: l.createdBy,
  createdAt: l.createdAt,
  revokedAt: l.revokedAt,
});

function needBase(ctx: Pick<Ctx, 'config'>): string {
  const base = ctx.config.publicBaseUrl;
  if (!base) {
    throw conflict(
      'Provenance labels need the instance\u2019s public address: set PUBLIC_BASE_URL (e.g. https://radio.example.org) so that a label\u2019s code opens from outside this machine.',
      'public-base-url-missing',
    );
  }
  return base;
}

/** A new label: an unguessable token (192 random bits); refused while PUBLIC_BASE_URL is unset. */
export async function createLabel(ctx: Pick<Ctx, 'db' | 'config'>, user: Actor, setId: number): Promise<LabelRecord> {
  const base = needBase(ctx);
  return ctx.db.transaction(async (tx) => {
    const { set } = await editableSet(tx, user, setId);
    const token = randomBytes(24).toString('base64url');
    const id = await repo.addLabel(tx, set.id, token, hashToken(token), user.id);
    return labelRecord(base, (await repo.labelsOf(tx, set.id, id))[0]);
  });
}

/** The set's labels, newest first (a revoked one keeps its dates, not its token). */
export async function listLabels(ctx: Pick<Ctx, 'db' | 'config'>, user: Actor, setId: number): Promise<LabelRecord[]> {
  const { set } = await visibleSet(ctx.db, user, setId);
  return (await repo.labelsOf(ctx.db, set.id)).map((l) => labelRecord(ctx.config.publicBaseUrl, l));
}

export async function revokeLabel(ctx: Pick<Ctx, 'db' | 'config'>, user: Actor, setId: number, labelId: number): Promise<LabelRecord> {
  return ctx.db.transaction(async (tx) => {
    const { set } = await editableSet(tx, user, setId);
    const [l] = await repo.labelsOf(tx, set.id, labelId, true);
    if (!l) throw notFound('No such label.');
    if (l.revokedAt) throw conflict('This label is already revoked.', 'label-revoked');
    await repo.revokeLabel(tx, l.id);
    return labelRecord(ctx.config.publicBaseUrl, (await repo.labelsOf(tx, set.id, l.id))[0]);
  });
}
