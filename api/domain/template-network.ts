/**
 * The in-circuit expectation of every test point of a template at once (issue 4 item 5): the
 * expected reading between its probes in the chassis network, the parallel paths that lower it,
 * and for a chart reading whether the printed value agrees with the network within the chart's
 * tolerance. Used by `GET /api/templates/:id/versions/:version/network`, by the draft validation
 * (chart disagreements as warnings) and by the browser editor, which computes the same locally.
 *
 * One network per condition set (tubes in / tubes out), assembled and factored once
 * (api/domain/network.ts ChassisNetwork); every test point under those conditions is answered
 * from that factorization:
 * - a chart reading: the effective resistance between its nodes, and the edges carrying the
 *   meter's current (all paths are "parallel paths" of a chart reading);
 * - a component check across a part of resistance R_p reading R_in in circuit: the rest of the
 *   network across the part's nodes is R_0 = R_in·R_p / (R_p − R_in) (the part in parallel with
 *   the rest, DESIGN.md §3.5), and the currents of the rest for a unit current are its currents in
 *   the whole network scaled by 1 / (1 − R_in/R_p) — the Sherman–Morrison downdate of removing
 *   the part, so no second factorization. A pot (two edges through its wiper) or a 0-Ω part is
 *   answered from a factorization without it.
 * Capacitors and rectifiers (open at DC) and pair relations have no in-circuit expectation.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import { assembleNetwork, chartAgrees, potEdgeIds, type ChartDisagreement, type LeftOutCause, type NetworkProblem } from './chassis-network';
import { ChassisNetwork, type EdgeCurrent, type NetworkEdge } from './network';
import type { ChartReading, TemplateDocument, TestPoint, TubeTypeRecord } from './template-format';
import { NON_NETWORK_KINDS, type ComponentKind } from './words';

/** Edges carrying less than this share of the meter's current are not listed among the paths. */
export const PATH_MIN_SHARE = 1e-3;

export interface TestPointNetworkAnswer {
  kind: TestPoint['kind'];
  tubesIn: boolean;
  /** The probes; null for a pair relation or a check of an unknown component. */
  from: string | null;
  to: string | null;
  /** What the meter should read in circuit; null = open (no DC path), or no expectation (`leftOut`). */
  expectedOhms: number | null;
  /**
   * The paths lowering the reading: for a component check, the rest of the network across the
   * part (ohms null = none: nothing in parallel); for a chart reading, every path between the
   * probes. Edges by id (component keys; a pot `<key>:a`/`<key>:b`; ties `tie:V3.1-V3.7`) with
   * their share of a unit current, largest first, shares below PATH_MIN_SHARE left out.
   */
  parallelPaths: { ohms: number | null; edges: EdgeCurrent[] } | null;
  /** Chart readings only: present when the network disagrees with the printed value beyond the chart's tolerance. */
  disagreement?: ChartDisagreement;
  /** Why there is no in-circuit expectation. */
  leftOut?: LeftOutCause;
}

export interface TemplateNetworkAnswer {
  /** By test point key. */
  testPoints: Record<string, TestPointNetworkAnswer>;
  /** Problems of the document as a network, under every condition set used (deduplicated by path). */
  problems: NetworkProblem[];
  /** The condition sets factored: how many nodes and conducting edges each had. */
  conditionSets: { tubesIn: boolean; nodes: number; edges: number }[];
}

const fmt = (ohms: number | null): string => (ohms === null ? 'open' : `${+ohms.toPrecision(4)} Ω`);

/** The disagreement of one chart reading with the network, or undefined when they agree. */
export function chartDisagreement(reading: ChartReading, path: string, networkOhms: number | null): ChartDisagreement | undefined {
  if (chartAgrees(reading.expected, networkOhms, reading.tolerancePct)) return undefined;
  const printedOhms = 'ohms' in reading.expected ? reading.expected.ohms : null;
  const deviationPct = printedOhms !== null && printedOhms > 0 && networkOhms !== null ? ((networkOhms - printedOhms) / printedOhms) * 100 : null;
  const printedText = printedOhms !== null ? fmt(printedOhms) : (reading.expected as { state: string }).state;
  return {
    testPointKey: reading.key,
    path,
    printed: reading.expected,
    networkOhms,
    deviationPct,
    tolerancePct: reading.tolerancePct,
    message: `${reading.from} to ${reading.to}: the chart prints ${printedText}, the network reads ${fmt(networkOhms)}${deviationPct === null ? '' : ` (${deviationPct >= 0 ? '+' : ''}${deviationPct.toFixed(1)} %, tolerance ±${reading.tolerancePct} %)`}`,
  };
}

interface Factored {
  edges: NetworkEdge[];
  net: ChassisNetwork | null;
}

function resistanceIn(f: Factored, from: string, to: string): number | null {
  if (from === to) return 0;
  if (f.net === null || !f.net.hasNode(from) || !f.net.hasNode(to)) return null;
  return f.net.resistance(from, to);
}

function currentsIn(net: ChassisNetwork | null, from: string, to: string, scale = 1, skip: ReadonlySet<string> = new Set()): EdgeCurrent[] {
  if (net === null || from === to || !net.hasNode(from) || !net.hasNode(to)) return [];
  return net
    .edgeCurrents(from, to, PATH_MIN_SHARE / Math.max(scale, 1e-300))
    .filter((e) => !skip.has(e.edgeId))
    .map((e) => ({ edgeId: e.edgeId, share: e.share * scale }))
    .filter((e) => Math.abs(e.share) >= PATH_MIN_SHARE);
}

/** Every test point's in-circuit expectation, one factorization per condition set. */
export function templateNetwork(doc: TemplateDocument, tubeTypes: ReadonlyMap<string, TubeTypeRecord>): TemplateNetworkAnswer {
  const tubesInOf = (tp: TestPoint): boolean => (tp.kind === 'chart-reading' ? (tp.conditions.tubesIn ?? doc.conditions.tubesIn) : doc.conditions.tubesIn);
  const sets = new Map<boolean, Factored>();
  const problems = new Map<string, NetworkProblem>();
  const factored = (tubesIn: boolean): Factored => {
    let f = sets.get(tubesIn);
    if (f === undefined) {
      const assembled = assembleNetwork(doc, tubeTypes, { tubesIn });
      for (const p of assembled.problems) if (!problems.has(`${p.path} ${p.message}`)) problems.set(`${p.path} ${p.message}`, p);
      f = { edges: assembled.edges, net: assembled.edges.length > 0 ? new ChassisNetwork(assembled.edges) : null };
      sets.set(tubesIn, f);
    }
    return f;
  };
  const components = new Map(doc.components.map((c) => [c.key, c]));
  const out: Record<string, TestPointNetworkAnswer> = {};

  doc.testPoints.forEach((tp, i) => {
    const tubesIn = tubesInOf(tp);
    const none = { kind: tp.kind, tubesIn, expectedOhms: null, parallelPaths: null };
    if (tp.kind === 'pair-relation') {
      out[tp.key] = { ...none, from: null, to: null, leftOut: 'pair-relation' };
      return;
    }
    const f = factored(tubesIn);
    if (tp.kind === 'chart-reading') {
      const ohms = resistanceIn(f, tp.from, tp.to);
      const answer: TestPointNetworkAnswer = { kind: tp.kind, tubesIn, from: tp.from, to: tp.to, expectedOhms: ohms, parallelPaths: { ohms, edges: currentsIn(f.net, tp.from, tp.to) } };
      const d = chartDisagreement(tp, `testPoints[${i}]`, ohms);
      if (d !== undefined) answer.disagreement = d;
      out[tp.key] = answer;
      return;
    }
    const c = components.get(tp.componentKey);
    if (c === undefined) {
      out[tp.key] = { ...none, from: null, to: null, leftOut: 'unknown-component' };
      return;
    }
    const [from, to] = c.nodes;
    if (NON_NETWORK_KINDS.includes(c.kind as ComponentKind)) {
      out[tp.key] = { ...none, from, to, leftOut: 'non-network-kind' };
      return;
    }
    const rin = resistanceIn(f, from, to);
    const own = f.edges.filter((e) => e.id === c.key || (c.kind === 'pot' && potEdgeIds(c.key).includes(e.id)));
    let parallelPaths: TestPointNetworkAnswer['parallelPaths'];
    if (rin === null || f.net === null) parallelPaths = { ohms: null, edges: [] };
    else if (own.length === 0) {
      // The part is not in the network (a nominal `open`): everything between its nodes is a parallel path.
      parallelPaths = { ohms: rin, edges: currentsIn(f.net, from, to) };
    } else if (own.length === 1 && own[0].ohms > 0 && own[0].a === from && own[0].b === to) {
      const rp = own[0].ohms;
      const s = 1 - rin / rp; // the share of a unit current the rest carries; 0 = nothing in parallel
      if (!(s > 1e-9)) parallelPaths = { ohms: null, edges: [] };
      else parallelPaths = { ohms: (rin * rp) / (rp - rin), edges: currentsIn(f.net, from, to, 1 / s, new Set([c.key])) };
    } else {
      const rest = new ChassisNetwork(f.edges, { excludeEdgeIds: own.map((e) => e.id) });
      const r0 = rest.hasNode(from) && rest.hasNode(to) ? rest.resistance(from, to) : null;
      parallelPaths = { ohms: r0, edges: r0 === null ? [] : currentsIn(rest, from, to) };
    }
    out[tp.key] = { kind: tp.kind, tubesIn, from, to, expectedOhms: rin, parallelPaths };
  });

  return {
    testPoints: out,
    problems: [...problems.values()],
    conditionSets: [...sets.entries()].map(([tubesIn, f]) => ({ tubesIn, nodes: f.net?.nodeIds.length ?? 0, edges: f.net?.includedEdgeIds.length ?? 0 })),
  };
}

/** The chart readings that disagree with the network, from one answer (as chartDisagreements, shared factorization). */
export function disagreementsOf(answer: TemplateNetworkAnswer): ChartDisagreement[] {
  return Object.values(answer.testPoints).flatMap((t) => (t.disagreement !== undefined ? [t.disagreement] : []));
}
