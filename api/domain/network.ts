/**
 * The chassis network at DC (DESIGN.md §3.5): effective resistance between two nodes, and the
 * rank-one quantities that the in-circuit reasoning (in-circuit.ts) needs to find the implied
 * value of one part.
 *
 * Method: the graph Laplacian L (L_ii = Σ g, L_ij = −g_ij, g = 1/R) grounded at one node of each
 * connected piece, factored once as L_red = U·D·Uᵀ (dense, on Float64Array) and queried many
 * times: R_uv = (e_u − e_v)ᵀ L_red⁻¹ (e_u − e_v) ("Resistance distance", Klein & Randić,
 * J. Math. Chem. 12 (1993) 81–95; the grounded solve is the better-conditioned equivalent).
 * The elimination is done as Kron reduction of conductances: each pivot is the sum of the
 * eliminated node's conductances to the nodes still present and to ground, a sum of positive
 * terms, never a difference (the device of the GTH algorithm — Grassmann, Taksar & Heyman,
 * Operations Research 33 (1985) 1107–1116, citation from memory), so no pivot loses digits to
 * cancellation however wide the spread of values (1 Ω windings beside 10 MΩ grid leaks).
 *
 * Zero-ohm edges (shorts, internal ties) merge their nodes (union-find) instead of entering as an
 * infinite conductance. Non-linear and open-at-DC kinds (NON_NETWORK_KINDS) are left out.
 * Nodes with no DC path between them are open (`null`).
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import { COMPONENT_KINDS, NON_NETWORK_KINDS, type ComponentKind } from './words';

/** One two-terminal part (or tie) of the chassis network. */
/** Removals remembered per factored network (a chassis has a few hundred parts). */
const REMOVAL_MEMO_MAX = 4096;

export interface NetworkEdge {
  id: string;
  a: string;
  b: string;
  /** DC resistance in ohms; 0 for a short or an internal tie. Ignored for NON_NETWORK_KINDS. */
  ohms: number;
  kind?: ComponentKind;
  /** Symmetric tolerance in percent (10 for ±10 %), 0 ≤ x < 100; absent = taken as exact. */
  tolerancePct?: number;
}

/** A request the network cannot answer as asked: `field` names the offending input. */
export class NetworkError extends Error {
  override readonly name = 'NetworkError';
  constructor(
    readonly field: string,
    message: string,
  ) {
    super(message);
  }
}

/** Conditions for one factorization. */
export interface NetworkOptions {
  /** Edges taken out under these conditions (tubes out, speaker disconnected, a lifted lead). */
  excludeEdgeIds?: Iterable<string>;
  /** The ohms to use for an edge (e.g. at a tolerance limit); default: `edge.ohms`. */
  ohmsOf?: (edge: NetworkEdge) => number;
}

/** How the reading between the probes depends on one part (DESIGN.md §3.5). */
export type PartRelation = 'rank-one' | 'linear' | 'independent';

/** Why a reading does not depend on a part. */
export type IndependenceCause =
  | 'open-between-probes' // no DC path between the probes at all
  | 'not-in-network' // the part is left out (kind) or excluded by the conditions
  | 'shorted-by-tie' // a zero-ohm tie joins the part's own two nodes
  | 'elsewhere' // the part lies in a piece of the network the probes are not on
  | 'dead-end' // the part is a cut edge and both probes are on the same side of it
  | 'no-current'; // the part carries no current between these probes (e.g. a balanced bridge)

/**
 * The network with one part removed, seen from the probes a, b (the DESIGN.md §3.5 quantities).
 * rank-one: reading(R_x) = r0 − t²/(R_x + r_cd); linear: reading(R_x) = series + R_x;
 * independent: reading = r0 whatever the part.
 */
export interface PartRemoval {
  edgeId: string;
  relation: PartRelation;
  cause: IndependenceCause | null;
  /** Reading between the probes without the part; null = open. */
  r0Ohms: number | null;
  /** Resistance across the part's own nodes without the part (rank-one only). */
  rcdOhms: number | null;
  /** Transfer term t = (e_a − e_b)ᵀ L⁺ (e_c − e_d) without the part (rank-one only). */
  transferOhms: number | null;
  /** R_ac + R_db, the rest of the series path (linear only). */
  seriesOhms: number | null;
  /** How the quantities were obtained: rank-one downdate of this factorization, or a new one. */
  computedBy: 'sherman-morrison' | 'refactorization' | 'topology';
}

/** Current carried by one edge for a unit current in at `from` and out at `to`. */
export interface EdgeCurrent {
  edgeId: string;
  /** Signed, in amperes per ampere injected (positive from edge.a to edge.b). */
  share: number;
}

function isNonNetworkKind(kind: ComponentKind | undefined): boolean {
  return kind !== undefined && NON_NETWORK_KINDS.includes(kind);
}

function isNodeName(value: unknown): value is string {
  return typeof value === 'string' && value.trim().length > 0;
}

/**
 * Validates a list of edges; throws NetworkError naming the field (`edges[3].ohms`).
 * ohms is checked only for kinds that take part in the network.
 */
export function validateEdges(edges: unknown): asserts edges is NetworkEdge[] {
  if (!Array.isArray(edges)) throw new NetworkError('edges', 'edges must be a list of components');
  const seen = new Map<string, number>();
  edges.forEach((raw: unknown, i) => {
    const at = `edges[${i}]`;
    if (typeof raw !== 'object' || raw === null) throw new NetworkError(at, `${at} must be an object`);
    const e = raw as Record<string, unknown>;
    if (typeof e['id'] !== 'string' || e['id'].trim() === '') throw new NetworkError(`${at}.id`, `${at}.id must be a non-empty string`);
    const id = e['id'];
    const before = seen.get(id);
    if (before !== undefined) throw new NetworkError(`${at}.id`, `duplicate edge id '${id}' (also edges[${before}])`);
    seen.set(id, i);
    if (!isNodeName(e['a'])) throw new NetworkError(`${at}.a`, `${at}.a must name a node`);
    if (!isNodeName(e['b'])) throw new NetworkError(`${at}.b`, `${at}.b must name a node`);
    if (e['a'] === e['b']) throw new NetworkError(`${at}.b`, `edge '${id}' joins node '${e['a']}' to itself`);
    const kind = e['kind'];
    if (kind !== undefined && !(COMPONENT_KINDS as readonly unknown[]).includes(kind)) {
      throw new NetworkError(`${at}.kind`, `unknown component kind '${String(kind)}' on edge '${id}'`);
    }
    if (!isNonNetworkKind(kind as ComponentKind | undefined)) {
      const ohms = e['ohms'];
      if (typeof ohms !== 'number' || !Number.isFinite(ohms)) throw new NetworkError(`${at}.ohms`, `ohms of edge '${id}' must be a finite number`);
      if (ohms < 0) throw new NetworkError(`${at}.ohms`, `negative ohms (${ohms}) on edge '${id}'`);
    }
    const tol = e['tolerancePct'];
    if (tol !== undefined && (typeof tol !== 'number' || !Number.isFinite(tol) || tol < 0 || tol >= 100)) {
      throw new NetworkError(`${at}.tolerancePct`, `tolerancePct of edge '${id}' must be a number from 0 up to (not including) 100`);
    }
  });
}

/** Relative size below which a part's effect on a reading counts as none (rounding of doubles). */
const NEGLIGIBLE = 1e-12;
/** Below this 1 − g·R_cd the rank-one downdate loses too many digits: refactor instead. */
const NEAR_CUT = 1e-6;

/**
 * One factorization of the chassis network under one set of conditions, answering many queries.
 * Node names are those used by the edges; an unknown node is a NetworkError.
 */
export class ChassisNetwork {
  /** Every node named by any edge (left-out kinds included: their nodes exist, isolated at DC). */
  readonly nodeIds: readonly string[];
  /** Edges that conduct under these conditions (zero-ohm ties included). */
  readonly includedEdgeIds: readonly string[];
  /** Edges left out because of their kind (capacitors, rectifiers). */
  readonly leftOutEdgeIds: readonly string[];
  /** Edges excluded by the conditions. */
  readonly excludedEdgeIds: readonly string[];

  private readonly edges: readonly NetworkEdge[];
  private readonly options: NetworkOptions;
  private readonly edgeIndex = new Map<string, number>();
  private readonly nodeIndex = new Map<string, number>();
  /** ohms used per edge (NaN when not included). */
  private readonly ohms: Float64Array;
  /** supernode of each node (after merging zero-ohm ties). */
  private readonly superOf: Int32Array;
  /** connected piece of each supernode. */
  private readonly pieceOf: Int32Array;
  /** reduced index of each supernode; −1 for the grounded one of its piece. */
  private readonly reducedOf: Int32Array;
  /** adjacency of supernodes over positive edges: [edge index, other supernode] pairs. */
  private readonly adjacency: number[][];
  /** size of the reduced system. */
  private readonly m: number;
  /** unit lower factor, stored as f_ik = −U_ik below the diagonal (row-major m×m). */
  private readonly factor: Float64Array;
  /** pivots D_k. */
  private readonly pivots: Float64Array;
  /** Memo of `removal` (callers must not mutate the answers). */
  private readonly removals = new Map<string, PartRemoval>();
  private probeCache: { sa: number; sb: number; y: Float64Array } | null = null;

  constructor(edges: readonly NetworkEdge[], options: NetworkOptions = {}) {
    validateEdges(edges);
    this.edges = edges;
    this.options = options;
    edges.forEach((e, i) => this.edgeIndex.set(e.id, i));
    const excluded = new Set<string>();
    for (const id of options.excludeEdgeIds ?? []) {
      if (!this.edgeIndex.has(id)) throw new NetworkError('excludeEdgeIds', `no edge with id '${id}' to exclude`);
      excluded.add(id);
    }
    const names: string[] = [];
    const nodeOf = (name: string): number => {
      let k = this.nodeIndex.get(name);
      if (k === undefined) {
        k = names.length;
        names.push(name);
        this.nodeIndex.set(name, k);
      }
      return k;
    };
    const included: string[] = [];
    const leftOut: string[] = [];
    const excludedList: string[] = [];
    this.ohms = new Float64Array(edges.length).fill(Number.NaN);
    const ends: [number, number][] = [];
    edges.forEach((e, i) => {
      ends.push([nodeOf(e.a), nodeOf(e.b)]);
      if (isNonNetworkKind(e.kind)) leftOut.push(e.id);
      else if (excluded.has(e.id)) excludedList.push(e.id);
      else {
        const r = options.ohmsOf ? options.ohmsOf(e) : e.ohms;
        if (!Number.isFinite(r) || r < 0) throw new NetworkError(`edges[${i}].ohms`, `ohms of edge '${e.id}' under these conditions must be finite and not negative (got ${r})`);
        this.ohms[i] = r;
        included.push(e.id);
      }
    });
    this.nodeIds = names;
    this.includedEdgeIds = included;
    this.leftOutEdgeIds = leftOut;
    this.excludedEdgeIds = excludedList;

    // Merge the nodes joined by zero-ohm edges (union-find with path halving).
    const n = names.length;
    const parent = Int32Array.from({ length: n }, (_, k) => k);
    const find = (k: number): number => {
      while (parent[k] !== k) {
        parent[k] = parent[parent[k]];
        k = parent[k];
      }
      return k;
    };
    edges.forEach((_, i) => {
      if (this.ohms[i] === 0) {
        const [u, v] = ends[i];
        const ru = find(u);
        const rv = find(v);
        if (ru !== rv) parent[Math.max(ru, rv)] = Math.min(ru, rv);
      }
    });
    this.superOf = new Int32Array(n);
    const superIndex = new Map<number, number>();
    for (let k = 0; k < n; k++) {
      const root = find(k);
      let s = superIndex.get(root);
      if (s === undefined) {
        s = superIndex.size;
        superIndex.set(root, s);
      }
      this.superOf[k] = s;
    }
    const ns = superIndex.size;
    this.adjacency = Array.from({ length: ns }, () => []);
    edges.forEach((_, i) => {
      const r = this.ohms[i];
      if (!(r > 0)) return;
      const su = this.superOf[ends[i][0]];
      const sv = this.superOf[ends[i][1]];
      if (su === sv) return; // shorted out by a tie: carries no current
      this.adjacency[su].push(i, sv);
      this.adjacency[sv].push(i, su);
    });

    // Connected pieces; the first supernode met in each piece is its ground.
    this.pieceOf = new Int32Array(ns).fill(-1);
    this.reducedOf = new Int32Array(ns).fill(-1);
    let pieces = 0;
    let m = 0;
    const stack: number[] = [];
    for (let s0 = 0; s0 < ns; s0++) {
      if (this.pieceOf[s0] !== -1) continue;
      this.pieceOf[s0] = pieces;
      stack.push(s0);
      while (stack.length > 0) {
        const s = stack.pop()!;
        if (s !== s0) this.reducedOf[s] = m++;
        const adj = this.adjacency[s];
        for (let j = 1; j < adj.length; j += 2) {
          const t = adj[j];
          if (this.pieceOf[t] === -1) {
            this.pieceOf[t] = pieces;
            stack.push(t);
          }
        }
      }
      pieces++;
    }
    this.m = m;

    // Conductances: lower triangle of the reduced system, and each node's conductance to ground.
    const w = new Float64Array(m * m);
    const leak = new Float64Array(m);
    edges.forEach((_, i) => {
      const r = this.ohms[i];
      if (!(r > 0)) return;
      const ru = this.reducedOf[this.superOf[ends[i][0]]];
      const rv = this.reducedOf[this.superOf[ends[i][1]]];
      if (this.superOf[ends[i][0]] === this.superOf[ends[i][1]]) return;
      const g = 1 / r;
      if (ru >= 0 && rv >= 0) w[Math.max(ru, rv) * m + Math.min(ru, rv)] += g;
      else leak[ru >= 0 ? ru : rv] += g;
    });
    this.pivots = new Float64Array(m);
    factorKron(w, leak, this.pivots, m);
    this.factor = w;
  }

  /** The same edges under other conditions: this factorization's options with one more edge out. */
  without(edgeId: string): ChassisNetwork {
    this.edgeAt(edgeId, 'edgeId');
    const ex = new Set(this.excludedEdgeIds);
    ex.add(edgeId);
    return new ChassisNetwork(this.edges, { ...this.options, excludeEdgeIds: ex });
  }

  hasNode(name: string): boolean {
    return this.nodeIndex.has(name);
  }

  /** The ohms this factorization uses for an edge; null when the edge is left out or excluded. */
  ohmsOf(edgeId: string): number | null {
    const r = this.ohms[this.edgeAt(edgeId, 'edgeId')];
    return Number.isNaN(r) ? null : r;
  }

  /** True when a DC path joins the two nodes. */
  connected(u: string, v: string): boolean {
    return this.pieceOf[this.superNode(u, 'from')] === this.pieceOf[this.superNode(v, 'to')];
  }

  /** Effective resistance between two nodes; null when no DC path joins them (open). */
  resistance(u: string, v: string): number | null {
    const su = this.superNode(u, 'from');
    const sv = this.superNode(v, 'to');
    if (su === sv) return 0;
    if (this.pieceOf[su] !== this.pieceOf[sv]) return null;
    const y = this.forward(su, sv);
    return this.quadratic(y, y);
  }

  /**
   * Transfer term (e_a − e_b)ᵀ L⁺ (e_c − e_d): the voltage from c to d for a unit current in at a
   * and out at b (equal to the converse by reciprocity). null when a and b, or c and d, are not
   * joined; 0 when c, d lie on another piece of the network.
   */
  transfer(a: string, b: string, c: string, d: string): number | null {
    const sa = this.superNode(a, 'from');
    const sb = this.superNode(b, 'to');
    const sc = this.superNode(c, 'c');
    const sd = this.superNode(d, 'd');
    if (this.pieceOf[sa] !== this.pieceOf[sb] || this.pieceOf[sc] !== this.pieceOf[sd]) return null;
    if (sa === sb || sc === sd || this.pieceOf[sa] !== this.pieceOf[sc]) return 0;
    return this.quadratic(this.forward(sa, sb), this.forward(sc, sd));
  }

  /**
   * Node voltages for a unit current in at `from` and out at `to` (`to` at 0 V), for the nodes
   * of their piece of the network; null when the two are not joined.
   */
  potentials(from: string, to: string): Map<string, number> | null {
    const sa = this.superNode(from, 'from');
    const sb = this.superNode(to, 'to');
    if (this.pieceOf[sa] !== this.pieceOf[sb]) return null;
    const x = new Float64Array(this.m);
    if (sa !== sb) {
      const y = this.forward(sa, sb);
      for (let k = 0; k < this.m; k++) x[k] = y[k] / this.pivots[k];
      this.backward(x);
    }
    const at = (s: number): number => (this.reducedOf[s] >= 0 ? x[this.reducedOf[s]] : 0);
    const vb = at(sb);
    const out = new Map<string, number>();
    this.nodeIds.forEach((name, k) => {
      const s = this.superOf[k];
      if (this.pieceOf[s] === this.pieceOf[sa]) out.set(name, at(s) - vb);
    });
    return out;
  }

  /**
   * Currents in the positive-ohm edges for a unit current from `from` to `to`, largest first;
   * edges carrying less than `minShare` of it are left out. Zero-ohm ties are not listed (their
   * current is not fixed by the node voltages). Empty when the probes are not joined.
   */
  edgeCurrents(from: string, to: string, minShare = 1e-9): EdgeCurrent[] {
    const v = this.potentials(from, to);
    if (v === null) return [];
    const out: EdgeCurrent[] = [];
    this.edges.forEach((e, i) => {
      const r = this.ohms[i];
      if (!(r > 0)) return;
      const va = v.get(e.a);
      const vb = v.get(e.b);
      if (va === undefined || vb === undefined) return;
      const share = (va - vb) / r;
      if (Math.abs(share) > minShare) out.push({ edgeId: e.id, share });
    });
    return out.sort((p, q) => Math.abs(q.share) - Math.abs(p.share) || (p.edgeId < q.edgeId ? -1 : 1));
  }

  /**
   * The network without one part, seen from the probes (DESIGN.md §3.5): a rank-one downdate of
   * this factorization (Sherman–Morrison) when the part lies on a cycle, the series relation when
   * it is a cut edge between the probes, or independence. Falls back to a new factorization for
   * a zero-ohm part or one so nearly a cut edge that the downdate would lose digits.
   */
  removal(edgeId: string, a: string, b: string): PartRemoval {
    // A factored network never changes: each (part, probes) is worked out once. The bench grid
    // asks for the same part's removal for every reading of it (the implied value of each).
    const key = `${edgeId}\u0000${a}\u0000${b}`;
    const known = this.removals.get(key);
    if (known !== undefined) return known;
    const answer = this.removalFresh(edgeId, a, b);
    if (this.removals.size >= REMOVAL_MEMO_MAX) this.removals.clear();
    this.removals.set(key, answer);
    return answer;
  }

  private removalFresh(edgeId: string, a: string, b: string): PartRemoval {
    const i = this.edgeAt(edgeId, 'partId');
    const e = this.edges[i];
    const sa = this.superNode(a, 'from');
    const sb = this.superNode(b, 'to');
    const r = this.ohms[i];
    const base = { edgeId, rcdOhms: null, transferOhms: null, seriesOhms: null };
    if (this.pieceOf[sa] !== this.pieceOf[sb]) {
      return { ...base, relation: 'independent', cause: 'open-between-probes', r0Ohms: null, computedBy: 'topology' };
    }
    if (Number.isNaN(r)) {
      return { ...base, relation: 'independent', cause: 'not-in-network', r0Ohms: this.resistance(a, b), computedBy: 'topology' };
    }
    if (r === 0) return this.removalByRefactoring(edgeId, a, b);
    const sc = this.superNode(e.a, 'c');
    const sd = this.superNode(e.b, 'd');
    if (sc === sd) {
      return { ...base, relation: 'independent', cause: 'shorted-by-tie', r0Ohms: this.resistance(a, b), computedBy: 'topology' };
    }
    if (this.pieceOf[sa] !== this.pieceOf[sc]) {
      return { ...base, relation: 'independent', cause: 'elsewhere', r0Ohms: this.resistance(a, b), computedBy: 'topology' };
    }
    const sideC = this.reachableWithout(sc, i);
    if (!sideC[sd]) {
      // A cut edge: no current crosses it unless the probes sit on opposite sides.
      if (sideC[sa] === sideC[sb]) {
        return { ...base, relation: 'independent', cause: 'dead-end', r0Ohms: this.resistance(a, b), computedBy: 'topology' };
      }
      const [p, q] = sideC[sa] ? [a, b] : [b, a];
      const series = (this.resistance(p, e.a) ?? 0) + (this.resistance(e.b, q) ?? 0);
      return { ...base, relation: 'linear', cause: null, r0Ohms: null, seriesOhms: series, computedBy: 'topology' };
    }
    const g = 1 / r;
    const ya = this.probeVector(sa, sb);
    // A component check probes the part's own nodes: the same solve serves both vectors.
    const yc = sc === sa && sd === sb ? ya : this.forward(sc, sd);
    const rab = this.quadratic(ya, ya);
    const rcd = this.quadratic(yc, yc);
    const t = this.quadratic(ya, yc);
    const s = 1 - g * rcd;
    if (!(s > NEAR_CUT)) return this.removalByRefactoring(edgeId, a, b);
    const r0 = rab + (g * t * t) / s;
    const rcd0 = rcd / s;
    const t0 = t / s;
    return classifyRankOne(edgeId, r0, rcd0, t0, 'sherman-morrison');
  }

  /** The same quantities as `removal`, from a new factorization without the part. */
  removalByRefactoring(edgeId: string, a: string, b: string): PartRemoval {
    const i = this.edgeAt(edgeId, 'partId');
    const e = this.edges[i];
    const base = { edgeId, rcdOhms: null, transferOhms: null, seriesOhms: null, computedBy: 'refactorization' as const };
    if (!this.connected(a, b)) return { ...base, relation: 'independent', cause: 'open-between-probes', r0Ohms: null };
    if (Number.isNaN(this.ohms[i])) return { ...base, relation: 'independent', cause: 'not-in-network', r0Ohms: this.resistance(a, b) };
    const rest = this.without(edgeId);
    if (rest.superNode(e.a, 'c') === rest.superNode(e.b, 'd')) {
      return { ...base, relation: 'independent', cause: 'shorted-by-tie', r0Ohms: rest.resistance(a, b) };
    }
    if (!this.connected(a, e.a)) return { ...base, relation: 'independent', cause: 'elsewhere', r0Ohms: rest.resistance(a, b) };
    if (!rest.connected(e.a, e.b)) {
      const aOnC = rest.connected(a, e.a);
      const bOnC = rest.connected(b, e.a);
      if (aOnC === bOnC) return { ...base, relation: 'independent', cause: 'dead-end', r0Ohms: rest.resistance(a, b) };
      const [p, q] = aOnC ? [a, b] : [b, a];
      const series = (rest.resistance(p, e.a) ?? 0) + (rest.resistance(e.b, q) ?? 0);
      return { ...base, relation: 'linear', cause: null, r0Ohms: null, seriesOhms: series };
    }
    return classifyRankOne(edgeId, rest.resistance(a, b)!, rest.resistance(e.a, e.b)!, rest.transfer(a, b, e.a, e.b)!, 'refactorization');
  }

  private edgeAt(edgeId: string, field: string): number {
    const i = this.edgeIndex.get(edgeId);
    if (i === undefined) throw new NetworkError(field, `no edge with id '${edgeId}' in the network`);
    return i;
  }

  private superNode(name: string, field: string): number {
    const k = this.nodeIndex.get(name);
    if (k === undefined) throw new NetworkError(field, `unknown node '${name}': no component connects to it`);
    return this.superOf[k];
  }

  /** Supernodes reachable from s0 without crossing edge `skip`. */
  private reachableWithout(s0: number, skip: number): Uint8Array {
    const seen = new Uint8Array(this.adjacency.length);
    const stack = [s0];
    seen[s0] = 1;
    while (stack.length > 0) {
      const s = stack.pop()!;
      const adj = this.adjacency[s];
      for (let j = 0; j < adj.length; j += 2) {
        if (adj[j] === skip) continue;
        const t = adj[j + 1];
        if (!seen[t]) {
          seen[t] = 1;
          stack.push(t);
        }
      }
    }
    return seen;
  }

  /** forward(sa, sb) for the probes, kept for the next part asked about with the same probes. */
  private probeVector(sa: number, sb: number): Float64Array {
    const c = this.probeCache;
    if (c !== null && c.sa === sa && c.sb === sb) return c.y;
    const y = this.forward(sa, sb);
    this.probeCache = { sa, sb, y };
    return y;
  }

  /** y = U⁻¹ (e_su − e_sv) in reduced indices (grounded nodes drop out). */
  private forward(su: number, sv: number): Float64Array {
    const m = this.m;
    const y = new Float64Array(m);
    const ru = this.reducedOf[su];
    const rv = this.reducedOf[sv];
    if (ru >= 0) y[ru] += 1;
    if (rv >= 0) y[rv] -= 1;
    let start = m;
    if (ru >= 0) start = ru;
    if (rv >= 0 && rv < start) start = rv;
    const f = this.factor;
    for (let i = start + 1; i < m; i++) {
      let acc = y[i];
      const row = i * m;
      for (let k = start; k < i; k++) {
        const yk = y[k];
        if (yk !== 0) acc += f[row + k] * yk;
      }
      y[i] = acc;
    }
    return y;
  }

  /** x ← U⁻ᵀ x in place. */
  private backward(x: Float64Array): void {
    const m = this.m;
    const f = this.factor;
    for (let i = m - 1; i > 0; i--) {
      const xi = x[i];
      if (xi === 0) continue;
      const row = i * m;
      for (let k = 0; k < i; k++) x[k] += f[row + k] * xi;
    }
  }

  /** y1ᵀ D⁻¹ y2. */
  private quadratic(y1: Float64Array, y2: Float64Array): number {
    let acc = 0;
    for (let k = 0; k < this.m; k++) if (y1[k] !== 0 && y2[k] !== 0) acc += (y1[k] * y2[k]) / this.pivots[k];
    return acc;
  }
}

function classifyRankOne(edgeId: string, r0: number, rcd: number, t: number, by: 'sherman-morrison' | 'refactorization'): PartRemoval {
  // The part moves the reading over [r0 − t²/r_cd, r0]; when that span is nothing, it is independent.
  const span = (t * t) / rcd;
  if (!(span > NEGLIGIBLE * r0)) {
    return { edgeId, relation: 'independent', cause: 'no-current', r0Ohms: r0, rcdOhms: rcd, transferOhms: t, seriesOhms: null, computedBy: by };
  }
  return { edgeId, relation: 'rank-one', cause: null, r0Ohms: r0, rcdOhms: rcd, transferOhms: t, seriesOhms: null, computedBy: by };
}

/**
 * In-place U·D·Uᵀ factorization of a grounded Laplacian given as conductances: `w` holds the
 * off-diagonal conductances in its strict lower triangle (row-major m×m), `leak` each node's
 * conductance to ground. Eliminating node k (Kron reduction) adds w_ik·w_jk/p_k between its
 * neighbours and w_ik·leak_k/p_k to their leaks; the pivot p_k is the sum of k's remaining
 * conductances, a sum of positive terms. On return the lower triangle holds f_ik = w_ik/p_k and
 * `pivots` the p_k.
 */
function factorKron(w: Float64Array, leak: Float64Array, pivots: Float64Array, m: number): void {
  const col = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    let p = leak[k];
    for (let i = k + 1; i < m; i++) {
      const c = w[i * m + k];
      col[i] = c;
      p += c;
    }
    if (!(p > 0) || !Number.isFinite(p)) throw new Error(`network factorization failed at pivot ${k} (${p})`);
    pivots[k] = p;
    const lk = leak[k];
    for (let i = k + 1; i < m; i++) {
      const ci = col[i];
      if (ci === 0) continue;
      const fi = ci / p;
      leak[i] += fi * lk;
      const row = i * m;
      for (let j = k + 1; j < i; j++) {
        const cj = col[j];
        if (cj !== 0) w[row + j] += fi * cj;
      }
      w[row + k] = fi;
    }
  }
}

/** Effective resistance between two nodes of a list of edges; null when open. */
export function effectiveResistance(edges: readonly NetworkEdge[], from: string, to: string): number | null {
  return new ChassisNetwork(edges).resistance(from, to);
}
