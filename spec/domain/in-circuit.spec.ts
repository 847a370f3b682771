/**
 * In-circuit reasoning (api/domain/in-circuit.ts, DESIGN.md §3.5): implied value, interval,
 * explainability, healthy range, the POST /api/calc/network answer, and the no-network rules.
 * Hand-worked cases carry their arithmetic beside them [CALC]; the closed form is checked against
 * a bracketed search that only ever asks the network for its reading.
 */
import { ChassisNetwork, type NetworkEdge } from '../../api/domain/network';
import {
  IN_CIRCUIT_CAVEATS,
  IN_CIRCUIT_NOTE_TEXTS,
  NetworkError,
  analyseInCircuit,
  analysePart,
  explainableReadings,
  impliedOhms,
  judgeImplied,
  noNetworkAdvice,
  toleranceNetworks,
  type InCircuitInput,
} from '../../api/domain/in-circuit';

const r = (id: string, a: string, b: string, ohms: number, tolerancePct?: number): NetworkEdge =>
  tolerancePct === undefined ? { id, a, b, ohms } : { id, a, b, ohms, tolerancePct };

/** mulberry32 (public-domain construction): a small seeded PRNG. */
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

function randomNetwork(rand: () => number, n: number, extra: number): NetworkEdge[] {
  const value = (): number => 100 * Math.pow(1e4, rand());
  const tol = (): number => [5, 10, 20][Math.floor(rand() * 3)];
  const edges: NetworkEdge[] = [];
  for (let k = 1; k < n; k++) edges.push(r(`t${k}`, `n${Math.floor(rand() * k)}`, `n${k}`, value(), tol()));
  for (let k = 0; k < extra; k++) {
    const a = Math.floor(rand() * n);
    let b = Math.floor(rand() * (n - 1));
    if (b >= a) b++;
    edges.push(r(`x${k}`, `n${a}`, `n${b}`, value(), tol()));
  }
  return edges;
}

const notesOf = (res: { explanation: { notes: { code: string }[] } }): string[] => res.explanation.notes.map((n) => n.code);

// Case A — component check: Rx 10 k ±10 % across c–d with a 40 k ±5 % path in parallel.
// R0 = 40 k (38 k … 42 k); nominal reading 10 k ∥ 40 k = 8 k; R_x = R0·R_m/(R0 − R_m) [CALC].
const caseA = (): NetworkEdge[] => [r('Rx', 'c', 'd', 10e3, 10), r('Rp', 'c', 'd', 40e3, 5)];
const inputA = (readingOhms: number, uncertaintyOhms = 0): InCircuitInput => ({ edges: caseA(), from: 'c', to: 'd', partId: 'Rx', readingOhms, uncertaintyOhms });

describe('analyseInCircuit, component check (hand-worked case A)', () => {
  it('gives the nominal value back at the nominal reading, with the parallel path named', () => {
    const res = analyseInCircuit(inputA(8000));
    expect(res.open).toBeFalse();
    expect(res.effectiveOhms).toBeCloseTo(8000, 8);
    expect(res.impliedOhms).toBeCloseTo(10e3, 6);
    expect(res.explainable).toBeTrue();
    expect(res.verdict).toBe('in-band');
    expect(res.explanation.componentCheck).toBeTrue();
    expect(res.explanation.relation).toBe('rank-one');
    expect(res.explanation.parallelPaths.ohms).toBeCloseTo(40e3, 6);
    expect(res.explanation.parallelPaths.edges.map((e) => e.edgeId)).toEqual(['Rp']);
    expect(Math.abs(res.explanation.parallelPaths.edges[0].share)).toBeCloseTo(1, 12);
    expect(res.explanation.band).toEqual({ lowOhms: 9000, highOhms: 11000, source: 'tolerance' });
    expect(res.explanation.candidates).toEqual([]);
  });

  it('proves a part high in circuit: 9 k reads as 11.45 k … 11.79 k (interval wholly above 11 k)', () => {
    // low end 42·9/33 = 11.4545 k (parallel at +5 %), high end 38·9/29 = 11.7931 k (at −5 %) [CALC].
    const res = analyseInCircuit(inputA(9000));
    expect(res.impliedOhms).toBeCloseTo((40 * 9 * 1000) / 31, 6);
    expect(res.impliedInterval!.lowOhms).toBeCloseTo((42e3 * 9e3) / 33e3, 6);
    expect(res.impliedInterval!.highOhms!).toBeCloseTo((38e3 * 9e3) / 29e3, 6);
    expect(res.verdict).toBe('high');
  });

  it('proves a part low in circuit: 6.5 k ± 50 Ω reads as 7.62 k … 7.91 k', () => {
    // 42·6.45/35.55 = 7.6203 k; 38·6.55/31.45 = 7.9142 k [CALC].
    const res = analyseInCircuit(inputA(6500, 50));
    expect(res.impliedInterval!.lowOhms).toBeCloseTo((42e3 * 6450) / 35550, 6);
    expect(res.impliedInterval!.highOhms!).toBeCloseTo((38e3 * 6550) / 31450, 6);
    expect(res.verdict).toBe('low');
  });

  it('is in band for 8.4 k ± 100 Ω (10.34 k … 10.95 k), inconclusive for 8.8 k ± 100 Ω (10.97 k … 11.62 k)', () => {
    const inBand = analyseInCircuit(inputA(8400, 100));
    expect(inBand.impliedInterval!.lowOhms).toBeCloseTo((42e3 * 8300) / 33700, 6);
    expect(inBand.impliedInterval!.highOhms!).toBeCloseTo((38e3 * 8500) / 29500, 6);
    expect(inBand.verdict).toBe('in-band');
    const straddle = analyseInCircuit(inputA(8800, 100));
    expect(straddle.verdict).toBe('inconclusive');
    expect(straddle.explanation.reason).toBe('unexplained-in-circuit');
    expect(notesOf(straddle)).toContain('interval-straddles-band');
  });

  it('gives an interval unbounded above ("≥ X") where the inverse blows up, and judges it high', () => {
    // 39 k ± 500 Ω: R_m + U = 39.5 k ≥ 38 k (the path at −5 %): no upper end; low end 42·38.5/3.5 = 462 k.
    const res = analyseInCircuit(inputA(39e3, 500));
    expect(res.impliedInterval!.highOhms).toBeNull();
    expect(res.impliedInterval!.lowOhms).toBeCloseTo((42e3 * 38.5e3) / 3.5e3, 3);
    expect(res.explainable).toBeTrue();
    expect(res.verdict).toBe('high');
    expect(notesOf(res)).toContain('implied-unbounded');
  });

  it('calls a reading above the path with the part open "not explained by this part", never open', () => {
    // 45 k − 100 Ω > 42 k: not even the part open explains it.
    const res = analyseInCircuit(inputA(45e3, 100));
    expect(res.explainable).toBeFalse();
    expect(res.impliedOhms).toBeNull();
    expect(res.impliedInterval).toBeNull();
    expect(res.verdict).toBe('inconclusive');
    expect(res.verdict).not.toBe('open');
    expect(res.explanation.reason).toBe('unexplained-in-circuit');
    expect(notesOf(res)).toContain('not-explained-high');
    expect(res.explanation.explainableRange!.lowOhms).toBeCloseTo(0, 6); // the part shorted shorts the probes
    expect(res.explanation.explainableRange!.highOhms!).toBeCloseTo(42e3, 6);
    // Its twin within U of 42 k is explained.
    expect(analyseInCircuit(inputA(42.05e3, 100)).explainable).toBeTrue();
  });

  it('gives the healthy range with every part, the tested one included, at its limits (two solves)', () => {
    // 9 k ∥ 38 k = 7276.6 Ω; 11 k ∥ 42 k = 8716.98 Ω [CALC].
    const res = analyseInCircuit(inputA(8000));
    expect(res.healthyRange!.lowOhms).toBeCloseTo((9e3 * 38e3) / 47e3, 6);
    expect(res.healthyRange!.highOhms).toBeCloseTo((11e3 * 42e3) / 53e3, 6);
  });

  it('takes the band from the request over the tolerance (asymmetric −10 %/+20 %)', () => {
    const res = analyseInCircuit({ ...inputA(9000), band: { lowPct: -10, highPct: 20 } });
    expect(res.explanation.band).toEqual({ lowOhms: 9000, highOhms: 12000, source: 'input' });
    expect(res.verdict).toBe('in-band'); // 11.45 k … 11.79 k lies inside 9 k … 12 k
  });

  it('notes a missing U and treats it as 0', () => {
    const { uncertaintyOhms: _u, ...rest } = inputA(9000);
    const res = analyseInCircuit(rest);
    expect(notesOf(res)).toContain('no-uncertainty');
    expect(res.explanation.uncertaintyOhms).toBe(0);
    expect(notesOf(analyseInCircuit(inputA(9000, 0)))).not.toContain('no-uncertainty');
  });

  it('does not judge without a band, but still gives the implied value', () => {
    const res = analyseInCircuit({ edges: [r('Rx', 'c', 'd', 10e3), r('Rp', 'c', 'd', 40e3)], from: 'c', to: 'd', partId: 'Rx', readingOhms: 8000, uncertaintyOhms: 0 });
    expect(res.verdict).toBeNull();
    expect(res.impliedOhms).toBeCloseTo(10e3, 6);
    expect(notesOf(res)).toContain('no-band');
    expect(notesOf(res)).toContain('tolerance-missing');
  });
});

// Case B — chart reading a→g: R1 1 k a–c, Rx 10 k c–g, R2 10 k c–g, R3 100 k a–g.
// Without Rx: R0 = 11 k ∥ 100 k = 9909.91 Ω; R_cd = 10 k ∥ 101 k = 9099.10 Ω;
// t = V_c for 1 A a→g = (100/111)·10 k = 9009.01 Ω. With Rx: (1 k + 5 k) ∥ 100 k = 5660.38 Ω;
// with Rx shorted: 1 k ∥ 100 k = 990.10 Ω [CALC].
const caseB = (): NetworkEdge[] => [r('R1', 'a', 'c', 1e3, 10), r('Rx', 'c', 'g', 10e3, 10), r('R2', 'c', 'g', 10e3, 10), r('R3', 'a', 'g', 100e3, 10)];

describe('in-circuit reasoning, chart reading with a transfer term (hand-worked case B)', () => {
  it('finds R0, R_cd and t as worked by hand', () => {
    const q = new ChassisNetwork(caseB()).removal('Rx', 'a', 'g');
    expect(q.relation).toBe('rank-one');
    expect(q.r0Ohms).toBeCloseTo((11e3 * 100e3) / 111e3, 8);
    expect(q.rcdOhms).toBeCloseTo((10e3 * 101e3) / 111e3, 8);
    expect(q.transferOhms).toBeCloseTo((100 / 111) * 10e3, 8);
    const range = explainableReadings(q)!;
    expect(range.lowOhms).toBeCloseTo((1e3 * 100e3) / 101e3, 8);
    expect(range.highOhms!).toBeCloseTo((11e3 * 100e3) / 111e3, 8);
  });

  it('gives the implied value R_x = t²/(R0 − R_m) − R_cd, and every candidate its nominal at the nominal reading', () => {
    const res = analyseInCircuit({ edges: caseB(), from: 'a', to: 'g', partId: 'Rx', readingOhms: (6e3 * 100e3) / 106e3, uncertaintyOhms: 0 });
    expect(res.impliedOhms).toBeCloseTo(10e3, 5);
    expect(res.explanation.componentCheck).toBeFalse();
    const byId = new Map(res.explanation.candidates.map((c) => [c.edgeId, c]));
    expect([...byId.keys()].sort()).toEqual(['R1', 'R2', 'R3', 'Rx']);
    expect(byId.get('R1')!.impliedOhms).toBeCloseTo(1e3, 5);
    expect(byId.get('R2')!.impliedOhms).toBeCloseTo(10e3, 5);
    expect(byId.get('R3')!.impliedOhms).toBeCloseTo(100e3, 3);
    for (const c of byId.values()) expect(c.explainable).toBeTrue();
    expect(res.explanation.parallelPaths.ohms).toBeCloseTo((11e3 * 100e3) / 111e3, 6);
    // Without Rx: R1 and R2 carry 100/111 of the current, R3 11/111 [CALC].
    const shares = new Map(res.explanation.parallelPaths.edges.map((e) => [e.edgeId, Math.abs(e.share)]));
    expect(shares.get('R1')).toBeCloseTo(100 / 111, 12);
    expect(shares.get('R2')).toBeCloseTo(100 / 111, 12);
    expect(shares.get('R3')).toBeCloseTo(11 / 111, 12);
    expect(shares.has('Rx')).toBeFalse();
  });

  it('calls a reading below the network with the part shorted "not explained by this part" (something else low or shorted)', () => {
    const res = analyseInCircuit({ edges: caseB(), from: 'a', to: 'g', partId: 'Rx', readingOhms: 700, uncertaintyOhms: 10 });
    expect(res.explainable).toBeFalse();
    expect(res.verdict).toBe('inconclusive');
    expect(notesOf(res)).toContain('not-explained-low');
    expect(notesOf(res)).toContain('reading-below-healthy-range');
    // Twin: 1.2 k is explained by Rx (low).
    const twin = analyseInCircuit({ edges: caseB(), from: 'a', to: 'g', partId: 'Rx', readingOhms: 1200, uncertaintyOhms: 10 });
    expect(twin.explainable).toBeTrue();
    expect(twin.verdict).toBe('low');
  });
});

// Case C — a cut edge: a —(100 ∥ 1000)— c —Rx 470 ±10 %— d —220— b, others ±10 %.
// S = R_ac + R_db = 90.909 + 220 = 310.909 Ω; others high: 100 + 242 = 342; low: 81.818 + 198 = 279.818 [CALC].
const caseC = (): NetworkEdge[] => [r('R1', 'a', 'c', 100, 10), r('R2', 'a', 'c', 1000, 10), r('Rx', 'c', 'd', 470, 10), r('R3', 'd', 'b', 220, 10)];

describe('in-circuit reasoning, cut edge (linear relation, hand-worked case C)', () => {
  it('uses R_ab = R_ac + R_x + R_db and says so', () => {
    const res = analyseInCircuit({ edges: caseC(), from: 'a', to: 'b', partId: 'Rx', readingOhms: 800, uncertaintyOhms: 5 });
    expect(res.explanation.relation).toBe('linear');
    expect(notesOf(res)).toContain('linear-series-path');
    expect(res.impliedOhms).toBeCloseTo(800 - (1e5 / 1100 + 220), 9);
    expect(res.impliedInterval!.lowOhms).toBeCloseTo(795 - 342, 9);
    expect(res.impliedInterval!.highOhms!).toBeCloseTo(805 - (81e3 / 990 + 198), 9);
    expect(res.verdict).toBe('inconclusive'); // 453 … 525.2 straddles 517
    expect(res.explanation.parallelPaths.ohms).toBeNull(); // nothing else joins the probes
  });

  it('clamps at 0 Ω and judges low where the series path alone nearly explains the reading', () => {
    const res = analyseInCircuit({ edges: caseC(), from: 'a', to: 'b', partId: 'Rx', readingOhms: 300, uncertaintyOhms: 5 });
    expect(res.impliedOhms).toBe(0);
    expect(notesOf(res)).toContain('implied-at-zero');
    expect(res.impliedInterval!.lowOhms).toBe(0);
    expect(res.impliedInterval!.highOhms!).toBeCloseTo(305 - (81e3 / 990 + 198), 9);
    expect(res.verdict).toBe('low');
  });

  it('is not explained below the series path at its lower limits', () => {
    const res = analyseInCircuit({ edges: caseC(), from: 'a', to: 'b', partId: 'Rx', readingOhms: 200, uncertaintyOhms: 5 });
    expect(res.explainable).toBeFalse();
    expect(notesOf(res)).toContain('not-explained-low');
  });
});

describe('in-circuit reasoning, a reading that does not depend on the part', () => {
  const bridge = (): NetworkEdge[] => [r('R1', 'A', 'C', 100, 5), r('R2', 'C', 'B', 200, 5), r('R3', 'A', 'D', 300, 5), r('R4', 'D', 'B', 600, 5), r('R5', 'C', 'D', 1000, 5)];

  it('says so for the arm of a balanced bridge: no implied value, no verdict', () => {
    const res = analyseInCircuit({ edges: bridge(), from: 'A', to: 'B', partId: 'R5', readingOhms: 225, uncertaintyOhms: 1 });
    expect(res.explanation.relation).toBe('independent');
    expect(res.explanation.cause).toBe('no-current');
    expect(notesOf(res)).toContain('no-current');
    expect(res.impliedOhms).toBeNull();
    expect(res.explainable).toBeNull();
    expect(res.verdict).toBeNull();
    expect(res.explanation.candidates.map((c) => c.edgeId)).not.toContain('R5');
    // Its twin, R1 of the same bridge, is a candidate.
    expect(res.explanation.candidates.map((c) => c.edgeId)).toContain('R1');
  });

  it('bounds nothing from a tolerance corner where the bridge happens to balance (low end 0)', () => {
    // Nominal 100/200 vs 300/500: unbalanced. All at upper limits: 110/220 = 300/600: balanced [CALC].
    const edges = [r('R1', 'A', 'C', 100, 10), r('R2', 'C', 'B', 200, 10), r('R3', 'A', 'D', 300, 0), r('R4', 'D', 'B', 500, 20), r('R5', 'C', 'D', 1000, 10)];
    const nets = toleranceNetworks(edges);
    expect(nets.high.removal('R5', 'A', 'B').cause).toBe('no-current');
    expect(nets.nominal.removal('R5', 'A', 'B').relation).toBe('rank-one');
    const reading = nets.nominal.resistance('A', 'B')!;
    const a = analysePart(nets, 'R5', 'A', 'B', reading, 0, { lowOhms: 900, highOhms: 1100 });
    expect(a.impliedOhms).toBeCloseTo(1000, 4);
    expect(a.impliedInterval!.lowOhms).toBe(0);
    expect(a.verdict).toBe('inconclusive');
  });

  it('says so for a dead end: a part hanging off one probe', () => {
    const edges = [r('R1', 'a', 'b', 1000, 10), r('Rx', 'b', 'z', 470, 10)];
    const res = analyseInCircuit({ edges, from: 'a', to: 'b', partId: 'Rx', readingOhms: 1000, uncertaintyOhms: 5 });
    expect(res.explanation.cause).toBe('dead-end');
    expect(res.verdict).toBeNull();
    expect(analyseInCircuit({ edges, from: 'a', to: 'z', partId: 'Rx', readingOhms: 1470, uncertaintyOhms: 5 }).explanation.relation).toBe('linear');
  });
});

describe('analyseInCircuit, open circuits and left-out parts', () => {
  it('reports open between probes with no DC path, and a finite reading there as unknown to the network', () => {
    const edges: NetworkEdge[] = [r('R1', 'a', 'b', 1000, 10), { id: 'C1', a: 'b', b: 'c', ohms: 0, kind: 'capacitor' }];
    const res = analyseInCircuit({ edges, from: 'a', to: 'c', readingOhms: 5e5 });
    expect(res.open).toBeTrue();
    expect(res.effectiveOhms).toBeNull();
    expect(res.healthyRange).toBeNull();
    expect(notesOf(res)).toEqual(jasmine.arrayContaining(['open-between-probes', 'finite-reading-across-open']));
    expect(res.explanation.leftOutEdgeIds).toEqual(['C1']);
    const twin = analyseInCircuit({ edges, from: 'a', to: 'b', readingOhms: 1000 });
    expect(twin.open).toBeFalse();
    expect(twin.effectiveOhms).toBeCloseTo(1000, 9);
  });

  it('leaves a capacitor under test out of the reasoning', () => {
    const edges: NetworkEdge[] = [r('R1', 'a', 'b', 1000, 10), { id: 'C1', a: 'a', b: 'b', ohms: 0, kind: 'capacitor' }];
    const res = analyseInCircuit({ edges, from: 'a', to: 'b', partId: 'C1', readingOhms: 1000, uncertaintyOhms: 5 });
    expect(notesOf(res)).toContain('part-left-out');
    expect(res.explanation.relation).toBeNull();
    expect(res.verdict).toBeNull();
    expect(res.effectiveOhms).toBeCloseTo(1000, 9);
  });

  it('flags a reading above the healthy range of a plain series path', () => {
    // 1 k ±10 % + 2 k ±5 %: healthy 2.8 k … 3.2 k [CALC].
    const edges = [r('R1', 'a', 'm', 1000, 10), r('R2', 'm', 'b', 2000, 5)];
    const res = analyseInCircuit({ edges, from: 'a', to: 'b', readingOhms: 3500, uncertaintyOhms: 50 });
    expect(res.healthyRange!.lowOhms).toBeCloseTo(2800, 9);
    expect(res.healthyRange!.highOhms).toBeCloseTo(3200, 9);
    expect(notesOf(res)).toContain('reading-above-healthy-range');
    expect(notesOf(analyseInCircuit({ edges, from: 'a', to: 'b', readingOhms: 3100, uncertaintyOhms: 50 }))).not.toContain('reading-above-healthy-range');
  });

  it('gives every note and caveat a text from the tables', () => {
    const res = analyseInCircuit(inputA(45e3, 100));
    for (const n of res.explanation.notes) expect(n.text).toBe(IN_CIRCUIT_NOTE_TEXTS[n.code]);
  });
});

describe('analyseInCircuit validation (NetworkError names the field)', () => {
  const fieldOf = (input: unknown): string | null => {
    try {
      analyseInCircuit(input as InCircuitInput);
      return null;
    } catch (e) {
      return e instanceof NetworkError ? e.field : `not a NetworkError: ${String(e)}`;
    }
  };
  const good = (): InCircuitInput => inputA(8000, 10);

  it('accepts a well-formed request', () => expect(fieldOf(good())).toBeNull());
  it('refuses an unknown node as from or to', () => {
    expect(fieldOf({ ...good(), from: 'x' })).toBe('from');
    expect(fieldOf({ ...good(), to: 'x' })).toBe('to');
  });
  it('refuses a part not in the network', () => expect(fieldOf({ ...good(), partId: 'R99' })).toBe('partId'));
  it('refuses a duplicate edge id and negative ohms with the edge named', () => {
    expect(fieldOf({ ...good(), edges: [...caseA(), r('Rx', 'd', 'e', 1)] })).toBe('edges[2].id');
    expect(fieldOf({ ...good(), edges: [r('Rx', 'c', 'd', 10e3), r('Rp', 'c', 'd', -4)] })).toBe('edges[1].ohms');
  });
  it('refuses a negative reading or uncertainty', () => {
    expect(fieldOf({ ...good(), readingOhms: -1 })).toBe('readingOhms');
    expect(fieldOf({ ...good(), uncertaintyOhms: Number.NaN })).toBe('uncertaintyOhms');
    expect(fieldOf({ ...good(), readingOhms: 0 })).toBeNull();
  });
  it('refuses a band side given as a signed number', () => {
    expect(fieldOf({ ...good(), band: { lowPct: 10, highPct: 10 } })).toBe('band.lowPct');
    expect(fieldOf({ ...good(), band: { lowPct: -10, highPct: -10 } })).toBe('band.highPct');
    expect(fieldOf({ ...good(), band: { lowPct: -10, highPct: 10 } })).toBeNull();
  });
  it('refuses a request that is not an object', () => expect(fieldOf(null)).toBe('body'));
});

describe('judgeImplied', () => {
  const band = { lowOhms: 90, highOhms: 110 };
  it('is in-band inside, high above, low below, inconclusive across a limit', () => {
    expect(judgeImplied({ lowOhms: 95, highOhms: 105 }, band)).toBe('in-band');
    expect(judgeImplied({ lowOhms: 90, highOhms: 110 }, band)).toBe('in-band');
    expect(judgeImplied({ lowOhms: 111, highOhms: 130 }, band)).toBe('high');
    expect(judgeImplied({ lowOhms: 50, highOhms: 89 }, band)).toBe('low');
    expect(judgeImplied({ lowOhms: 100, highOhms: 120 }, band)).toBe('inconclusive');
    expect(judgeImplied({ lowOhms: 80, highOhms: 100 }, band)).toBe('inconclusive');
  });
  it('judges an unbounded interval high only when its low end is above the band', () => {
    expect(judgeImplied({ lowOhms: 120, highOhms: null }, band)).toBe('high');
    expect(judgeImplied({ lowOhms: 100, highOhms: null }, band)).toBe('inconclusive');
  });
});

describe('implied value, cross-checked by a bracketed search on seeded random networks', () => {
  /** Bisection (in log ohms) on the part's value until the network reads `reading`. */
  function bisectImplied(edges: NetworkEdge[], partId: string, a: string, b: string, reading: number): number {
    const readWith = (x: number): number => new ChassisNetwork(edges.map((e) => (e.id === partId ? { ...e, ohms: x } : e))).resistance(a, b)!;
    let lo = Math.log(1e-3);
    let hi = Math.log(1e12);
    for (let k = 0; k < 200; k++) {
      const mid = (lo + hi) / 2;
      if (readWith(Math.exp(mid)) < reading) lo = mid;
      else hi = mid;
    }
    return Math.exp((lo + hi) / 2);
  }

  for (const seed of [4, 9, 16, 25, 36]) {
    it(`agrees with bisection for the rank-one closed form (seed ${seed})`, () => {
      const rand = prng(seed);
      const n = 8 + Math.floor(rand() * 10);
      const edges = randomNetwork(rand, n, n);
      const nets = toleranceNetworks(edges);
      let checked = 0;
      for (let k = 0; k < 40 && checked < 4; k++) {
        const part = edges[Math.floor(rand() * edges.length)];
        const a = `n${Math.floor(rand() * n)}`;
        const b = `n${Math.floor(rand() * n)}`;
        const q = nets.nominal.removal(part.id, a, b);
        if (q.relation !== 'rank-one') continue;
        const range = explainableReadings(q)!;
        const reading = range.lowOhms + (0.1 + 0.8 * rand()) * (range.highOhms! - range.lowOhms);
        const closed = impliedOhms(q, reading);
        const searched = bisectImplied(edges, part.id, a, b, reading);
        expect(Math.abs(closed - searched) / searched).toBeLessThan(1e-8);
        checked++;
      }
      expect(checked).toBeGreaterThan(0);
    });

    it(`keeps the true value inside its interval with every other part anywhere in tolerance (seed ${seed}; Rayleigh monotonicity)`, () => {
      const rand = prng(seed + 1000);
      const n = 8 + Math.floor(rand() * 10);
      const edges = randomNetwork(rand, n, n);
      const nets = toleranceNetworks(edges);
      let checked = 0;
      for (let k = 0; k < 40 && checked < 4; k++) {
        const part = edges[Math.floor(rand() * edges.length)];
        const a = `n${Math.floor(rand() * n)}`;
        const b = `n${Math.floor(rand() * n)}`;
        if (nets.nominal.removal(part.id, a, b).relation === 'independent') continue;
        // The real set: others drawn inside their tolerance, the part drifted anywhere 0.3×…3×.
        const trueValue = part.ohms * Math.pow(10, rand() - 0.5);
        const real = edges.map((e) => (e.id === part.id ? { ...e, ohms: trueValue } : { ...e, ohms: e.ohms * (1 + ((2 * rand() - 1) * e.tolerancePct!) / 100) }));
        const reading = new ChassisNetwork(real).resistance(a, b)!;
        const analysis = analysePart(nets, part.id, a, b, reading, 0, null);
        expect(analysis.explainable).toBeTrue();
        const iv = analysis.impliedInterval!;
        expect(trueValue).toBeGreaterThanOrEqual(iv.lowOhms * (1 - 1e-9));
        if (iv.highOhms !== null) expect(trueValue).toBeLessThanOrEqual(iv.highOhms * (1 + 1e-9));
        checked++;
      }
      expect(checked).toBeGreaterThan(0);
    });
  }
});

describe('noNetworkAdvice (DESIGN.md §3.5, without a network)', () => {
  it('turns a low in-circuit reading into inconclusive, unexplained-in-circuit: lift a lead', () => {
    const a = noNetworkAdvice('low', { method: 'in-circuit', kind: 'carbon-composition' });
    expect(a).toEqual({ verdict: 'inconclusive', reason: 'unexplained-in-circuit', conclusive: false, caveats: [{ code: 'lift-a-lead', text: IN_CIRCUIT_CAVEATS['lift-a-lead'] }] });
    // Twin: measured with a lead lifted, low stands and is conclusive.
    expect(noNetworkAdvice('low', { method: 'lead-lifted' })).toEqual({ verdict: 'low', reason: null, conclusive: true, caveats: [] });
  });

  it('says "not low; high not ruled out" of an in-band in-circuit reading', () => {
    const a = noNetworkAdvice('in-band', { method: 'in-circuit' });
    expect(a.verdict).toBe('in-band');
    expect(a.conclusive).toBeFalse();
    expect(a.caveats.map((c) => c.code)).toEqual(['not-low-high-not-ruled-out']);
    expect(noNetworkAdvice('near-limit', { method: 'in-circuit' }).caveats.map((c) => c.code)).toEqual(['not-low-high-not-ruled-out']);
    expect(noNetworkAdvice('in-band', { method: 'out-of-circuit' }).conclusive).toBeTrue();
  });

  it('sends a high or open path to the joints and contacts first; conclusive once they are checked', () => {
    const high = noNetworkAdvice('high', { method: 'in-circuit' });
    expect(high.verdict).toBe('high');
    expect(high.conclusive).toBeFalse();
    expect(high.caveats[0].text).toBe('The path is high: check the joints and contacts, then the part.');
    expect(noNetworkAdvice('high', { method: 'in-circuit', jointsChecked: true }).conclusive).toBeTrue();
    const open = noNetworkAdvice('open', { method: 'in-circuit' });
    expect(open.caveats.map((c) => c.code)).toEqual(['path-open-check-joints']);
    expect(noNetworkAdvice('open', { method: 'in-circuit', jointsChecked: true }).conclusive).toBeTrue();
  });

  it('points a short across a resistor first at a shorted capacitor in parallel, a short across a winding at a lifted lead', () => {
    expect(noNetworkAdvice('short', { method: 'in-circuit', kind: 'carbon-film' }).caveats.map((c) => c.code)).toEqual(['short-suspect-parallel-capacitor']);
    expect(noNetworkAdvice('short', { method: 'in-circuit', kind: 'winding' }).caveats.map((c) => c.code)).toEqual(['short-lift-a-lead']);
    expect(noNetworkAdvice('short', { method: 'in-circuit', kind: 'wirewound' }).conclusive).toBeFalse();
    expect(noNetworkAdvice('short', { method: 'lead-lifted', kind: 'wirewound' }).conclusive).toBeTrue();
  });

  it('passes inconclusive and not-read through with their reason', () => {
    expect(noNetworkAdvice('inconclusive', { method: 'in-circuit', reason: 'climbing' })).toEqual({ verdict: 'inconclusive', reason: 'climbing', conclusive: false, caveats: [] });
    expect(noNetworkAdvice('not-read', { method: 'lead-lifted', reason: 'no-access' })).toEqual({ verdict: 'not-read', reason: 'no-access', conclusive: false, caveats: [] });
  });
});
