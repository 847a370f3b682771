/**
 * The shared tube-type library: anyone signed in reads it, authors and admins add records, only a
 * record's creator or an admin changes it.
 */
import type { Role } from '../../schema/index';
import type { BaseName, Electrode, Heating, TemplateProblem, TubePin } from '../domain/template-format';
import type { Db } from '../db';
import { AppError, conflict, forbidden, notFound } from '../http/errors';
import * as repo from './tube-types.repository';

export interface Actor {
  id: number;
  roles: readonly Role[];
}

export interface TubeTypeInput {
  base: BaseName;
  heating: Heating;
  heaterVolts: number;
  heaterAmps: number;
  pins: TubePin[];
  ties?: [number, number][];
  notes?: string;
}

/**
 * Pins on each base (common practice: a noval has nine pins, an octal eight, a loctal eight
 * around its locking key, the old large bases four to seven). A tube may use fewer (an octal
 * rectifier often has pins 2, 4, 6 and 8 only), never more.
 */
export const PIN_COUNT: Readonly<Record<BaseName, number>> = {
  'miniature-7': 7,
  noval: 9,
  magnoval: 9,
  octal: 8,
  loctal: 8,
  'large-4': 4,
  'large-5': 5,
  'large-6': 6,
  'large-7-small': 7,
  'large-7-large': 7,
};

const HEATER_ELECTRODES: Record<Heating, readonly Electrode[]> = { indirect: ['h'], direct: ['f'] };

/** Problems of a tube-type record beyond its shape, with their paths. */
export function tubeTypeProblems(input: TubeTypeInput): TemplateProblem[] {
  const out: TemplateProblem[] = [];
  const max = PIN_COUNT[input.base];
  const seen = new Map<number, number>();
  input.pins.forEach((p, i) => {
    if (p.pin > max) out.push({ path: `pins[${i}].pin`, message: `a ${input.base} base has pins 1 to ${max}.` });
    if (seen.has(p.pin)) out.push({ path: `pins[${i}].pin`, message: `pin ${p.pin} is listed already at pins[${seen.get(p.pin)}].` });
    else seen.set(p.pin, i);
  });
  const heaterPins = input.pins.filter((p) => HEATER_ELECTRODES[input.heating].includes(p.electrode));
  if (heaterPins.length < 2)
    out.push({ path: 'pins', message: `a ${input.heating}ly heated tube needs two pins of electrode "${HEATER_ELECTRODES[input.heating][0]}" (the ${input.heating === 'direct' ? 'filament' : 'heater'} ends).` });
  (input.ties ?? []).forEach(([a, b], i) => {
    for (const [k, n] of [[0, a], [1, b]] as const) {
      const pin = input.pins.find((p) => p.pin === n);
      if (!pin) out.push({ path: `ties[${i}][${k}]`, message: `pin ${n} is not among the pins.` });
      else if (pin.electrode === 'IC') out.push({ path: `ties[${i}][${k}]`, message: `pin ${n} is IC (internally connected): never a tie point.` });
    }
    if (a === b) out.push({ path: `ties[${i}][1]`, message: 'a tie joins two different pins.' });
  });
  return out;
}

export function problemsError(problems: TemplateProblem[], what: string): AppError {
  const first = problems[0];
  return new AppError(400, 'validation', `${what} has ${problems.length === 1 ? 'a problem' : `${problems.length} problems`}: "${first.path}" ${first.message}`, {
    field: first.path,
    problems,
  });
}

const shape = (r: NonNullable<Awaited<ReturnType<typeof repo.findTubeType>>>, actor: Actor) => ({
  designation: r.designation,
  base: r.base as BaseName,
  heating: r.heating,
  heaterVolts: r.heaterVolts,
  heaterAmps: r.heaterAmps,
  pins: r.pins as TubePin[],
  ties: r.ties as [number, number][],
  notes: r.notes,
  createdBy: r.createdBy !== null ? { id: r.createdBy, name: r.createdByName ?? '' } : null,
  canEdit: mayEdit(actor, r.createdBy),
  createdAt: r.createdAt.toISOString(),
  updatedAt: r.updatedAt.toISOString(),
});

const mayEdit = (actor: Actor, createdBy: number | null) => actor.roles.includes('admin') || (createdBy === actor.id && actor.roles.includes('author'));

export async function listTubeTypes(ctx: { db: Db }, actor: Actor, q: { q?: string; page: number; pageSize: number }) {
  const r = await repo.listTubeTypes(ctx.db, q.q?.trim() || undefined, q.page, q.pageSize);
  return { items: r.items.map((x) => shape(x, actor)), total: r.total, page: q.page, pageSize: q.pageSize };
}

export async function getTubeType(ctx: { db: Db }, actor: Actor, designation: string) {
  const r = await repo.findTubeType(ctx.db, designation.toUpperCase());
  if (!r) throw notFound(`No tube type ${designation} in the library.`);
  return shape(r, actor);
}

export async function createTubeType(ctx: { db: Db }, actor: Actor, input: TubeTypeInput & { designation: string }) {
  const problems = tubeTypeProblems(input);
  if (problems.length) throw problemsError(problems, 'The tube type');
  const designation = input.designation.toUpperCase();
  const id = await repo.insertTubeType(ctx.db, { ...recordOf(input), designation, createdBy: actor.id });
  if (id === null) throw conflict(`Tube type ${designation} is in the library already.`, 'designation-taken');
  return getTubeType(ctx, actor, designation);
}

export async function updateTubeType(ctx: { db: Db }, actor: Actor, designation: string, input: TubeTypeInput) {
  const problems = tubeTypeProblems(input);
  if (problems.length) throw problemsError(problems, 'The tube type');
  const d = designation.toUpperCase();
  const existing = await repo.findTubeType(ctx.db, d);
  if (!existing) throw notFound(`No tube type ${designation} in the library.`);
  if (!mayEdit(actor, existing.createdBy)) throw forbidden('Only the author who entered this tube type, or an admin, may change it.', 'not-creator');
  await repo.updateTubeType(ctx.db, d, recordOf(input));
  return getTubeType(ctx, actor, d);
}

const recordOf = (input: TubeTypeInput) => ({
  base: input.base,
  heating: input.heating,
  heaterVolts: input.heaterVolts,
  heaterAmps: input.heaterAmps,
  pins: [...input.pins].sort((a, b) => a.pin - b.pin),
  ties: input.ties ?? [],
  notes: input.notes ?? '',
});
