import type { NetworkEdge } from '@domain/network';
import type { ComponentKind } from '@domain/words';
import { EdgeRowValue, edgeOfRow } from './network-request';

/** One pasted line and what it became. */
export interface PastedLine {
  /** 1-based line number in the pasted text. */
  readonly line: number;
  readonly text: string;
  readonly row: EdgeRowValue;
  readonly edge: NetworkEdge | null;
  readonly problems: readonly string[];
}

/**
 * Reads a network pasted as text: one part per line, `id, node a, node b, ohms, kind, tolerance %`
 * (kind and tolerance optional). Cells are split on tabs when the line has one (a spreadsheet
 * copy, and the way to write a decimal comma such as 4,7k), else on commas. Blank lines, lines
 * starting with `#` and a header line starting with `id` are skipped.
 */
export function parsePastedEdges(text: string): PastedLine[] {
  const out: PastedLine[] = [];
  const seen = new Map<string, number>();
  text.split(/\r?\n/).forEach((raw, i) => {
    const trimmed = raw.trim();
    if (trimmed === '' || trimmed.startsWith('#') || /^id\s*[,\t]/i.test(trimmed)) return;
    const cells = (raw.includes('\t') ? raw.split('\t') : raw.split(',')).map((c) => c.trim());
    const row: EdgeRowValue = {
      id: cells[0] ?? '',
      a: cells[1] ?? '',
      b: cells[2] ?? '',
      ohms: cells[3] ?? '',
      kind: (cells[4] ?? '') as ComponentKind | '',
      tolerance: cells[5] ?? '',
    };
    const { edge, problems } = edgeOfRow(row);
    const all = [...problems];
    if (cells.length > 6) all.push(`${cells.length} cells: a line has at most 6 (id, node a, node b, ohms, kind, tolerance %); use tabs if a value has a decimal comma`);
    if (edge) {
      const before = seen.get(edge.id);
      if (before !== undefined) all.push(`${edge.id} is already on line ${before}`);
      else seen.set(edge.id, i + 1);
    }
    out.push({ line: i + 1, text: raw, row, edge: all.length ? null : edge, problems: all });
  });
  return out;
}

/** Rows as paste text (the example, or the rows the user built), comma separated. */
export function rowsAsText(rows: readonly EdgeRowValue[]): string {
  return rows
    .map((r) => {
      const cells = [r.id, r.a, r.b, r.ohms, r.kind, r.tolerance];
      while (cells.length > 4 && cells[cells.length - 1] === '') cells.pop();
      return cells.join(cells.some((c) => c.includes(',')) ? '\t' : ', ');
    })
    .join('\n');
}
