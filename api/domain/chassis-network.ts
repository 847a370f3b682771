/**
 * The chassis network of a template document (DESIGN.md §2 "component", §3.5): one network for
 * the whole chassis, assembled from the components themselves (nodes as typed once), the tube
 * types' internal ties and the heater string; stages are views of it.
 *
 * - every component with its two nodes; a pot as two edges to its wiper at its fraction;
 * - capacitors and rectifiers left out (NON_NETWORK_KINDS); a nominal `open` part left out,
 *   a nominal `short` part and a `wire` as 0 Ω;
 * - tubes in: each socket's internal ties as 0-Ω edges between `V3.a` and `V3.b`; heater
 *   components between two pins of one socket are the heater inside the tube. Tubes out: no
 *   internal ties and no heaters inside the tubes;
 * - heaters carry the author's measured cold resistance, never V/I (a cold tungsten heater reads
 *   roughly 1/5 to 1/10 of its hot V/I [MEM], check-values.md §5): a heater whose nominal equals
 *   V/I (= V²/P) of its tube type is warned about;
 * - every node must be a known pin of its socket's tube type, `chassis`, `B-`, `B+` or a declared
 *   junction; an IC pin (internally connected) is never a tie point.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import { analyseInCircuit } from './in-circuit';
import { ChassisNetwork, type EdgeCurrent, type NetworkEdge } from './network';
import {
  FIXED_NODES,
  parseNodeName,
  type ChartReading,
  type Component,
  type Expected,
  type Nominal,
  type TemplateDocument,
  type TemplateProblem,
  type TestPoint,
  type TubeTypeRecord,
} from './template-format';
import { OPEN_THRESHOLD_OHMS, SHORT_THRESHOLD_OHMS } from './verdict';
import { NON_NETWORK_KINDS, type ComponentKind } from './words';

export interface NetworkConditions {
  /** Default: the template's `conditions.tubesIn`. */
  tubesIn?: boolean;
}

/** A problem of the document as a network; `warning` ones do not stop the network from being used. */
export interface NetworkProblem extends TemplateProblem {
  severity: 'error' | 'warning';
}

export interface AssembledNetwork {
  edges: NetworkEdge[];
  problems: NetworkProblem[];
}

/** Relative closeness at which a heater's nominal counts as "equal to V/I". */
const HOT_VALUE_CLOSENESS = 0.01;

/** Edge id of an internal tie of a socket. */
export function tieEdgeId(designator: string, a: number, b: number): string {
  return `tie:${designator}.${a}-${designator}.${b}`;
}

/** Edge ids of a pot: from nodes[0] to the wiper, and from the wiper to nodes[1]. */
export function potEdgeIds(componentKey: string): [string, string] {
  return [`${componentKey}:a`, `${componentKey}:b`];
}

interface SocketInfo {
  designator: string;
  tubeType: TubeTypeRecord | undefined;
  path: string;
}

/** The sockets of a document by designator, with problems for unknown tube types and repeated designators. */
function socketsOf(doc: TemplateDocument, tubeTypes: ReadonlyMap<string, TubeTypeRecord>, problems: NetworkProblem[]): Map<string, SocketInfo> {
  const sockets = new Map<string, SocketInfo>();
  doc.stages.forEach((stage, i) =>
    stage.sockets.forEach((s, j) => {
      const path = `stages[${i}].sockets[${j}]`;
      if (sockets.has(s.designator)) {
        problems.push({ path: `${path}.designator`, message: `socket ${s.designator} appears twice (also ${sockets.get(s.designator)!.path})`, severity: 'error' });
        return;
      }
      const tubeType = tubeTypes.get(s.tubeType);
      if (tubeType === undefined) problems.push({ path: `${path}.tubeType`, message: `tube type '${s.tubeType}' of ${s.designator} is not in the tube-type library`, severity: 'error' });
      sockets.set(s.designator, { designator: s.designator, tubeType, path });
    }),
  );
  return sockets;
}

/** Why a node name does not resolve, or null when it does. */
function nodeProblem(name: string, sockets: Map<string, SocketInfo>, junctions: Set<string>): string | null {
  const parsed = parseNodeName(name);
  if (parsed.kind === 'fixed') return null;
  if (parsed.kind === 'other') {
    if (junctions.has(name)) return null;
    return `'${name}' is not a node: name a pin (V3.7), chassis, B-, B+ or a declared junction`;
  }
  if (junctions.has(name)) return null;
  const socket = sockets.get(parsed.designator);
  if (socket === undefined) return `'${name}': there is no socket ${parsed.designator}`;
  if (socket.tubeType === undefined) return null; // already reported on the socket
  const pin = socket.tubeType.pins.find((p) => p.pin === parsed.pin);
  if (pin === undefined) return `'${name}': pin ${parsed.pin} is not a pin of the ${socket.tubeType.designation} in ${parsed.designator}`;
  if (pin.electrode === 'IC') return `'${name}': pin ${parsed.pin} of the ${socket.tubeType.designation} is internally connected (IC) and must never be used as a tie point`;
  return null;
}

/** The socket a heater inside a tube belongs to: both nodes pins of one socket, both heater electrodes. */
function heaterSocket(c: Component, sockets: Map<string, SocketInfo>): SocketInfo | null {
  const [a, b] = c.nodes.map(parseNodeName);
  if (a.kind !== 'pin' || b.kind !== 'pin' || a.designator !== b.designator) return null;
  const socket = sockets.get(a.designator);
  const tt = socket?.tubeType;
  if (tt === undefined) return null;
  const heaterish = (pin: number): boolean => ['h', 'hct', 'htap', 'f', 'fct'].includes(tt.pins.find((p) => p.pin === pin)?.electrode ?? '');
  return heaterish(a.pin) && heaterish(b.pin) ? socket! : null;
}

/** The hot values V/I of a tube type's heater (and of half of it, where it has a centre tap). */
function hotValues(tt: TubeTypeRecord): number[] {
  const full = tt.heaterVolts / tt.heaterAmps;
  const centreTapped = tt.pins.some((p) => p.electrode === 'hct' || p.electrode === 'fct');
  return centreTapped ? [full, full / 2] : [full];
}

function nominalOhms(n: Nominal): number | null {
  if ('ohms' in n) return n.ohms;
  return n.state === 'short' ? 0 : null;
}

function networkKind(kind: Component['kind']): ComponentKind | undefined {
  return kind === 'wire' ? undefined : kind;
}

/**
 * Assembles the chassis network of a document. Edges: component edges under the component's key
 * (a pot as `<key>:a`, `<key>:b`), internal ties as `tie:V3.1-V3.7`. Problems locate the field
 * by JSON path.
 */
export function assembleNetwork(doc: TemplateDocument, tubeTypes: ReadonlyMap<string, TubeTypeRecord>, conditions: NetworkConditions = {}): AssembledNetwork {
  const tubesIn = conditions.tubesIn ?? doc.conditions.tubesIn;
  const problems: NetworkProblem[] = [];
  const sockets = socketsOf(doc, tubeTypes, problems);
  const junctions = new Set<string>();
  doc.junctions.forEach((j, i) => {
    const parsed = parseNodeName(j.name);
    if (parsed.kind !== 'other') problems.push({ path: `junctions[${i}].name`, message: `a junction may not be named '${j.name}' (a fixed node or a pin name)`, severity: 'error' });
    else if (junctions.has(j.name)) problems.push({ path: `junctions[${i}].name`, message: `junction '${j.name}' is declared twice`, severity: 'error' });
    junctions.add(j.name);
  });
  const checkNode = (name: string, path: string): boolean => {
    const message = nodeProblem(name, sockets, junctions);
    if (message !== null) problems.push({ path, message, severity: 'error' });
    return message === null;
  };

  const edges: NetworkEdge[] = [];
  const keys = new Set<string>();
  doc.components.forEach((c, i) => {
    const at = `components[${i}]`;
    if (keys.has(c.key)) problems.push({ path: `${at}.key`, message: `component key '${c.key}' appears twice`, severity: 'error' });
    keys.add(c.key);
    const okA = checkNode(c.nodes[0], `${at}.nodes[0]`);
    const okB = checkNode(c.nodes[1], `${at}.nodes[1]`);
    if (c.nodes[0] === c.nodes[1]) problems.push({ path: `${at}.nodes[1]`, message: `${c.ref} joins node '${c.nodes[0]}' to itself`, severity: 'error' });
    const okW = c.wiper === null || checkNode(c.wiper.node, `${at}.wiper.node`);
    if (c.kind === 'pot' && c.wiper === null) problems.push({ path: `${at}.wiper`, message: `pot ${c.ref} needs its wiper position (node and fraction)`, severity: 'error' });
    if (c.wiper !== null && !(c.wiper.fraction >= 0 && c.wiper.fraction <= 1)) problems.push({ path: `${at}.wiper.fraction`, message: `wiper fraction of ${c.ref} must be from 0 to 1`, severity: 'error' });
    if (c.kind === 'wire' && !('state' in c.nominal && c.nominal.state === 'short')) problems.push({ path: `${at}.nominal`, message: `wire ${c.ref} must have the nominal 'short'`, severity: 'error' });
    const socket = c.kind === 'heater' ? heaterSocket(c, sockets) : null;
    const ohms = nominalOhms(c.nominal);
    if (c.kind === 'heater' && socket !== null && ohms !== null && socket.tubeType !== undefined) {
      const hot = hotValues(socket.tubeType).find((v) => Math.abs(ohms - v) <= HOT_VALUE_CLOSENESS * v);
      if (hot !== undefined) {
        problems.push({
          path: `${at}.nominal`,
          message: `${c.ref}: ${ohms} Ω equals the hot value V/I of the ${socket.tubeType.designation} heater (${+hot.toPrecision(4)} Ω); a cold heater reads far lower — enter a measured cold resistance`,
          severity: 'warning',
        });
      }
    }
    if (!(okA && okB && okW) || c.nodes[0] === c.nodes[1]) return;
    if (NON_NETWORK_KINDS.includes(c.kind as ComponentKind) || ohms === null) return;
    if (!tubesIn && socket !== null) return; // the heater is inside the tube: out with the tube
    const kind = networkKind(c.kind);
    const tol = c.tolerancePct ?? undefined;
    const extra = (e: NetworkEdge): NetworkEdge => {
      if (kind !== undefined) e.kind = kind;
      if (tol !== undefined) e.tolerancePct = tol;
      return e;
    };
    if (c.kind === 'pot' && c.wiper !== null) {
      const [ida, idb] = potEdgeIds(c.key);
      const f = c.wiper.fraction;
      const addPart = (id: string, a: string, b: string, r: number): void => {
        if (a !== b) edges.push(extra({ id, a, b, ohms: r }));
      };
      addPart(ida, c.nodes[0], c.wiper.node, ohms * f);
      addPart(idb, c.wiper.node, c.nodes[1], ohms * (1 - f));
      return;
    }
    edges.push(extra({ id: c.key, a: c.nodes[0], b: c.nodes[1], ohms }));
  });

  if (tubesIn) {
    for (const s of sockets.values()) {
      const tt = s.tubeType;
      if (tt === undefined) continue;
      tt.ties.forEach(([a, b], k) => {
        const pa = tt.pins.find((p) => p.pin === a);
        const pb = tt.pins.find((p) => p.pin === b);
        if (pa === undefined || pb === undefined || pa.electrode === 'IC' || pb.electrode === 'IC') {
          problems.push({ path: `tubeTypes.${tt.designation}.ties[${k}]`, message: `internal tie ${a}–${b} of ${tt.designation} names a pin it does not have, or an IC pin`, severity: 'error' });
          return;
        }
        edges.push({ id: tieEdgeId(s.designator, a, b), a: `${s.designator}.${a}`, b: `${s.designator}.${b}`, ohms: 0 });
      });
    }
  }

  doc.testPoints.forEach((tp, i) => {
    const at = `testPoints[${i}]`;
    if (tp.kind === 'chart-reading') {
      checkNode(tp.from, `${at}.from`);
      checkNode(tp.to, `${at}.to`);
    } else if (tp.kind === 'component-check') {
      if (!keys.has(tp.componentKey)) problems.push({ path: `${at}.componentKey`, message: `no component with key '${tp.componentKey}'`, severity: 'error' });
    } else {
      for (const side of ['a', 'b'] as const) {
        if (!doc.testPoints.some((o) => o.key === tp[side] && o.kind !== 'pair-relation')) {
          problems.push({ path: `${at}.${side}`, message: `pair relation names '${tp[side]}', which is not a component check or chart reading of this template`, severity: 'error' });
        }
      }
    }
  });
  return { edges, problems };
}

// ---------------------------------------------------------------------------------------------
// Expected readings

/** Why a test point has no in-circuit expectation. */
export type LeftOutCause = 'non-network-kind' | 'pair-relation' | 'unknown-component';

export interface ExpectedReading {
  testPointKey: string;
  kind: TestPoint['kind'];
  /** The probes; null for a pair relation. */
  from: string | null;
  to: string | null;
  tubesIn: boolean;
  /** The part's nominal (component check) or the chart's printed value. */
  printed: Expected | null;
  /** Effective resistance between the probes in the network; null = open (no DC path). */
  inCircuitOhms: number | null;
  /** Component checks: the paths in parallel with the part that lower the reading (none: ohms null, no edges). */
  parallelPaths: { ohms: number | null; edges: EdgeCurrent[] } | null;
  /** Component checks: how far in circuit reads below the nominal, percent (0 when nothing lowers it). */
  loweredByPct: number | null;
  leftOut: LeftOutCause | null;
}

function touches(edges: readonly NetworkEdge[], node: string): boolean {
  return edges.some((e) => e.a === node || e.b === node);
}

/**
 * Effective resistance between two nodes of assembled edges; null when open — also when a node
 * touches no conducting edge under these conditions (e.g. a heater pin with the tubes out).
 */
export function networkResistance(edges: readonly NetworkEdge[], from: string, to: string): number | null {
  if (from === to) return 0;
  if (!touches(edges, from) || !touches(edges, to)) return null;
  return new ChassisNetwork(edges).resistance(from, to);
}

/** The tubes-in condition of a test point: its own, else the template's. */
function tubesInFor(doc: TemplateDocument, tp: TestPoint): boolean {
  return tp.kind === 'chart-reading' ? (tp.conditions.tubesIn ?? doc.conditions.tubesIn) : doc.conditions.tubesIn;
}

/**
 * The in-circuit expectation of one test point: the effective resistance between its nodes in
 * the chassis network under its conditions (api/domain/network.ts), and for a component check the
 * parallel paths that lower it (api/domain/in-circuit.ts `analyseInCircuit`,
 * explanation.parallelPaths). Capacitors, rectifiers and pair relations are left out.
 */
export function expectedReading(doc: TemplateDocument, tubeTypes: ReadonlyMap<string, TubeTypeRecord>, testPoint: TestPoint): ExpectedReading {
  const tubesIn = tubesInFor(doc, testPoint);
  const base = { testPointKey: testPoint.key, kind: testPoint.kind, tubesIn };
  if (testPoint.kind === 'pair-relation') {
    return { ...base, from: null, to: null, printed: null, inCircuitOhms: null, parallelPaths: null, loweredByPct: null, leftOut: 'pair-relation' };
  }
  const { edges } = assembleNetwork(doc, tubeTypes, { tubesIn });
  if (testPoint.kind === 'chart-reading') {
    return { ...base, from: testPoint.from, to: testPoint.to, printed: testPoint.expected, inCircuitOhms: networkResistance(edges, testPoint.from, testPoint.to), parallelPaths: null, loweredByPct: null, leftOut: null };
  }
  const c = doc.components.find((x) => x.key === testPoint.componentKey);
  if (c === undefined) {
    return { ...base, from: null, to: null, printed: null, inCircuitOhms: null, parallelPaths: null, loweredByPct: null, leftOut: 'unknown-component' };
  }
  const [from, to] = c.nodes;
  const printed: Expected = 'ohms' in c.nominal ? { ohms: c.nominal.ohms } : { state: c.nominal.state };
  if (NON_NETWORK_KINDS.includes(c.kind as ComponentKind)) {
    return { ...base, from, to, printed, inCircuitOhms: null, parallelPaths: null, loweredByPct: null, leftOut: 'non-network-kind' };
  }
  const inCircuit = networkResistance(edges, from, to);
  let parallelPaths: ExpectedReading['parallelPaths'] = null;
  if (inCircuit !== null && from !== to) {
    const own = edges.find((e) => e.id === c.key);
    const result = analyseInCircuit({ edges, from, to, partId: own?.id });
    parallelPaths = own === undefined ? { ohms: null, edges: [] } : result.explanation.parallelPaths;
  }
  const nominal = 'ohms' in c.nominal ? c.nominal.ohms : null;
  const loweredByPct = nominal !== null && nominal > 0 && inCircuit !== null ? Math.max(0, ((nominal - inCircuit) / nominal) * 100) : null;
  return { ...base, from, to, printed, inCircuitOhms: inCircuit, parallelPaths, loweredByPct, leftOut: null };
}

export interface ChartDisagreement {
  testPointKey: string;
  path: string;
  printed: Expected;
  /** null = open in the network. */
  networkOhms: number | null;
  /** (network − printed) / printed × 100; null for states or an open network. */
  deviationPct: number | null;
  tolerancePct: number;
  message: string;
}

const fmt = (ohms: number | null): string => (ohms === null ? 'open' : `${+ohms.toPrecision(4)} Ω`);

/** Does the network value agree with the chart's printed value within the chart's tolerance? */
export function chartAgrees(printed: Expected, networkOhms: number | null, tolerancePct: number): boolean {
  if ('state' in printed) {
    if (printed.state === 'open') return networkOhms === null || networkOhms >= OPEN_THRESHOLD_OHMS;
    return networkOhms !== null && networkOhms <= SHORT_THRESHOLD_OHMS;
  }
  if (networkOhms === null) return false;
  if (printed.ohms === 0) return networkOhms <= SHORT_THRESHOLD_OHMS;
  return Math.abs(networkOhms - printed.ohms) <= (tolerancePct / 100) * printed.ohms;
}

/**
 * The chart readings whose network value disagrees with the printed value beyond the chart's
 * tolerance: an error in the template or in the service data. Open = no DC path or at least the
 * open threshold (20 MΩ); short = at most the short threshold (1 Ω) — the verdict's defaults.
 */
export function chartDisagreements(doc: TemplateDocument, tubeTypes: ReadonlyMap<string, TubeTypeRecord>): ChartDisagreement[] {
  const out: ChartDisagreement[] = [];
  const networks = new Map<boolean, NetworkEdge[]>();
  doc.testPoints.forEach((tp, i) => {
    if (tp.kind !== 'chart-reading') return;
    const reading: ChartReading = tp;
    const tubesIn = tubesInFor(doc, reading);
    let edges = networks.get(tubesIn);
    if (edges === undefined) {
      edges = assembleNetwork(doc, tubeTypes, { tubesIn }).edges;
      networks.set(tubesIn, edges);
    }
    const net = networkResistance(edges, reading.from, reading.to);
    if (chartAgrees(reading.expected, net, reading.tolerancePct)) return;
    const printedOhms = 'ohms' in reading.expected ? reading.expected.ohms : null;
    const deviationPct = printedOhms !== null && printedOhms > 0 && net !== null ? ((net - printedOhms) / printedOhms) * 100 : null;
    const printedText = printedOhms !== null ? fmt(printedOhms) : (reading.expected as { state: string }).state;
    out.push({
      testPointKey: reading.key,
      path: `testPoints[${i}]`,
      printed: reading.expected,
      networkOhms: net,
      deviationPct,
      tolerancePct: reading.tolerancePct,
      message: `${reading.from} to ${reading.to}: the chart prints ${printedText}, the network reads ${fmt(net)}${deviationPct === null ? '' : ` (${deviationPct >= 0 ? '+' : ''}${deviationPct.toFixed(1)} %, tolerance ±${reading.tolerancePct} %)`}`,
    });
  });
  return out;
}

/** The fixed node names, re-exported for callers that list nodes. */
export const CHASSIS_FIXED_NODES = FIXED_NODES;
