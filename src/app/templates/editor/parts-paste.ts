import type { Component, Dielectric, TemplateComponentKind, TemplateDocument, TubeTypeRecord } from '@domain/template-format';
import { TEMPLATE_COMPONENT_KINDS } from '@domain/template-format';
import { readNominal } from './nominal-entry';
import { nodeStanding } from './node-options';

/**
 * A parts list pasted from a spreadsheet or typed as CSV: one part per line, the columns
 *
 *   ref, value, tolerance, rating, kind, node a, node b
 *
 * - value: a resistance as written (470k, 4K7, 2.2 MΩ, colour bands, open, short); for a
 *   capacitor its capacitance (0.05, .047 µF, 40uF, 40 mfd, 100pF, 4.7nF — a bare number is µF,
 *   as parts lists of the era print it);
 * - tolerance: 10, 10 %, ±10 %, or an IEC 60062 letter (F G J K M); empty = the one the value
 *   carries (4K7J, colour bands) or none;
 * - rating: watts (½, 1/2, 0.5, 2W) or volts (450V, 450 WV, 450VDC: a capacitor's working volts,
 *   another part's rated volts);
 * - kind: a component kind (carbon-composition …) or a short word (carbon, film, metal, ww, pot,
 *   cap, fuse …); empty = from the reference (R → carbon composition, C → capacitor, T and L →
 *   winding, F → fuse, W → wire);
 * - node a, node b: `V3.7`, chassis, B-, B+ or a junction name (an undeclared name becomes a new
 *   junction when applied). For an electrolytic, node a is its + end.
 *
 * Cells are split on tabs when the line has one (a spreadsheet copy; decimal commas are safe
 * there), else on commas (double quotes protect a comma). A first line whose first cell is `ref`
 * is the header; blank lines and lines starting with `#` are skipped.
 */
export const PASTE_COLUMNS = ['ref', 'value', 'tolerance', 'rating', 'kind', 'node a', 'node b'] as const;

export type PastedPart = Omit<Component, 'key' | 'stageKey'>;

export interface PastedRow {
  /** 1-based line in the pasted text. */
  line: number;
  cells: string[];
  /** The part as it would be added; null when the row has problems. */
  part: PastedPart | null;
  /** What the value was read as (`470 kΩ ±10 %`, `0.047 µF 400 V`). */
  reading: string;
  problems: string[];
  /** Things worth knowing that do not stop the row (a new junction, a defaulted kind). */
  notes: string[];
  /** Node names that would become new junctions. */
  newJunctions: string[];
}

export interface PastePreview {
  header: boolean;
  rows: PastedRow[];
  good: number;
  bad: number;
}

/** Splits one line into cells: on tabs if it has one, else on commas outside double quotes. */
export function splitCells(line: string): string[] {
  if (line.includes('\t')) return line.split('\t').map((c) => c.trim());
  const out: string[] = [];
  let cell = '';
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i];
    if (ch === '"') {
      if (quoted && line[i + 1] === '"') {
        cell += '"';
        i++;
      } else quoted = !quoted;
    } else if (ch === ',' && !quoted) {
      out.push(cell.trim());
      cell = '';
    } else cell += ch;
  }
  out.push(cell.trim());
  return out;
}

const KIND_WORDS: Readonly<Record<string, TemplateComponentKind>> = {
  carbon: 'carbon-composition',
  comp: 'carbon-composition',
  composition: 'carbon-composition',
  cc: 'carbon-composition',
  cf: 'carbon-film',
  film: 'carbon-film',
  'carbon film': 'carbon-film',
  mf: 'metal-film',
  metal: 'metal-film',
  'metal film': 'metal-film',
  ww: 'wirewound',
  'wire-wound': 'wirewound',
  'wire wound': 'wirewound',
  potentiometer: 'pot',
  control: 'pot',
  cap: 'capacitor',
  condenser: 'capacitor',
  coil: 'winding',
  transformer: 'winding',
  choke: 'winding',
  filament: 'heater',
  'pilot lamp': 'lamp',
  link: 'wire',
  jumper: 'wire',
  diode: 'rectifier',
  selenium: 'rectifier',
};

const REF_KINDS: ReadonlyArray<[RegExp, TemplateComponentKind]> = [
  [/^R[0-9]/i, 'carbon-composition'],
  [/^C[0-9]/i, 'capacitor'],
  [/^[TL][0-9]/i, 'winding'],
  [/^F[0-9]/i, 'fuse'],
  [/^W[0-9]/i, 'wire'],
];

export function kindOf(text: string, ref: string): { kind: TemplateComponentKind | null; defaulted: boolean } {
  const t = text.trim().toLowerCase();
  if (t !== '') {
    if ((TEMPLATE_COMPONENT_KINDS as readonly string[]).includes(t)) return { kind: t as TemplateComponentKind, defaulted: false };
    return { kind: KIND_WORDS[t] ?? null, defaulted: false };
  }
  const hit = REF_KINDS.find(([re]) => re.test(ref));
  return { kind: hit?.[1] ?? null, defaulted: true };
}

/** A capacitance as parts lists print it, in µF; a bare number is µF (`mfd`, `mf` are µF too). */
export function readCapacitance(text: string): { uF: number } | { message: string } {
  const m = /^([0-9]*[.,]?[0-9]+)\s*(µ|μ|u|n|p|mmf|mmfd|mfd|mf)?\s*(f|fd)?$/i.exec(text.trim());
  if (m === null) return { message: `'${text}' is not a capacitance (0.05, 40 µF, 100 pF, 40 mfd)` };
  const n = Number(m[1].replace(',', '.'));
  const unit = (m[2] ?? '').toLowerCase();
  const uF = unit === 'n' ? n / 1000 : unit === 'p' || unit === 'mmf' || unit === 'mmfd' ? n / 1e6 : n;
  if (!(uF > 0)) return { message: `'${text}': a capacitance must be above zero` };
  return { uF: Number(uF.toPrecision(12)) };
}

/** A tolerance cell: `10`, `10 %`, `±10%`, or an IEC 60062 letter. */
export function readTolerance(text: string): { pct: number | null } | { message: string } {
  const t = text.trim();
  if (t === '') return { pct: null };
  const letters: Readonly<Record<string, number>> = { F: 1, G: 2, J: 5, K: 10, M: 20 };
  if (letters[t] !== undefined) return { pct: letters[t] };
  const m = /^(?:±|\+\/-|\+-)?\s*([0-9]+(?:[.,][0-9]+)?)\s*%?$/.exec(t);
  if (m === null) return { message: `tolerance '${t}' is not a percentage (10, ±10 %, K)` };
  const pct = Number(m[1].replace(',', '.'));
  if (!(pct > 0 && pct <= 100)) return { message: `tolerance '${t}' must be above 0 and at most 100 %` };
  return { pct };
}

/** A rating cell: watts (½, 1/2, 0.5, 2W) or volts (450V, 450 WV, 450VDC). */
export function readRating(text: string): { watts: number | null; volts: number | null } | { message: string } {
  const t = text.trim().replace(/\s+/g, '');
  if (t === '') return { watts: null, volts: null };
  const v = /^([0-9]+(?:[.,][0-9]+)?)(?:v|wv|vdc|vdcw|vac)$/i.exec(t);
  if (v !== null) return { watts: null, volts: Number(v[1].replace(',', '.')) };
  const w = /^(½|¼|⅛|[0-9]+\/[0-9]+|[0-9]*[.,]?[0-9]+)(?:w|watts?)?$/i.exec(t);
  if (w === null) return { message: `rating '${text.trim()}' is neither watts (½, 0.5, 2W) nor volts (450V)` };
  const glyph: Readonly<Record<string, number>> = { '½': 0.5, '¼': 0.25, '⅛': 0.125 };
  let watts: number;
  if (glyph[w[1]] !== undefined) watts = glyph[w[1]];
  else if (w[1].includes('/')) {
    const [a, b] = w[1].split('/').map(Number);
    watts = a / b;
  } else watts = Number(w[1].replace(',', '.'));
  if (!(watts > 0 && watts <= 1000)) return { message: `rating '${text.trim()}' is out of range` };
  return { watts, volts: null };
}

const REF = /^[A-Za-z][A-Za-z0-9.+/-]{0,15}$/;

/** Reads a pasted parts list against the document (nodes, refs already taken); nothing is changed. */
export function previewParts(text: string, doc: TemplateDocument, tubeTypes: ReadonlyMap<string, TubeTypeRecord>): PastePreview {
  const rows: PastedRow[] = [];
  const refs = new Map(doc.components.map((c) => [c.ref.toUpperCase(), 'the template'] as [string, string]));
  let header = false;
  let first = true;
  text.split(/\r?\n/).forEach((raw, i) => {
    const trimmed = raw.trim();
    if (trimmed === '' || trimmed.startsWith('#')) return;
    const cells = splitCells(raw);
    if (first && /^ref/i.test(cells[0] ?? '')) {
      header = true;
      first = false;
      return;
    }
    first = false;
    rows.push(readRow(i + 1, cells, doc, tubeTypes, refs));
  });
  const good = rows.filter((r) => r.part !== null).length;
  return { header, rows, good, bad: rows.length - good };
}

function readRow(line: number, cells: string[], doc: TemplateDocument, tubeTypes: ReadonlyMap<string, TubeTypeRecord>, refs: Map<string, string>): PastedRow {
  const [ref = '', value = '', tolText = '', ratingText = '', kindText = '', a = '', b = ''] = cells;
  const problems: string[] = [];
  const notes: string[] = [];
  const newJunctions: string[] = [];
  let reading = '';
  if (cells.length > PASTE_COLUMNS.length) problems.push(`${cells.length} cells: a line has at most ${PASTE_COLUMNS.length} (${PASTE_COLUMNS.join(', ')}); use tabs if a value has a comma`);
  if (!REF.test(ref)) problems.push(ref === '' ? 'the reference is missing' : `reference '${ref}' must start with a letter (R12, C8, T2)`);
  else if (refs.has(ref.toUpperCase())) problems.push(`${ref} is already in ${refs.get(ref.toUpperCase())}`);
  else refs.set(ref.toUpperCase(), `line ${line}`);

  const { kind, defaulted } = kindOf(kindText, ref);
  if (kind === null) problems.push(kindText.trim() === '' ? `no kind given and none follows from '${ref}': name the kind` : `kind '${kindText.trim()}' is not a component kind`);
  else if (defaulted) notes.push(`kind ${kind} (from the reference)`);
  if (kind === 'pot') problems.push('a pot needs its wiper position: add it with the component form');

  const tol = readTolerance(tolText);
  if ('message' in tol) problems.push(tol.message);
  const rating = readRating(ratingText);
  if ('message' in rating) problems.push(rating.message);

  let part: PastedPart | null = null;
  const base = {
    ref,
    kind: kind ?? 'carbon-composition',
    nodes: [a.trim(), b.trim()] as [string, string],
    wiper: null,
    tolerancePct: 'pct' in tol ? tol.pct : null,
    ratedWatts: 'watts' in rating ? rating.watts : null,
    ratedVolts: 'volts' in rating ? rating.volts : null,
    voltsAcross: null,
    critical: null,
    fuseRole: kind === 'fuse',
    mainsSide: false,
    nonLinear: kind === 'thermistor' || kind === 'ballast' || kind === 'rectifier',
    valueSource: 'service-data' as const,
    capacitor: null,
    note: '',
  };

  if (kind === 'capacitor') {
    const cap = readCapacitance(value);
    const volts = 'volts' in rating ? rating.volts : null;
    if ('message' in cap) problems.push(cap.message);
    if (volts === null) problems.push('a capacitor needs its working volts in the rating column (450V)');
    if ('uF' in cap && volts !== null) {
      const dielectric: Dielectric = cap.uF >= 1 ? 'electrolytic' : 'paper';
      reading = `${cap.uF} µF ${volts} V ${dielectric}`;
      notes.push(`${dielectric}${dielectric === 'electrolytic' ? ', polarised (+ at node a)' : ''}: change in the component form if not`);
      part = {
        ...base,
        nominal: { state: 'open' },
        tolerancePct: base.tolerancePct,
        ratedVolts: null,
        capacitor: { uF: cap.uF, workingVolts: volts, dielectric, polarised: dielectric === 'electrolytic', can: null, safetyClass: null, lineConnected: false },
      };
    }
  } else if (kind === 'wire') {
    reading = 'short (a wire)';
    part = { ...base, nominal: { state: 'short' } };
  } else {
    const n = readNominal(value);
    if (!n.ok) problems.push(n.message);
    else {
      reading = n.display;
      const tolerancePct = base.tolerancePct ?? n.tolerancePct;
      if (base.tolerancePct === null && n.tolerancePct !== null) notes.push(`tolerance ±${n.tolerancePct} % from the value`);
      notes.push(...n.warnings);
      part = { ...base, nominal: n.nominal, tolerancePct };
    }
  }

  for (const [label, name] of [['node a', a], ['node b', b]] as const) {
    const s = nodeStanding(name, doc, tubeTypes);
    if (s.kind === 'problem') problems.push(`${label}: ${s.message}`);
    else if (s.kind === 'new-junction' && !newJunctions.includes(name.trim())) newJunctions.push(name.trim());
  }
  if (a.trim() !== '' && a.trim() === b.trim()) problems.push(`both nodes are '${a.trim()}'`);
  if (newJunctions.length) notes.push(`new junction${newJunctions.length > 1 ? 's' : ''} ${newJunctions.join(', ')}`);

  return { line, cells, part: problems.length ? null : part, reading, problems, notes, newJunctions };
}
