/**
 * Generated properties of effective resistance on seeded random networks, and agreement with
 * two reference libraries used as oracles (mathjs lusolve in exact Fraction arithmetic on a
 * grounded Laplacian; ml-matrix pseudoInverse). mathjs `pinv` is never used: it is silently
 * wrong on singular Laplacians (check-values.md §4, numerical warning).
 */
import { all, create, type Fraction, type Matrix as MathMatrix } from 'mathjs';
import { Matrix as MlMatrix, pseudoInverse } from 'ml-matrix';
import { ChassisNetwork, type NetworkEdge } from '../../api/domain/network';

/** mulberry32: a small seeded PRNG (public-domain construction), so every run sees the same networks. */
function prng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * A connected random network on n nodes: a random spanning tree plus `extra` random edges,
 * values log-uniform over [lo, hi] (or integers 1…hi when `integer`).
 */
function randomNetwork(rand: () => number, n: number, extra: number, opts: { lo?: number; hi?: number; integer?: boolean } = {}): NetworkEdge[] {
  const lo = opts.lo ?? 10;
  const hi = opts.hi ?? 1e6;
  const value = (): number => (opts.integer ? 1 + Math.floor(rand() * hi) : lo * Math.pow(hi / lo, rand()));
  const edges: NetworkEdge[] = [];
  for (let k = 1; k < n; k++) edges.push({ id: `t${k}`, a: `n${Math.floor(rand() * k)}`, b: `n${k}`, ohms: value() });
  for (let k = 0; k < extra; k++) {
    const a = Math.floor(rand() * n);
    let b = Math.floor(rand() * (n - 1));
    if (b >= a) b++;
    edges.push({ id: `x${k}`, a: `n${a}`, b: `n${b}`, ohms: value() });
  }
  return edges;
}

function relClose(actual: number | null, expected: number, rel: number): void {
  expect(actual).not.toBeNull();
  expect(Math.abs(actual! - expected)).toBeLessThanOrEqual(rel * Math.max(Math.abs(expected), 1e-300));
}

const SEEDS = [1, 2, 3, 5, 8, 13, 21, 34];

describe('effective resistance, generated properties (seeded random networks)', () => {
  for (const seed of SEEDS) {
    // Each spec draws from its own stream: jasmine runs them in random order.
    const build = prng(seed);
    const n = 6 + Math.floor(build() * 20);
    const edges = randomNetwork(build, n, Math.floor(n * 0.8));
    const net = new ChassisNetwork(edges);
    const names = net.nodeIds;

    it(`is symmetric with R_ii = 0 (seed ${seed}, ${n} nodes)`, () => {
      for (const u of names) {
        expect(net.resistance(u, u)).toBe(0);
        for (const v of names) relClose(net.resistance(u, v), net.resistance(v, u)!, 1e-12);
      }
    });

    it(`obeys the triangle inequality (seed ${seed}); resistance distance is a metric (Klein & Randić 1993)`, () => {
      for (const u of names) for (const v of names) for (const w of names) {
        expect(net.resistance(u, w)!).toBeLessThanOrEqual((net.resistance(u, v)! + net.resistance(v, w)!) * (1 + 1e-12));
      }
    });

    it(`obeys Rayleigh monotonicity: raising one resistor lowers no R_ij (seed ${seed}); Doyle & Snell, Random Walks and Electric Networks, MAA Carus Monograph 22 (1984)`, () => {
      const rand = prng(seed + 200);
      const raised = edges[Math.floor(rand() * edges.length)].id;
      const higher = new ChassisNetwork(edges.map((e) => (e.id === raised ? { ...e, ohms: e.ohms * 3.3 } : e)));
      let someRose = false;
      for (const u of names) for (const v of names) {
        const before = net.resistance(u, v)!;
        const after = higher.resistance(u, v)!;
        expect(after).toBeGreaterThanOrEqual(before * (1 - 1e-12));
        if (after > before * (1 + 1e-9)) someRose = true;
      }
      expect(someRose).toBeTrue(); // the raised resistor lies on some path: at least its own ends move
    });

    it(`satisfies Foster's theorem Σ_e R_e(eff)/R_e = n − 1 (seed ${seed}); Foster 1949, citation from memory`, () => {
      let sum = 0;
      for (const e of edges) sum += net.resistance(e.a, e.b)! / e.ohms;
      expect(sum).toBeCloseTo(n - 1, 9);
    });

    it(`agrees with ml-matrix pseudoInverse, R_ij = (e_i − e_j)ᵀ L⁺ (e_i − e_j) (seed ${seed})`, () => {
      // Unit-scale values for the oracle's sake (a pseudo-inverse of a badly scaled L is itself inexact).
      const r2 = prng(seed + 100);
      const moderate = randomNetwork(r2, n, Math.floor(n * 0.8), { lo: 1, hi: 100 });
      const ours = new ChassisNetwork(moderate);
      const index = new Map(ours.nodeIds.map((name, k) => [name, k]));
      const L = MlMatrix.zeros(n, n);
      for (const e of moderate) {
        const i = index.get(e.a)!;
        const j = index.get(e.b)!;
        const g = 1 / e.ohms;
        L.set(i, i, L.get(i, i) + g);
        L.set(j, j, L.get(j, j) + g);
        L.set(i, j, L.get(i, j) - g);
        L.set(j, i, L.get(j, i) - g);
      }
      const P = pseudoInverse(L);
      for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) {
        const ref = P.get(i, i) + P.get(j, j) - 2 * P.get(i, j);
        relClose(ours.resistance(ours.nodeIds[i], ours.nodeIds[j]), ref, 1e-9);
      }
    });

    it(`downdates one part (Sherman–Morrison) exactly as a new factorization does (seed ${seed})`, () => {
      const rand = prng(seed + 300);
      for (let k = 0; k < 6; k++) {
        const part = edges[Math.floor(rand() * edges.length)];
        const a = names[Math.floor(rand() * n)];
        const b = names[Math.floor(rand() * n)];
        const fast = net.removal(part.id, a, b);
        const slow = net.removalByRefactoring(part.id, a, b);
        expect(fast.relation).toBe(slow.relation);
        for (const key of ['r0Ohms', 'rcdOhms', 'seriesOhms'] as const) {
          const f = fast[key];
          const s = slow[key];
          if (s === null) expect(f).toBeNull();
          else relClose(f, s, 1e-9);
        }
        if (slow.transferOhms === null) expect(fast.transferOhms).toBeNull();
        else {
          // t may be ~0 (no current through the part): compare on the scale √(r0·r_cd) that bounds |t|.
          const scale = Math.sqrt(slow.r0Ohms! * slow.rcdOhms!);
          expect(Math.abs(fast.transferOhms! - slow.transferOhms)).toBeLessThanOrEqual(1e-9 * scale + 1e-300);
        }
      }
    });
  }
});

describe('effective resistance, exact oracle (mathjs lusolve with Fraction numbers)', () => {
  const math = create(all, { number: 'Fraction' });

  /** Exact R_uv: ground v, solve L_red x = e_u, R = x_u. */
  function exactResistance(edges: NetworkEdge[], names: readonly string[], u: string, v: string): number {
    const keep = names.filter((x) => x !== v);
    const at = new Map(keep.map((x, k) => [x, k]));
    const m = keep.length;
    const L: Fraction[][] = Array.from({ length: m }, () => Array.from({ length: m }, () => math.fraction(0)));
    for (const e of edges) {
      const g = math.fraction(1, e.ohms);
      const i = at.get(e.a);
      const j = at.get(e.b);
      if (i !== undefined) L[i][i] = math.add(L[i][i], g) as Fraction;
      if (j !== undefined) L[j][j] = math.add(L[j][j], g) as Fraction;
      if (i !== undefined && j !== undefined) {
        L[i][j] = math.subtract(L[i][j], g) as Fraction;
        L[j][i] = math.subtract(L[j][i], g) as Fraction;
      }
    }
    const rhs = keep.map((x) => [math.fraction(x === u ? 1 : 0)]);
    const x = math.lusolve(math.matrix(L), math.matrix(rhs)) as MathMatrix;
    return math.number(x.get([at.get(u)!, 0]) as Fraction) as number;
  }

  for (const seed of [7, 11, 19]) {
    it(`agrees to 1e-12 on a random network of integer ohms (seed ${seed})`, () => {
      const rand = prng(seed);
      const n = 5 + Math.floor(rand() * 3);
      const edges = randomNetwork(rand, n, n, { integer: true, hi: 1000 });
      const net = new ChassisNetwork(edges);
      const names = net.nodeIds;
      for (let k = 0; k < 4; k++) {
        const u = names[Math.floor(rand() * n)];
        let v = names[Math.floor(rand() * n)];
        if (v === u) v = names[(names.indexOf(u) + 1) % n];
        relClose(net.resistance(u, v), exactResistance(edges, names, u, v), 1e-12);
      }
    });
  }

  it('agrees on the cube body diagonal, 5/6 (check-values.md §4)', () => {
    const edges: NetworkEdge[] = [];
    for (let v = 0; v < 8; v++) for (const bit of [1, 2, 4]) if ((v & bit) === 0) edges.push({ id: `e${v}-${v | bit}`, a: `c${v}`, b: `c${v | bit}`, ohms: 1 });
    const net = new ChassisNetwork(edges);
    expect(exactResistance(edges, net.nodeIds, 'c0', 'c7')).toBeCloseTo(5 / 6, 15);
    relClose(net.resistance('c0', 'c7'), 5 / 6, 1e-14);
  });
});
