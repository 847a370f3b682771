/**
 * Rule checks on a template's capacitor list (DESIGN.md §2 "capacitor list"; issue 4 item 7;
 * check-values.md §5 "Filter capacitors" and "Safety before first power-up").
 *
 * - **Working voltage** at least the highest voltage the capacitor's position can reach,
 *   including warm-up before the tubes conduct, when nothing loads the supply and every node on
 *   the B+ side sits at the no-load peak [CP, check-values.md §5]:
 *   - the supply peak: √2 × the HV winding's RMS (the `voltsAcross` the author recorded on a
 *     winding at a rectifier plate; half of it for a winding from plate to plate) for a
 *     transformer or autotransformer set, √2 × the line for an AC/DC set, both × the mains factor;
 *   - where the template cannot tell (no winding voltage recorded, a battery set), the highest
 *     voltage the service data records on the B+ side (`voltsAcross` of a part touching it, e.g.
 *     a bleeder) — an operating voltage, not the warm-up peak: a warning says so once;
 *   - a capacitor's own `voltsAcross` counts where it is higher (× the mains factor);
 *   - "on the B+ side" = a DC path from the rectifier's output (the cathode of an indirectly
 *     heated rectifier, the filament of a directly heated one; else the node `B+`) that does not
 *     pass through the return (`chassis`, `B-` and what 0-Ω links join to them), in the network
 *     of the chassis with the tubes in but not conducting (assembleNetwork; capacitors and
 *     rectifiers open). A position off the B+ side (a cathode bypass, the AVC line) is reached
 *     only through a conducting tube: the template cannot tell its voltage, so only its own
 *     `voltsAcross` is checked there.
 *   Below the voltage: error. Within the margin above it (default 10 %, common practice): warning.
 * - **First filter capacitance** (capacitor input) within the rectifier's datasheet maximum where
 *   the template names the rectifier tube: the capacitors straight from the rectifier's output to
 *   the return, summed (RECTIFIER_MAX_FIRST_FILTER_UF; each entry names its source).
 * - **Line-connected capacitors** carry a safety class: Y where one end is the chassis (the
 *   metal a person touches; on a hot chassis set also the B− bus to chassis), X (or Y, which
 *   also serves across the line) across the line; rated (AC) at least the line voltage.
 * - **Electrolytics** are polarised, with their + end at `nodes[0]` (the convention of this
 *   module, proposed for the format); a + end on the return with the − end on the B+ side is
 *   reversed.
 * - **Can sections** of one can share one common return, and each section has it as one of its
 *   two nodes; section letters are not repeated.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import { assembleNetwork } from './chassis-network';
import type { NetworkEdge } from './network';
import { type CapacitorInfo, type Component, type TemplateDocument, type TubeTypeRecord } from './template-format';

export type CapacitorCheckCode =
  | 'working-volts-below'
  | 'working-volts-margin'
  | 'supply-peak-unknown'
  | 'first-filter-above-maximum'
  | 'first-filter-limit-unknown'
  | 'safety-class-missing'
  | 'safety-class-y-required'
  | 'line-volts-below'
  | 'mains-side-not-line-connected'
  | 'electrolytic-not-polarised'
  | 'polarity-reversed'
  | 'can-returns-differ'
  | 'can-section-off-return'
  | 'can-section-repeated';

export interface CapacitorFinding {
  /** JSON path of the field in the document (`components[3].capacitor.workingVolts`). */
  path: string;
  code: CapacitorCheckCode;
  severity: 'error' | 'warning';
  message: string;
  values: Record<string, string | number | boolean | null>;
}

export interface CapacitorCheckOptions {
  /** The line voltage, volts RMS (default 120 V, the demo sets' line; 230 V where the set runs on it). */
  lineVolts?: number;
  /** Today's mains over the set's rated mains, a voltage ratio (DESIGN.md §3.6; default 1). */
  mainsFactor?: number;
  /** The margin above the highest voltage inside which a rating is warned about, percent (default 10). */
  marginPct?: number;
}

/** Default line voltage, volts RMS: the demo sets are designed for a 120 V line [CP]. */
export const DEFAULT_LINE_VOLTS = 120;
/** Default margin of a working voltage over the highest voltage of its position, percent [CP, common practice, no published source]. */
export const DEFAULT_VOLTAGE_MARGIN_PCT = 10;

/** Where the highest voltage of a position comes from. */
export type VoltageBasis = 'hv-winding-peak' | 'line-peak' | 'highest-b-plus' | 'volts-across' | 'line';

export interface RectifierLimit {
  maxUF: number;
  source: string;
}

/**
 * Maximum capacitor-input first filter capacitance by rectifier tube type, µF.
 * Keys are designations as the tube-type library spells them (suffix variants listed).
 */
export const RECTIFIER_MAX_FIRST_FILTER_UF: Readonly<Record<string, RectifierLimit>> = {
  // check-values.md §5 [SEC]: tube datasheet via a secondary copy
  '5Y3': { maxUF: 20, source: 'check-values.md §5 [SEC] (datasheet via a secondary copy)' },
  '5Y3G': { maxUF: 20, source: 'check-values.md §5 [SEC] (datasheet via a secondary copy)' },
  '5Y3GT': { maxUF: 20, source: 'check-values.md §5 [SEC] (datasheet via a secondary copy)' },
  '5U4': { maxUF: 40, source: 'check-values.md §5 [SEC] (datasheet via a secondary copy)' },
  '5U4G': { maxUF: 40, source: 'check-values.md §5 [SEC] (datasheet via a secondary copy)' },
  '5U4GB': { maxUF: 40, source: 'check-values.md §5 [SEC] (datasheet via a secondary copy)' },
  // from memory, unverified — check the datasheet
  EZ81: { maxUF: 50, source: 'from memory [MEM], check the datasheet' },
  EZ80: { maxUF: 50, source: 'from memory [MEM], check the datasheet' },
  '35W4': { maxUF: 40, source: 'from memory [MEM], check the datasheet' },
  '5AR4': { maxUF: 60, source: 'from memory [MEM], check the datasheet' },
  GZ34: { maxUF: 60, source: 'from memory [MEM], check the datasheet' },
};

const GRID_ELECTRODES = new Set(['g', 'g1', 'g2', 'g3', 'g4', 'g5']);

/** A rectifier tube: in the table, or a tube with plates, no grids, and a cathode or filament. */
export function isRectifierTube(tt: TubeTypeRecord): boolean {
  if (RECTIFIER_MAX_FIRST_FILTER_UF[tt.designation] !== undefined) return true;
  const e = new Set(tt.pins.map((p) => p.electrode as string));
  return e.has('p') && ![...e].some((x) => GRID_ELECTRODES.has(x)) && (e.has('k') || e.has('f'));
}

// ---------------------------------------------------------------------------------------------
// Node groups (0-Ω links joined) and the B+ side

class Groups {
  private readonly parent = new Map<string, string>();
  find(x: string): string {
    let p = this.parent.get(x) ?? x;
    if (p === x) return x;
    p = this.find(p);
    this.parent.set(x, p);
    return p;
  }
  join(a: string, b: string): void {
    const ra = this.find(a);
    const rb = this.find(b);
    if (ra !== rb) this.parent.set(ra, rb);
  }
}

export interface CapacitorPosition {
  componentKey: string;
  ref: string;
  path: string;
  lineConnected: boolean;
  /** Either end has a DC path to the rectifier's output that avoids the return. */
  onBPlusSide: boolean;
  /** The highest voltage the position can reach, volts, and where it comes from; null = the template cannot tell. */
  volts: number | null;
  basis: VoltageBasis | null;
}

export interface CapacitorAnalysis {
  positions: CapacitorPosition[];
  /** The supply's no-load peak, volts, with its basis; null where the template cannot tell. */
  supplyPeak: { volts: number; basis: 'hv-winding-peak' | 'line-peak' } | null;
  /** The highest voltage the service data records on the B+ side (× mains factor), volts. */
  highestBPlus: number | null;
  /** The rectifier sockets the template names: designator and tube type. */
  rectifiers: { designator: string; tubeType: string; outputNodes: string[]; platePins: string[] }[];
}

const RETURN_NODES = ['chassis', 'B-'];

/** The positions of a document's capacitors: B+ side or not, the highest voltage and its basis. */
export function analyseCapacitors(doc: TemplateDocument, tubeTypes: ReadonlyMap<string, TubeTypeRecord>, opts: CapacitorCheckOptions = {}): CapacitorAnalysis {
  return analyse(doc, tubeTypes, opts).analysis;
}

function analyse(doc: TemplateDocument, tubeTypes: ReadonlyMap<string, TubeTypeRecord>, opts: CapacitorCheckOptions): { analysis: CapacitorAnalysis; groups: Groups; returns: Set<string> } {
  const lineVolts = opts.lineVolts ?? DEFAULT_LINE_VOLTS;
  const mf = opts.mainsFactor ?? 1;
  // The chassis with the tubes in but not conducting: ties and heaters conduct, capacitors and rectifiers do not.
  const edges: NetworkEdge[] = assembleNetwork(doc, tubeTypes, { tubesIn: true }).edges;
  const groups = new Groups();
  for (const e of edges) if (e.ohms === 0) groups.join(e.a, e.b);
  const returns = new Set(RETURN_NODES.map((n) => groups.find(n)));

  const rectifiers: CapacitorAnalysis['rectifiers'] = [];
  for (const st of doc.stages) {
    for (const so of st.sockets) {
      const tt = tubeTypes.get(so.tubeType);
      if (tt === undefined || !isRectifierTube(tt)) continue;
      const out = tt.pins.filter((p) => (tt.heating === 'direct' ? p.electrode === 'f' || p.electrode === 'fct' : p.electrode === 'k')).map((p) => `${so.designator}.${p.pin}`);
      const plates = tt.pins.filter((p) => p.electrode === 'p').map((p) => `${so.designator}.${p.pin}`);
      rectifiers.push({ designator: so.designator, tubeType: so.tubeType, outputNodes: out, platePins: plates });
    }
  }
  const usesNode = (n: string) => doc.components.some((c) => c.nodes.includes(n));
  const starts = rectifiers.length > 0 ? rectifiers.flatMap((r) => r.outputNodes) : usesNode('B+') ? ['B+'] : [];

  // Breadth-first over the DC edges from the rectifier's output, never through the return.
  const adjacency = new Map<string, string[]>();
  const link = (a: string, b: string) => {
    const ga = groups.find(a);
    const gb = groups.find(b);
    if (ga === gb) return;
    (adjacency.get(ga) ?? adjacency.set(ga, []).get(ga)!).push(gb);
    (adjacency.get(gb) ?? adjacency.set(gb, []).get(gb)!).push(ga);
  };
  for (const e of edges) link(e.a, e.b);
  const bPlus = new Set<string>();
  const queue = starts.map((s) => groups.find(s)).filter((g) => !returns.has(g));
  for (const g of queue) bPlus.add(g);
  while (queue.length > 0) {
    const g = queue.shift()!;
    for (const n of adjacency.get(g) ?? []) {
      if (bPlus.has(n) || returns.has(n)) continue;
      bPlus.add(n);
      queue.push(n);
    }
  }
  const onBPlus = (node: string) => bPlus.has(groups.find(node));

  // The supply's no-load peak.
  let supplyPeak: CapacitorAnalysis['supplyPeak'] = null;
  const power = doc.chassis.power;
  if (power === 'transformer' || power === 'autotransformer') {
    const plates = new Set(rectifiers.flatMap((r) => r.platePins).map((n) => groups.find(n)));
    let rms: number | null = null;
    for (const c of doc.components) {
      if (c.kind !== 'winding' || c.voltsAcross === null) continue;
      const atPlates = c.nodes.filter((n) => plates.has(groups.find(n))).length;
      if (atPlates === 0) continue;
      const v = atPlates === 2 ? c.voltsAcross / 2 : c.voltsAcross; // plate to plate: each half sees half
      rms = Math.max(rms ?? 0, v);
    }
    if (rms !== null) supplyPeak = { volts: Math.SQRT2 * rms * mf, basis: 'hv-winding-peak' };
  } else if (power === 'ac-dc') {
    // Half-wave from the line (a voltage doubler would reach twice this: not modelled).
    supplyPeak = { volts: Math.SQRT2 * lineVolts * mf, basis: 'line-peak' };
  }
  let highest: number | null = null;
  for (const c of doc.components) {
    if (c.voltsAcross === null || c.mainsSide) continue;
    if (c.nodes.some(onBPlus)) highest = Math.max(highest ?? 0, c.voltsAcross * mf);
  }

  const positions: CapacitorPosition[] = [];
  doc.components.forEach((c, i) => {
    if (c.kind !== 'capacitor' || c.capacitor === null) return;
    const info = c.capacitor;
    const base = { componentKey: c.key, ref: c.ref, path: `components[${i}]`, lineConnected: info.lineConnected };
    if (info.lineConnected) {
      positions.push({ ...base, onBPlusSide: false, volts: lineVolts * mf, basis: 'line' });
      return;
    }
    const side = c.nodes.some(onBPlus);
    let volts: number | null = null;
    let basis: VoltageBasis | null = null;
    if (side && supplyPeak !== null) [volts, basis] = [supplyPeak.volts, supplyPeak.basis];
    else if (side && highest !== null) [volts, basis] = [highest, 'highest-b-plus'];
    if (c.voltsAcross !== null && (volts === null || c.voltsAcross * mf > volts)) [volts, basis] = [c.voltsAcross * mf, 'volts-across'];
    positions.push({ ...base, onBPlusSide: side, volts, basis });
  });
  return { analysis: { positions, supplyPeak, highestBPlus: highest, rectifiers }, groups, returns };
}

// ---------------------------------------------------------------------------------------------
// The checks

const v1 = (x: number) => +x.toFixed(1);

const BASIS_WORDS: Record<VoltageBasis, string> = {
  'hv-winding-peak': 'the no-load peak of the HV winding during warm-up (√2 × RMS)',
  'line-peak': 'the peak of the line during warm-up (√2 × line)',
  'highest-b-plus': 'the highest B+ the service data records (an operating voltage: the template does not give the warm-up peak)',
  'volts-across': 'the voltage across it in the service data',
  line: 'the line voltage (RMS; X and Y capacitors are rated in AC volts)',
};

/** The rule checks of the capacitor list; every finding names its field by JSON path. */
export function checkCapacitors(doc: TemplateDocument, tubeTypes: ReadonlyMap<string, TubeTypeRecord>, opts: CapacitorCheckOptions = {}): CapacitorFinding[] {
  const out: CapacitorFinding[] = [];
  const lineVolts = opts.lineVolts ?? DEFAULT_LINE_VOLTS;
  const mf = opts.mainsFactor ?? 1;
  const margin = opts.marginPct ?? DEFAULT_VOLTAGE_MARGIN_PCT;
  const { analysis, groups, returns } = analyse(doc, tubeTypes, opts);
  const caps = doc.components.map((c, i) => ({ c, i })).filter((x): x is { c: Component & { capacitor: CapacitorInfo }; i: number } => x.c.kind === 'capacitor' && x.c.capacitor !== null);

  // The supply peak the template cannot tell.
  const anyOnSide = analysis.positions.some((p) => p.onBPlusSide);
  if (anyOnSide && analysis.supplyPeak === null) {
    out.push({
      path: 'chassis.power',
      code: 'supply-peak-unknown',
      severity: 'warning',
      message:
        analysis.highestBPlus !== null
          ? `The template does not give the HV winding's voltage: the B+ side capacitors are checked against the highest B+ of the service data (${v1(analysis.highestBPlus)} V), not the warm-up peak. Record the HV winding's RMS volts as its voltsAcross.`
          : "The template does not give the HV winding's voltage nor any B+ voltage: the B+ side capacitors' working voltages cannot be checked. Record the HV winding's RMS volts as its voltsAcross.",
      values: { basis: analysis.highestBPlus !== null ? 'highest-b-plus' : null, volts: analysis.highestBPlus === null ? null : v1(analysis.highestBPlus) },
    });
  }

  // Working voltage.
  for (const pos of analysis.positions) {
    const { c, i } = caps.find((x) => x.c.key === pos.componentKey)!;
    const rated = c.capacitor.workingVolts;
    const path = `components[${i}].capacitor.workingVolts`;
    if (pos.lineConnected) {
      if (rated < lineVolts * mf) {
        out.push({
          path,
          code: 'line-volts-below',
          severity: 'error',
          message: `${c.ref} is across the line (${v1(lineVolts * mf)} V AC) but rated ${rated} V: a line capacitor's rating must cover the line voltage.`,
          values: { ref: c.ref, workingVolts: rated, volts: v1(lineVolts * mf), basis: 'line' },
        });
      }
      continue;
    }
    if (pos.volts === null || pos.basis === null) continue;
    const values = { ref: c.ref, workingVolts: rated, volts: v1(pos.volts), basis: pos.basis, marginPct: margin };
    if (rated < pos.volts) {
      out.push({ path, code: 'working-volts-below', severity: 'error', message: `${c.ref} is rated ${rated} V, below ${v1(pos.volts)} V — ${BASIS_WORDS[pos.basis]}.`, values });
    } else if (rated < pos.volts * (1 + margin / 100)) {
      out.push({
        path,
        code: 'working-volts-margin',
        severity: 'warning',
        message: `${c.ref} is rated ${rated} V, within ${margin} % of ${v1(pos.volts)} V — ${BASIS_WORDS[pos.basis]}: choose a higher rating for the recap.`,
        values,
      });
    }
  }

  // First filter within the rectifier's maximum.
  for (const r of analysis.rectifiers) {
    const outGroups = new Set(r.outputNodes.map((n) => groups.find(n)));
    const first = caps.filter(({ c }) => {
      const [a, b] = c.nodes.map((n) => groups.find(n));
      return (outGroups.has(a) && returns.has(b)) || (outGroups.has(b) && returns.has(a));
    });
    if (first.length === 0) continue;
    const total = first.reduce((s, x) => s + x.c.capacitor.uF, 0);
    const limit = RECTIFIER_MAX_FIRST_FILTER_UF[r.tubeType];
    const path = `components[${first[0].i}].capacitor.uF`;
    const refs = first.map((x) => x.c.ref).join(' + ');
    if (limit === undefined) {
      out.push({
        path,
        code: 'first-filter-limit-unknown',
        severity: 'warning',
        message: `No datasheet maximum for the first filter of a ${r.tubeType} is known here: check ${refs} (${total} µF) against the rectifier's datasheet.`,
        values: { rectifier: r.tubeType, designator: r.designator, uF: total, maxUF: null },
      });
    } else if (total > limit.maxUF) {
      out.push({
        path,
        code: 'first-filter-above-maximum',
        severity: 'error',
        message: `The first filter ${refs} is ${total} µF, above the ${r.tubeType}'s maximum of ${limit.maxUF} µF for capacitor input (${limit.source}).`,
        values: { rectifier: r.tubeType, designator: r.designator, uF: total, maxUF: limit.maxUF, source: limit.source },
      });
    }
  }

  // Line-connected capacitors: a safety class, Y where one end is the chassis.
  for (const { c, i } of caps) {
    const info = c.capacitor;
    if (!info.lineConnected) {
      if (c.mainsSide) {
        out.push({
          path: `components[${i}].capacitor.lineConnected`,
          code: 'mains-side-not-line-connected',
          severity: 'warning',
          message: `${c.ref} is marked mains-side but not line-connected: a capacitor on the mains side is line-connected and needs an X or Y class.`,
          values: { ref: c.ref },
        });
      }
      continue;
    }
    const toChassis = c.nodes.some((n) => n === 'chassis' || groups.find(n) === groups.find('chassis')) && !c.nodes.every((n) => groups.find(n) === groups.find('chassis'));
    const need = toChassis ? 'Y' : 'X or Y';
    if (info.safetyClass === null) {
      out.push({
        path: `components[${i}].capacitor.safetyClass`,
        code: 'safety-class-missing',
        severity: 'error',
        message: `${c.ref} is line-connected: it must be a safety-rated ${need} class capacitor (X across the line, Y line to chassis${doc.chassis.hotChassis ? ', also the B− bus to chassis of this hot chassis' : ''}).`,
        values: { ref: c.ref, required: need, toChassis },
      });
    } else if (toChassis && info.safetyClass !== 'Y') {
      out.push({
        path: `components[${i}].capacitor.safetyClass`,
        code: 'safety-class-y-required',
        severity: 'error',
        message: `${c.ref} joins the line side to the chassis: it must be Y class (its failure must not leave the chassis live), not ${info.safetyClass}.`,
        values: { ref: c.ref, safetyClass: info.safetyClass, required: 'Y' },
      });
    }
  }

  // Electrolytics polarised, + end at nodes[0].
  const isRet = (n: string) => returns.has(groups.find(n));
  const side = new Map(analysis.positions.map((p) => [p.componentKey, p.onBPlusSide]));
  // nodes[0] on the return and the position on the B+ side: the B+ side end is nodes[1].
  const bPlusNodes = (c: Component) => side.get(c.key) ?? false;
  for (const { c, i } of caps) {
    const info = c.capacitor;
    if (info.dielectric === 'electrolytic' && !info.polarised) {
      out.push({
        path: `components[${i}].capacitor.polarised`,
        code: 'electrolytic-not-polarised',
        severity: 'warning',
        message: `${c.ref} is an electrolytic but not marked polarised: mark it polarised with its + end as nodes[0] (a non-polar electrolytic: say so in its note).`,
        values: { ref: c.ref },
      });
    }
    if (info.polarised && isRet(c.nodes[0]) && !isRet(c.nodes[1]) && bPlusNodes(c)) {
      out.push({
        path: `components[${i}].nodes`,
        code: 'polarity-reversed',
        severity: 'error',
        message: `${c.ref} is polarised with its + end (nodes[0]) on ${c.nodes[0]} and its − end on the B+ side (${c.nodes[1]}): it is reversed — list the + end first.`,
        values: { ref: c.ref, plus: c.nodes[0], minus: c.nodes[1] },
      });
    }
  }

  // Can sections share their common return.
  const cans = new Map<string, { c: Component & { capacitor: CapacitorInfo }; i: number }[]>();
  for (const x of caps) if (x.c.capacitor.can !== null) (cans.get(x.c.capacitor.can.id) ?? cans.set(x.c.capacitor.can.id, []).get(x.c.capacitor.can.id)!).push(x);
  for (const [id, sections] of cans) {
    const first = sections[0].c.capacitor.can!;
    const letters = new Set<string>();
    for (const { c, i } of sections) {
      const can = c.capacitor.can!;
      if (letters.has(can.section)) {
        out.push({ path: `components[${i}].capacitor.can.section`, code: 'can-section-repeated', severity: 'error', message: `Can ${id} has section ${can.section} twice (${c.ref}).`, values: { can: id, section: can.section, ref: c.ref } });
      }
      letters.add(can.section);
      if (groups.find(can.commonReturn) !== groups.find(first.commonReturn)) {
        out.push({
          path: `components[${i}].capacitor.can.commonReturn`,
          code: 'can-returns-differ',
          severity: 'error',
          message: `The sections of can ${id} share one common return: ${c.ref} names ${can.commonReturn}, ${sections[0].c.ref} names ${first.commonReturn}.`,
          values: { can: id, ref: c.ref, commonReturn: can.commonReturn, expected: first.commonReturn },
        });
      } else if (!c.nodes.some((n) => groups.find(n) === groups.find(can.commonReturn))) {
        out.push({
          path: `components[${i}].nodes`,
          code: 'can-section-off-return',
          severity: 'error',
          message: `${c.ref} is section ${can.section} of can ${id}, whose common return is ${can.commonReturn}, but neither of its nodes (${c.nodes.join(', ')}) is that return.`,
          values: { can: id, ref: c.ref, commonReturn: can.commonReturn },
        });
      }
    }
  }
  return out;
}

/** Fixed names of the return nodes, for callers that explain the B+ side. */
export const CAPACITOR_RETURN_NODES: readonly string[] = RETURN_NODES;
