/**
 * The chassis network solver (api/domain/network.ts) against published and exact values.
 * Sources: /work/shared/check-values.md §4, each named beside its case.
 */
import { ChassisNetwork, NetworkError, effectiveResistance, validateEdges, type NetworkEdge } from '../../api/domain/network';

const unit = (id: string, a: string, b: string, ohms = 1): NetworkEdge => ({ id, a, b, ohms });

/** The 12 edges of a cube, corners named by their coordinates (`000` … `111`). */
function cube(): NetworkEdge[] {
  const edges: NetworkEdge[] = [];
  for (let v = 0; v < 8; v++) {
    for (const bit of [1, 2, 4]) {
      if ((v & bit) === 0) edges.push(unit(`e${v}-${v | bit}`, corner(v), corner(v | bit)));
    }
  }
  return edges;
}
function corner(v: number): string {
  return `${v & 1}${(v >> 1) & 1}${(v >> 2) & 1}`;
}

/** n sections of series R then shunt R to the return, far end open. */
function ladder(n: number, ohms = 1): NetworkEdge[] {
  const edges: NetworkEdge[] = [];
  for (let k = 0; k < n; k++) {
    edges.push(unit(`s${k}`, `n${k}`, `n${k + 1}`, ohms));
    edges.push(unit(`p${k}`, `n${k + 1}`, 'ret', ohms));
  }
  return edges;
}

/** Bridge: 100 Ω A–C, 200 Ω C–B, 300 Ω A–D, 600 Ω D–B, and an arm C–D. */
function bridge(armOhms: number | null): NetworkEdge[] {
  const edges = [unit('R1', 'A', 'C', 100), unit('R2', 'C', 'B', 200), unit('R3', 'A', 'D', 300), unit('R4', 'D', 'B', 600)];
  if (armOhms !== null) edges.push(unit('R5', 'C', 'D', armOhms));
  return edges;
}

describe('effectiveResistance, against exact values', () => {
  // check-values.md §4 table: cube of 12 unit resistors, exact fractions [CALC, recomputed
  // from the definition R_ij = (e_i − e_j)ᵀ L⁺ (e_i − e_j), Klein & Randić 1993].
  it('gives 7/12 across an edge of a cube of unit resistors', () => {
    expect(effectiveResistance(cube(), '000', '100')).toBeCloseTo(7 / 12, 14);
  });
  it('gives 3/4 across a face diagonal of the cube', () => {
    expect(effectiveResistance(cube(), '000', '110')).toBeCloseTo(3 / 4, 14);
  });
  it('gives 5/6 across the body diagonal of the cube', () => {
    expect(effectiveResistance(cube(), '000', '111')).toBeCloseTo(5 / 6, 14);
  });

  // check-values.md §4: balanced bridge 100/200/300/600 Ω reads 225 Ω whatever the arm C–D.
  for (const arm of [null, 0, 1, 47, 1e3, 1e7]) {
    it(`gives 225 Ω for the balanced bridge with arm C–D ${arm === null ? 'absent' : `${arm} Ω`}`, () => {
      expect(effectiveResistance(bridge(arm), 'A', 'B')).toBeCloseTo(225, 10);
    });
  }
  it('reads other than 225 Ω once the bridge is unbalanced (the twin of the balanced case)', () => {
    const edges = bridge(50).map((e) => (e.id === 'R4' ? { ...e, ohms: 300 } : e));
    // 100+200 ∥ 300+300 without the arm would be 200 Ω; with the 50 Ω arm it is below 225 Ω and not 200 Ω.
    const r = effectiveResistance(edges, 'A', 'B')!;
    expect(Math.abs(r - 225)).toBeGreaterThan(1);
  });

  // check-values.md §4: ladder of n sections (series R, shunt R, far end open): 2, 5/3, 13/8.
  const ladderValues: [number, number][] = [
    [1, 2],
    [2, 5 / 3],
    [3, 13 / 8],
  ];
  for (const [n, exact] of ladderValues) {
    it(`gives ${exact} at the input of a ladder of ${n} unit section(s), to the return`, () => {
      expect(effectiveResistance(ladder(n), 'n0', 'ret')).toBeCloseTo(exact, 14);
    });
  }
  it('tends to (1+√5)/2 for a long ladder (Feynman Lectures on Physics Vol. II ch. 22, infinite ladder; limit check)', () => {
    const golden = (1 + Math.sqrt(5)) / 2;
    expect(effectiveResistance(ladder(40), 'n0', 'ret')).toBeCloseTo(golden, 12);
    // The ladder scales with R: 4.7 kΩ sections.
    expect(effectiveResistance(ladder(40, 4700), 'n0', 'ret')! / 4700).toBeCloseTo(golden, 12);
    // Short ladders are not yet at the limit (a check that could fail): n = 3 is 13/8 = 1.625.
    expect(Math.abs(effectiveResistance(ladder(3), 'n0', 'ret')! - golden)).toBeGreaterThan(1e-3);
  });

  // check-values.md §4: complete graph K4 of unit resistors, any pair 1/2.
  it('gives 1/2 between any pair of K4', () => {
    const names = ['p', 'q', 'r', 's'];
    const edges: NetworkEdge[] = [];
    for (let i = 0; i < 4; i++) for (let j = i + 1; j < 4; j++) edges.push(unit(`k${i}${j}`, names[i], names[j]));
    const net = new ChassisNetwork(edges);
    for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) {
      expect(net.resistance(names[i], names[j])).toBeCloseTo(i === j ? 0 : 0.5, 14);
    }
  });

  // Klein & Randić, J. Math. Chem. 12 (1993) 81–95: on a tree the resistance distance is the
  // sum of the resistances along the unique path.
  it('gives the path sum on a tree', () => {
    const edges = [unit('a', 'r', 'x', 470), unit('b', 'x', 'y', 2200), unit('c', 'x', 'z', 1e5), unit('d', 'z', 'w', 33), unit('e', 'r', 'v', 1e6)];
    const net = new ChassisNetwork(edges);
    expect(net.resistance('y', 'w')).toBeCloseTo(2200 + 1e5 + 33, 6);
    expect(net.resistance('v', 'w')).toBeCloseTo(1e6 + 470 + 1e5 + 33, 5);
    expect(net.resistance('r', 'y')).toBeCloseTo(2670, 8);
  });

  it('keeps its digits across a wide spread of values (1 Ω winding beside a 10 MΩ leak)', () => {
    // Exact: 1 ∥ 1e7 = 1e7 / (1e7 + 1); a series chain 1 + 1e7.
    const net = new ChassisNetwork([unit('W', 'p', 'q', 1), unit('L', 'p', 'q', 1e7), unit('S', 'q', 'r', 1e7)]);
    expect(net.resistance('p', 'q')! / (1e7 / (1e7 + 1))).toBeCloseTo(1, 14);
    expect(net.resistance('p', 'r')! / (1e7 + 1e7 / (1e7 + 1))).toBeCloseTo(1, 14);
  });
});

describe('effectiveResistance, open circuits, shorts and left-out kinds', () => {
  it('is open (null) between nodes with no DC path, and finite once a path exists', () => {
    const open = [unit('R1', 'a', 'b', 100), unit('R2', 'c', 'd', 100)];
    expect(effectiveResistance(open, 'a', 'd')).toBeNull();
    expect(effectiveResistance([...open, unit('R3', 'b', 'c', 100)], 'a', 'd')).toBeCloseTo(300, 10);
  });

  it('leaves capacitors and rectifiers out (open at DC) but keeps resistive kinds', () => {
    const withCap: NetworkEdge[] = [
      { id: 'C1', a: 'a', b: 'b', ohms: 0, kind: 'capacitor' },
      { id: 'D1', a: 'b', b: 'c', ohms: 5, kind: 'rectifier' },
    ];
    expect(effectiveResistance(withCap, 'a', 'b')).toBeNull();
    expect(effectiveResistance(withCap, 'b', 'c')).toBeNull();
    const withHeater: NetworkEdge[] = [...withCap, { id: 'H1', a: 'a', b: 'b', ohms: 30, kind: 'heater' }];
    expect(effectiveResistance(withHeater, 'a', 'b')).toBeCloseTo(30, 12);
    const net = new ChassisNetwork(withHeater);
    expect(net.leftOutEdgeIds).toEqual(['C1', 'D1']);
    expect(net.includedEdgeIds).toEqual(['H1']);
  });

  it('merges nodes joined by a zero-ohm tie instead of an infinite conductance', () => {
    // Two 100 Ω in series, their middle tied to the far end: 100 Ω, and 0 across the tie.
    const edges = [unit('R1', 'a', 'm', 100), unit('R2', 'm', 'b', 100), unit('T', 'm', 'b', 0)];
    const net = new ChassisNetwork(edges);
    expect(net.resistance('a', 'b')).toBeCloseTo(100, 12);
    expect(net.resistance('m', 'b')).toBe(0);
    // Without the tie (the twin): 200 Ω.
    expect(net.without('T').resistance('a', 'b')).toBeCloseTo(200, 12);
  });

  it('copes with a loop of ties and a tie shorting a part out', () => {
    const edges = [unit('T1', 'x', 'y', 0), unit('T2', 'y', 'z', 0), unit('T3', 'z', 'x', 0), unit('R', 'x', 'z', 470), unit('S', 'z', 'w', 1000)];
    const net = new ChassisNetwork(edges);
    expect(net.resistance('x', 'w')).toBeCloseTo(1000, 12);
    expect(net.resistance('y', 'z')).toBe(0);
  });

  it('reads 0 from a node to itself', () => {
    expect(effectiveResistance(cube(), '011', '011')).toBe(0);
  });
});

describe('ChassisNetwork conditions', () => {
  it('answers with a set of edges excluded (a tube out) and keeps the full network apart', () => {
    const edges = [unit('R1', 'a', 'b', 100), unit('Vtube', 'a', 'b', 100)];
    const tubesIn = new ChassisNetwork(edges);
    const tubesOut = new ChassisNetwork(edges, { excludeEdgeIds: ['Vtube'] });
    expect(tubesIn.resistance('a', 'b')).toBeCloseTo(50, 12);
    expect(tubesOut.resistance('a', 'b')).toBeCloseTo(100, 12);
    expect(tubesOut.excludedEdgeIds).toEqual(['Vtube']);
    expect(tubesOut.ohmsOf('Vtube')).toBeNull();
    expect(tubesIn.ohmsOf('Vtube')).toBe(100);
  });

  it('uses ohmsOf for values at a tolerance limit', () => {
    const edges: NetworkEdge[] = [{ id: 'R1', a: 'a', b: 'b', ohms: 1000, tolerancePct: 10 }];
    const high = new ChassisNetwork(edges, { ohmsOf: (e) => e.ohms * (1 + (e.tolerancePct ?? 0) / 100) });
    expect(high.resistance('a', 'b')).toBeCloseTo(1100, 10);
  });

  it('refuses to exclude an edge it does not have, and accepts one it has', () => {
    const edges = [unit('R1', 'a', 'b', 100)];
    expect(() => new ChassisNetwork(edges, { excludeEdgeIds: ['R9'] })).toThrowMatching((e) => e instanceof NetworkError && e.field === 'excludeEdgeIds');
    expect(new ChassisNetwork(edges, { excludeEdgeIds: ['R1'] }).resistance('a', 'b')).toBeNull();
  });
});

describe('ChassisNetwork transfer, potentials and currents', () => {
  it('has the reciprocity of the transfer term and gives the bridge its balance', () => {
    const net = new ChassisNetwork(bridge(1000));
    // Balanced: no voltage across C–D for a current A→B.
    expect(Math.abs(net.transfer('A', 'B', 'C', 'D')!)).toBeLessThan(1e-12);
    const unbalanced = new ChassisNetwork(bridge(1000).map((e) => (e.id === 'R4' ? { ...e, ohms: 300 } : e)));
    const t1 = unbalanced.transfer('A', 'B', 'C', 'D')!;
    const t2 = unbalanced.transfer('C', 'D', 'A', 'B')!;
    expect(Math.abs(t1)).toBeGreaterThan(1);
    expect(t1).toBeCloseTo(t2, 10);
    // (e_a − e_b) with itself is the effective resistance.
    expect(unbalanced.transfer('A', 'B', 'A', 'B')).toBeCloseTo(unbalanced.resistance('A', 'B')!, 10);
  });

  it('gives node voltages whose edge currents obey Kirchhoff at every node', () => {
    const edges = cube().map((e, i) => ({ ...e, ohms: 100 * (i + 1) }));
    const net = new ChassisNetwork(edges);
    const v = net.potentials('000', '111')!;
    expect(v.get('111')).toBe(0);
    expect(v.get('000')).toBeCloseTo(net.resistance('000', '111')!, 9);
    const currents = net.edgeCurrents('000', '111', 0);
    const byId = new Map(currents.map((c) => [c.edgeId, c.share]));
    for (const node of net.nodeIds) {
      let net_out = 0;
      for (const e of edges) {
        const i = byId.get(e.id) ?? 0;
        if (e.a === node) net_out += i;
        if (e.b === node) net_out -= i;
      }
      const expected = node === '000' ? 1 : node === '111' ? -1 : 0;
      expect(net_out).toBeCloseTo(expected, 12);
    }
    // Largest current first.
    for (let k = 1; k < currents.length; k++) expect(Math.abs(currents[k - 1].share)).toBeGreaterThanOrEqual(Math.abs(currents[k].share));
  });

  it('lists no currents between probes that are not joined, and some where they are', () => {
    const net = new ChassisNetwork([unit('R1', 'a', 'b', 100), unit('R2', 'c', 'd', 100)]);
    expect(net.edgeCurrents('a', 'c')).toEqual([]);
    expect(net.potentials('a', 'c')).toBeNull();
    const through = net.edgeCurrents('a', 'b');
    expect(through.map((c) => c.edgeId)).toEqual(['R1']);
    expect(through[0].share).toBeCloseTo(1, 12); // all of it, from a to b
  });
});

describe('ChassisNetwork.removal (one part out, DESIGN.md §3.5)', () => {
  it('gives the rank-one quantities of a cube edge, agreeing with a new factorization', () => {
    const net = new ChassisNetwork(cube());
    // The rest of the cube across one of its edges: 1/(12/7 − 1) = 7/5 [CALC].
    const q = net.removal('e0-1', '000', '100');
    expect(q.relation).toBe('rank-one');
    expect(q.computedBy).toBe('sherman-morrison');
    expect(q.r0Ohms).toBeCloseTo(7 / 5, 13);
    expect(q.rcdOhms).toBeCloseTo(7 / 5, 13);
    const r = net.removalByRefactoring('e0-1', '000', '111');
    const s = net.removal('e0-1', '000', '111');
    expect(r.computedBy).toBe('refactorization');
    expect(s.r0Ohms).toBeCloseTo(r.r0Ohms!, 13);
    expect(s.rcdOhms).toBeCloseTo(r.rcdOhms!, 13);
    expect(s.transferOhms).toBeCloseTo(r.transferOhms!, 13);
  });

  it('puts the part back: r0 − t²/(R + r_cd) is the reading with the part', () => {
    const edges = cube().map((e, i) => ({ ...e, ohms: 1000 + 137 * i }));
    const net = new ChassisNetwork(edges);
    const q = net.removal('e2-3', '000', '011');
    const back = q.r0Ohms! - q.transferOhms! ** 2 / (net.ohmsOf('e2-3')! + q.rcdOhms!);
    expect(back).toBeCloseTo(net.resistance('000', '011')!, 9);
  });

  it('is linear for a cut edge between the probes: R_ab = R_ac + R_x + R_db (hand-worked)', () => {
    // a —100— c —R—470— d —220— b, with a 1 k shunt a–c side: a–c is 100 ∥ 1000 = 90.909… Ω.
    const edges = [unit('R1', 'a', 'c', 100), unit('R2', 'a', 'c', 1000), unit('Rx', 'c', 'd', 470), unit('R3', 'd', 'b', 220)];
    const net = new ChassisNetwork(edges);
    for (const [a, b] of [
      ['a', 'b'],
      ['b', 'a'],
    ]) {
      const q = net.removal('Rx', a, b);
      expect(q.relation).toBe('linear');
      expect(q.r0Ohms).toBeNull();
      expect(q.seriesOhms).toBeCloseTo(100000 / 1100 + 220, 10);
    }
    expect(net.removalByRefactoring('Rx', 'a', 'b').seriesOhms).toBeCloseTo(100000 / 1100 + 220, 10);
  });

  it('is independent of a cut edge with both probes on one side (a dead end), linear across it', () => {
    const edges = [unit('R1', 'a', 'b', 100), unit('R2', 'b', 'c', 100), unit('R3', 'a', 'c', 100), unit('Rx', 'c', 'd', 470)];
    const net = new ChassisNetwork(edges);
    const dead = net.removal('Rx', 'a', 'b');
    expect(dead.relation).toBe('independent');
    expect(dead.cause).toBe('dead-end');
    expect(dead.r0Ohms).toBeCloseTo(200 / 3, 10);
    expect(net.removal('Rx', 'a', 'd').relation).toBe('linear');
  });

  it('is independent of the arm of a balanced bridge (no current), rank-one when unbalanced', () => {
    const q = new ChassisNetwork(bridge(1000)).removal('R5', 'A', 'B');
    expect(q.relation).toBe('independent');
    expect(q.cause).toBe('no-current');
    expect(q.r0Ohms).toBeCloseTo(225, 9);
    const u = new ChassisNetwork(bridge(1000).map((e) => (e.id === 'R4' ? { ...e, ohms: 300 } : e))).removal('R5', 'A', 'B');
    expect(u.relation).toBe('rank-one');
  });

  it('is independent of a part shorted by a tie, of a part elsewhere, of a left-out part, and when the probes are open', () => {
    const edges: NetworkEdge[] = [
      unit('R1', 'a', 'b', 100),
      unit('Rs', 'a', 'b', 470),
      unit('T', 'a', 'b', 0),
      unit('R2', 'p', 'q', 100),
      unit('R3', 'b', 'z', 100),
      { id: 'C1', a: 'b', b: 'z', ohms: 0, kind: 'capacitor' },
    ];
    const net = new ChassisNetwork(edges);
    expect(net.removal('Rs', 'a', 'z').cause).toBe('shorted-by-tie');
    expect(net.removal('R2', 'a', 'z').cause).toBe('elsewhere');
    expect(net.removal('C1', 'a', 'z').cause).toBe('not-in-network');
    expect(net.removal('R1', 'a', 'p').cause).toBe('open-between-probes');
    // The twin: R3 does matter between a and z (linear, a cut edge).
    expect(net.removal('R3', 'a', 'z').relation).toBe('linear');
  });

  it('refactors for a zero-ohm part and agrees with the hand value', () => {
    // A tie across 1 k in series with 2 k: without the tie a–c reads 3 k, the part's own nodes 1 k.
    const edges = [unit('T', 'a', 'b', 0), unit('R1', 'a', 'b', 1000), unit('R2', 'b', 'c', 2000)];
    const q = new ChassisNetwork(edges).removal('T', 'a', 'c');
    expect(q.computedBy).toBe('refactorization');
    expect(q.relation).toBe('rank-one');
    expect(q.r0Ohms).toBeCloseTo(3000, 9);
    expect(q.rcdOhms).toBeCloseTo(1000, 9);
    expect(q.transferOhms).toBeCloseTo(1000, 9);
  });

  it('refactors when the part is nearly a cut edge (1 Ω across 100 MΩ), with the right values', () => {
    const edges = [unit('Rx', 'a', 'b', 1), unit('Leak', 'a', 'b', 1e8), unit('R2', 'b', 'c', 10)];
    const q = new ChassisNetwork(edges).removal('Rx', 'a', 'c');
    expect(q.computedBy).toBe('refactorization');
    expect(q.r0Ohms! / (1e8 + 10)).toBeCloseTo(1, 12);
    // The twin: a part well inside a loop is downdated in place.
    const p = new ChassisNetwork([unit('Rx', 'a', 'b', 1), unit('Leak', 'a', 'b', 10), unit('R2', 'b', 'c', 10)]).removal('Rx', 'a', 'c');
    expect(p.computedBy).toBe('sherman-morrison');
    expect(p.r0Ohms).toBeCloseTo(20, 12);
  });
});

describe('validation (NetworkError names the field)', () => {
  const good = (): NetworkEdge[] => [unit('R1', 'a', 'b', 100), unit('R2', 'b', 'c', 220)];
  const fieldOf = (f: () => unknown): string | null => {
    try {
      f();
      return null;
    } catch (e) {
      return e instanceof NetworkError ? e.field : `not a NetworkError: ${String(e)}`;
    }
  };

  it('accepts a well-formed list', () => {
    expect(fieldOf(() => validateEdges(good()))).toBeNull();
    expect(fieldOf(() => new ChassisNetwork(good()).resistance('a', 'c'))).toBeNull();
  });
  it('refuses a duplicate edge id', () => {
    expect(fieldOf(() => validateEdges([...good(), unit('R1', 'c', 'd', 1)]))).toBe('edges[2].id');
  });
  it('refuses negative ohms and non-finite ohms', () => {
    expect(fieldOf(() => validateEdges([unit('R1', 'a', 'b', -5)]))).toBe('edges[0].ohms');
    expect(fieldOf(() => validateEdges([unit('R1', 'a', 'b', 1), unit('R2', 'a', 'b', Number.NaN)]))).toBe('edges[1].ohms');
    expect(fieldOf(() => validateEdges([unit('R1', 'a', 'b', Number.POSITIVE_INFINITY)]))).toBe('edges[0].ohms');
  });
  it('ignores the ohms of a capacitor (open at DC)', () => {
    expect(fieldOf(() => validateEdges([{ id: 'C1', a: 'a', b: 'b', ohms: Number.NaN, kind: 'capacitor' }]))).toBeNull();
  });
  it('refuses an edge that joins a node to itself, or names no node', () => {
    expect(fieldOf(() => validateEdges([unit('R1', 'a', 'a', 1)]))).toBe('edges[0].b');
    expect(fieldOf(() => validateEdges([unit('R1', '', 'a', 1)]))).toBe('edges[0].a');
  });
  it('refuses an unknown kind and a tolerance out of range', () => {
    expect(fieldOf(() => validateEdges([{ ...unit('R1', 'a', 'b', 1), kind: 'flux-capacitor' as never }]))).toBe('edges[0].kind');
    expect(fieldOf(() => validateEdges([{ ...unit('R1', 'a', 'b', 1), tolerancePct: 100 }]))).toBe('edges[0].tolerancePct');
    expect(fieldOf(() => validateEdges([{ ...unit('R1', 'a', 'b', 1), tolerancePct: -1 }]))).toBe('edges[0].tolerancePct');
    expect(fieldOf(() => validateEdges([{ ...unit('R1', 'a', 'b', 1), kind: 'carbon-composition', tolerancePct: 20 }]))).toBeNull();
  });
  it('refuses a list that is not a list', () => {
    expect(fieldOf(() => validateEdges({}))).toBe('edges');
    expect(fieldOf(() => validateEdges([]))).toBeNull();
  });
  it('refuses an unknown node as a probe', () => {
    const net = new ChassisNetwork(good());
    expect(fieldOf(() => net.resistance('zz', 'a'))).toBe('from');
    expect(fieldOf(() => net.resistance('a', 'zz'))).toBe('to');
  });
  it('refuses an unknown part', () => {
    const net = new ChassisNetwork(good());
    expect(fieldOf(() => net.removal('R9', 'a', 'c'))).toBe('partId');
    expect(fieldOf(() => net.removal('R1', 'a', 'c'))).toBeNull();
  });
});
