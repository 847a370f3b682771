/**
 * Meter profiles (DESIGN.md §2 "meter profile"): a user's meters, personal — only their owner sees
 * or changes them (admins too get a 404 for someone else's: a meter is not shared). A profile is
 * archived, never deleted: surveys keep the snapshot they started with and their link.
 */
import { and, asc, eq, sql } from 'drizzle-orm';
import { meterProfiles } from '../../schema/index';
import { meterProblems, type MeterProfile } from '../domain/meter';
import type { MeterCheckKind, MeterProfileRecord } from '../domain/set-format';
import type { Db, Tx } from '../db';
import { AppError, conflict, notFound } from '../http/errors';
import type { Actor } from '../sets/sets.repository';

type Deps = { db: Db };

export interface MeterProfileInput {
  name: string;
  profile: MeterProfile;
  checkKind?: MeterCheckKind;
  checkDate?: string | null;
  checkResistorOhms?: number | null;
  checkResistorTolerancePct?: number | null;
}

export interface MeterProfileUpdate extends MeterProfileInput {
  version: number;
  archived?: boolean;
}

type Row = typeof meterProfiles.$inferSelect;

export function recordOf(r: Row): MeterProfileRecord {
  return {
    id: r.id,
    name: r.name,
    profile: r.profile as MeterProfile,
    checkKind: r.checkKind as MeterCheckKind,
    checkDate: r.checkDate,
    checkResistorOhms: r.checkResistorOhms,
    checkResistorTolerancePct: r.checkResistorTolerancePct,
    archived: r.archived,
    version: r.version,
    updatedAt: r.updatedAt.toISOString(),
  };
}

const DIGITAL_FIELDS = ['fullScaleOhms', 'resolutionOhms', 'pctOfReading', 'counts'];
const ANALOGUE_FIELDS = ['centreOhms', 'arcFraction'];

/** The domain's problems with a profile, plus fields that belong to the other kind of meter. */
export function profileProblems(p: MeterProfile): { field: string; message: string }[] {
  const problems = meterProblems(p, 'profile');
  if (problems.length) return problems;
  const own = p.kind === 'digital' ? DIGITAL_FIELDS : ANALOGUE_FIELDS;
  const out: { field: string; message: string }[] = [];
  p.ranges.forEach((r, i) => {
    for (const k of Object.keys(r)) if (!own.includes(k)) out.push({ field: `profile.ranges[${i}].${k}`, message: `is not a field of a ${p.kind} range` });
  });
  if (p.kind === 'analogue' && 'autorange' in p) out.push({ field: 'profile.autorange', message: 'only a digital meter autoranges' });
  return out;
}

function checkProfile(input: MeterProfileInput): void {
  const problems = profileProblems(input.profile);
  if (problems.length) {
    const f = problems[0];
    throw new AppError(400, 'validation', `The meter profile has ${problems.length === 1 ? 'a problem' : `${problems.length} problems`}: "${f.field}" ${f.message}.`, { field: f.field, problems });
  }
  if ((input.checkResistorTolerancePct ?? null) !== null && (input.checkResistorOhms ?? null) === null) {
    throw new AppError(400, 'validation', '"checkResistorTolerancePct" needs the check resistor\'s value (checkResistorOhms).', { field: 'checkResistorTolerancePct' });
  }
}

/** The caller's own profile; anyone else's (also for admins) is a 404. */
export async function ownProfile(tx: Tx, actor: Actor, id: number, lock = false): Promise<Row> {
  const q = tx.select().from(meterProfiles).where(and(eq(meterProfiles.id, id), eq(meterProfiles.ownerId, actor.id)));
  const [row] = lock ? await q.for('update') : await q;
  if (!row) throw notFound('No such meter profile.');
  return row;
}

export async function listProfiles(ctx: Deps, actor: Actor, q: { archived?: boolean }): Promise<{ items: MeterProfileRecord[] }> {
  const rows = await ctx.db
    .select()
    .from(meterProfiles)
    .where(and(eq(meterProfiles.ownerId, actor.id), q.archived ? undefined : eq(meterProfiles.archived, false)))
    .orderBy(asc(meterProfiles.archived), asc(meterProfiles.name), asc(meterProfiles.id));
  return { items: rows.map(recordOf) };
}

export async function getProfile(ctx: Deps, actor: Actor, id: number): Promise<MeterProfileRecord> {
  return recordOf(await ownProfile(ctx.db, actor, id));
}

const valuesOf = (input: MeterProfileInput) => ({
  name: input.name.trim(),
  profile: input.profile,
  checkKind: input.checkKind ?? 'check',
  checkDate: input.checkDate ?? null,
  checkResistorOhms: input.checkResistorOhms ?? null,
  checkResistorTolerancePct: input.checkResistorOhms == null ? null : (input.checkResistorTolerancePct ?? 1),
});

export async function createProfile(ctx: Deps, actor: Actor, input: MeterProfileInput): Promise<MeterProfileRecord> {
  checkProfile(input);
  const [row] = await ctx.db
    .insert(meterProfiles)
    .values({ ownerId: actor.id, ...valuesOf(input) })
    .returning();
  return recordOf(row);
}

export async function updateProfile(ctx: Deps, actor: Actor, id: number, input: MeterProfileUpdate): Promise<MeterProfileRecord> {
  checkProfile(input);
  return ctx.db.transaction(async (tx) => {
    const row = await ownProfile(tx, actor, id, true);
    if (row.version !== input.version) throw conflict(`This meter profile was changed since you opened it (version ${row.version}, yours ${input.version}).`, 'stale-version', { current: recordOf(row) });
    const [out] = await tx
      .update(meterProfiles)
      .set({ ...valuesOf(input), archived: input.archived ?? row.archived, version: row.version + 1, updatedAt: sql`now()` })
      .where(eq(meterProfiles.id, id))
      .returning();
    return recordOf(out);
  });
}

/** Archives the profile (kept for the surveys that used it); archiving twice is a no-op. */
export async function archiveProfile(ctx: Deps, actor: Actor, id: number): Promise<MeterProfileRecord> {
  return ctx.db.transaction(async (tx) => {
    const row = await ownProfile(tx, actor, id, true);
    if (row.archived) return recordOf(row);
    const [out] = await tx
      .update(meterProfiles)
      .set({ archived: true, version: row.version + 1, updatedAt: sql`now()` })
      .where(eq(meterProfiles.id, id))
      .returning();
    return recordOf(out);
  });
}
