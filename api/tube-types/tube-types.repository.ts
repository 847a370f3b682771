import { and, asc, count, eq, ilike, inArray, sql } from 'drizzle-orm';
import { tubeTypes, users } from '../../schema/index';
import type { Tx } from '../db';

const columns = {
  id: tubeTypes.id,
  designation: tubeTypes.designation,
  base: tubeTypes.base,
  heating: tubeTypes.heating,
  heaterVolts: tubeTypes.heaterVolts,
  heaterAmps: tubeTypes.heaterAmps,
  pins: tubeTypes.pins,
  ties: tubeTypes.ties,
  notes: tubeTypes.notes,
  createdBy: tubeTypes.createdBy,
  createdByName: users.name,
  createdAt: tubeTypes.createdAt,
  updatedAt: tubeTypes.updatedAt,
};
export type TubeTypeRow = Awaited<ReturnType<typeof findTubeType>> & object;

const escapeLike = (s: string) => s.replace(/[\\%_]/g, (c) => '\\' + c);

export async function listTubeTypes(tx: Tx, q: string | undefined, page: number, pageSize: number) {
  const where = q ? ilike(tubeTypes.designation, `%${escapeLike(q)}%`) : undefined;
  const [items, [{ total }]] = await Promise.all([
    tx.select(columns).from(tubeTypes).leftJoin(users, eq(users.id, tubeTypes.createdBy)).where(where).orderBy(asc(tubeTypes.designation)).limit(pageSize).offset((page - 1) * pageSize),
    tx.select({ total: count() }).from(tubeTypes).where(where),
  ]);
  return { items, total };
}

export async function findTubeType(tx: Tx, designation: string) {
  const [row] = await tx.select(columns).from(tubeTypes).leftJoin(users, eq(users.id, tubeTypes.createdBy)).where(eq(tubeTypes.designation, designation));
  return row;
}

/** The pins of the named tube types (those that exist). */
export async function pinsOf(tx: Tx, designations: string[]) {
  if (designations.length === 0) return [];
  return tx.select({ designation: tubeTypes.designation, pins: tubeTypes.pins }).from(tubeTypes).where(inArray(tubeTypes.designation, designations));
}

export type TubeTypeValues = Omit<typeof tubeTypes.$inferInsert, 'id' | 'createdAt' | 'updatedAt'>;

/** Inserts unless the designation exists; returns the new id or null. */
export async function insertTubeType(tx: Tx, values: TubeTypeValues): Promise<number | null> {
  const [row] = await tx.insert(tubeTypes).values(values).onConflictDoNothing({ target: tubeTypes.designation }).returning({ id: tubeTypes.id });
  return row?.id ?? null;
}

export async function updateTubeType(tx: Tx, designation: string, values: Omit<TubeTypeValues, 'designation' | 'createdBy'>) {
  await tx.update(tubeTypes).set({ ...values, updatedAt: sql`now()` }).where(and(eq(tubeTypes.designation, designation)));
}
