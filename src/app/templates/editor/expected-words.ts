import type { ExpectedReading } from '@domain/chassis-network';
import { formatOhms } from '@domain/notation';
import type { TemplateDocument } from '@domain/template-format';

/** The smallest share of the meter's current for a path to be named as lowering a reading. */
export const NAMED_SHARE = 0.01;

/** Ohms to four significant figures, as a technician writes them (`154.3 kΩ`). */
export function showOhms(ohms: number): string {
  return formatOhms(Number(ohms.toPrecision(4)));
}

/** The in-circuit value the network gives a test point, in words. */
export function inCircuitText(r: ExpectedReading | undefined): string {
  if (r === undefined) return '—';
  switch (r.leftOut) {
    case 'non-network-kind':
      return 'not in the network (open at DC or non-linear)';
    case 'pair-relation':
      return 'a ratio of two readings';
    case 'unknown-component':
      return 'no such component';
    default:
      return r.inCircuitOhms === null ? 'open (no DC path)' : showOhms(r.inCircuitOhms);
  }
}

/**
 * The parts on the parallel paths that lower a component check, named by reference (a pot's
 * halves by its reference, an internal tie as `V3 tie 1–7`), most current first.
 */
export function parallelRefs(r: ExpectedReading | undefined, doc: TemplateDocument): string[] {
  if (r?.parallelPaths == null) return [];
  const out: string[] = [];
  const edges = [...r.parallelPaths.edges].filter((e) => Math.abs(e.share) >= NAMED_SHARE).sort((a, b) => Math.abs(b.share) - Math.abs(a.share));
  for (const e of edges) {
    let name: string;
    const tie = /^tie:([^.]+)\.(\d+)-[^.]+\.(\d+)$/.exec(e.edgeId);
    if (tie !== null) name = `${tie[1]} tie ${tie[2]}–${tie[3]}`;
    else {
      const key = e.edgeId.replace(/:(a|b)$/, '');
      name = doc.components.find((c) => c.key === key)?.ref ?? e.edgeId;
    }
    if (!out.includes(name)) out.push(name);
  }
  return out;
}

/** How far in circuit reads below the nominal: `−33.6 %`, or '' when nothing lowers it. */
export function loweredText(r: ExpectedReading | undefined): string {
  if (r?.loweredByPct == null || r.loweredByPct < 0.05) return '';
  return `−${r.loweredByPct.toFixed(1)} %`;
}
