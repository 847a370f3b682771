/**
 * Queries of sets (DESIGN.md §2 "set"): each takes `db` or a transaction `tx`.
 *
 * Visibility of a set: its owner, the users it is shared with (set_shares) and admins. Anyone
 * else gets a 404, never a hint that the set exists. Edits: the same people (owner, shared-with,
 * admin); sharing itself is the owner's or an admin's (see sets.use-cases.ts).
 */
import { sql, type SQL } from 'drizzle-orm';
import type { Role } from '../../schema/index';
import type { SetDeviation } from '../domain/set-format';
import type { Tx } from '../db';
import { notFound } from '../http/errors';

/** Who is asking (the signed-in user's id and roles). */
export interface Actor {
  id: number;
  roles: readonly Role[];
}

/** A set with its template's library columns and owner's name. */
export interface SetRow {
  id: number;
  ownerId: number;
  ownerName: string;
  templateId: number;
  label: string;
  accessionNumber: string;
  customer: string;
  jobStatus: string;
  serial: string;
  restorationLevel: string;
  condition: string;
  complaint: string;
  intakeNotes: string;
  deviations: SetDeviation[];
  firstPowerAt: Date | null;
  firstPowerBy: number | null;
  version: number;
  createdAt: Date;
  updatedAt: Date;
  template: { id: number; ownerId: number; maker: string; model: string; chassisNumber: string; power: string; hotChassis: boolean; latestPublishedNumber: number | null };
}

/** What a caller may do with a set they can see. */
export interface SetAccess {
  set: SetRow;
  /** The caller owns the set. */
  owner: boolean;
  /** The caller is an admin. */
  admin: boolean;
  /** The set is shared with the caller. */
  shared: boolean;
}

type RawSet = {
  id: number;
  owner_id: number;
  owner_name: string;
  template_id: number;
  label: string;
  accession_number: string;
  customer: string;
  job_status: string;
  serial: string;
  restoration_level: string;
  condition: string;
  complaint: string;
  intake_notes: string;
  deviations: SetDeviation[];
  first_power_at: string | Date | null;
  first_power_by: number | null;
  version: number;
  created_at: string | Date;
  updated_at: string | Date;
  t_owner_id: number;
  maker: string;
  model: string;
  chassis_number: string;
  power: string;
  hot_chassis: boolean;
  latest_published_number: number | null;
  shared: boolean;
};

const toDate = (v: string | Date): Date => (v instanceof Date ? v : new Date(v));

export function setRowOf(r: RawSet): SetRow {
  return {
    id: r.id,
    ownerId: r.owner_id,
    ownerName: r.owner_name,
    templateId: r.template_id,
    label: r.label,
    accessionNumber: r.accession_number,
    customer: r.customer,
    jobStatus: r.job_status,
    serial: r.serial,
    restorationLevel: r.restoration_level,
    condition: r.condition,
    complaint: r.complaint,
    intakeNotes: r.intake_notes,
    deviations: r.deviations ?? [],
    firstPowerAt: r.first_power_at === null ? null : toDate(r.first_power_at),
    firstPowerBy: r.first_power_by,
    version: r.version,
    createdAt: toDate(r.created_at),
    updatedAt: toDate(r.updated_at),
    template: {
      id: r.template_id,
      ownerId: r.t_owner_id,
      maker: r.maker,
      model: r.model,
      chassisNumber: r.chassis_number,
      power: r.power,
      hotChassis: r.hot_chassis,
      latestPublishedNumber: r.latest_published_number,
    },
  };
}

/** The select list of a set row (aliases: s = sets, t = chassis_templates, u = users). `viewer` fills `shared`. */
export const SET_SELECT = (viewer: number): SQL => sql`
  s.id, s.owner_id, u.name AS owner_name, s.template_id, s.label, s.accession_number, s.customer, s.job_status,
  s.serial, s.restoration_level, s.condition, s.complaint, s.intake_notes, s.deviations, s.first_power_at,
  s.first_power_by, s.version, s.created_at, s.updated_at,
  t.owner_id AS t_owner_id, t.maker, t.model, t.chassis_number, t.power::text AS power, t.latest_published_number,
  coalesce((SELECT (v.content->'chassis'->>'hotChassis')::boolean FROM template_versions v
            WHERE v.template_id = t.id AND v.state <> 'draft' ORDER BY v.number DESC LIMIT 1),
           t.power IN ('ac-dc', 'autotransformer')) AS hot_chassis,
  EXISTS (SELECT 1 FROM set_shares sh WHERE sh.set_id = s.id AND sh.user_id = ${viewer}) AS shared`;

export const SET_FROM = sql`sets s JOIN chassis_templates t ON t.id = s.template_id JOIN users u ON u.id = s.owner_id`;

/** One set as `viewer` sees it (no access decision); `lock` takes the set's row lock. */
export async function findSet(tx: Tx, setId: number, viewer: number, lock = false): Promise<{ set: SetRow; shared: boolean } | null> {
  const r = await tx.execute<RawSet>(sql`SELECT ${SET_SELECT(viewer)} FROM ${SET_FROM} WHERE s.id = ${setId} ${lock ? sql`FOR UPDATE OF s` : sql``}`);
  const row = r.rows[0];
  return row ? { set: setRowOf(row), shared: row.shared } : null;
}

/**
 * The set if `user` may see it (owner, shared with them, admin); a 404 otherwise — the same answer
 * as for a set that does not exist. One query.
 */
export async function visibleSet(tx: Tx, user: Actor, setId: number, lock = false): Promise<SetAccess> {
  const found = await findSet(tx, setId, user.id, lock);
  if (!found) throw notFound('No such set.', 'not-found');
  const owner = found.set.ownerId === user.id;
  const admin = user.roles.includes('admin');
  if (!owner && !admin && !found.shared) throw notFound('No such set.', 'not-found');
  return { set: found.set, owner, admin, shared: found.shared };
}

/**
 * The set if `user` may change it: the same people who see it (owner, shared-with, admin). Takes
 * the set's row lock by default (call inside a transaction).
 */
export async function editableSet(tx: Tx, user: Actor, setId: number, lock = true): Promise<SetAccess> {
  return visibleSet(tx, user, setId, lock);
}

/** The SQL condition "the viewer may see set s" (for lists and joins). */
export function visibleCondition(user: Actor): SQL {
  if (user.roles.includes('admin')) return sql`true`;
  return sql`(s.owner_id = ${user.id} OR EXISTS (SELECT 1 FROM set_shares sh2 WHERE sh2.set_id = s.id AND sh2.user_id = ${user.id}))`;
}
