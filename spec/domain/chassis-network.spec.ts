/**
 * The chassis network of a template document (api/domain/chassis-network.ts), on small templates
 * worked by hand (the working beside each case). Series and parallel rules: Ohm's law and
 * Kirchhoff's laws (any circuits textbook); the bridge from check-values.md §4.
 */
import {
  assembleNetwork,
  chartAgrees,
  chartDisagreements,
  expectedReading,
  networkResistance,
  potEdgeIds,
  tieEdgeId,
} from '../../api/domain/chassis-network';
import type { ChartReading, Component, TemplateDocument, TestPoint, TubeTypeRecord } from '../../api/domain/template-format';
import { DEMO_TUBE_TYPES } from '../../seeds/tube-types';
import { part } from '../support/template-parts';

const TYPES = new Map<string, TubeTypeRecord>(DEMO_TUBE_TYPES.map((t) => [t.designation, t]));

const R = (ref: string, a: string, b: string, ohms: number, extra: Partial<Component> = {}) => part(ref, 'carbon-composition', a, b, { ohms }, extra);
const wire = (ref: string, a: string, b: string) => part(ref, 'wire', a, b, { state: 'short' });

function chart(key: string, from: string, to: string, expected: ChartReading['expected'], tolerancePct = 10, tubesIn?: boolean): ChartReading {
  return { key, stageKey: 'st-1', kind: 'chart-reading', from, to, expected, tolerancePct, conditions: tubesIn === undefined ? {} : { tubesIn }, valueSource: 'service-data' };
}
const check = (key: string, componentKey: string): TestPoint => ({ key, stageKey: 'st-1', kind: 'component-check', componentKey });

function doc(sockets: [string, string][], components: Component[], testPoints: TestPoint[] = [], junctions: string[] = []): TemplateDocument {
  return {
    format: 'driftmark-template',
    formatVersion: 1,
    chassis: {
      maker: 'Testbench Works',
      model: 'Spec 1',
      chassisNumber: 'T-1',
      variants: [],
      yearFrom: 1950,
      yearTo: 1951,
      kind: 'table-radio',
      power: 'ac-dc',
      hotChassis: true,
      hazardNotes: '',
      sources: [],
    },
    conditions: { tubesIn: true, speakerConnected: true, controls: '' },
    stages: [{ key: 'st-1', name: 'Stage', sockets: sockets.map(([designator, tubeType], i) => ({ key: `so-${i}`, designator, tubeType })) }],
    junctions: junctions.map((name) => ({ name, note: '' })),
    components,
    testPoints,
  };
}

const between = (d: TemplateDocument, a: string, b: string, tubesIn?: boolean): number | null =>
  networkResistance(assembleNetwork(d, TYPES, { tubesIn }).edges, a, b);

describe('assembleNetwork', () => {
  it('takes each component with its two nodes; a grid leak reads its own value to chassis', () => {
    // V1 6AV6: grid leak 10 MΩ pin 1 → chassis; plate load 220 kΩ B+ → pin 7; cathode to chassis by a wire.
    const d = doc([['V1', '6AV6']], [R('R1', 'V1.1', 'chassis', 10e6), R('R2', 'B+', 'V1.7', 220e3), wire('W1', 'V1.2', 'chassis')]);
    const { edges, problems } = assembleNetwork(d, TYPES);
    expect(problems).toEqual([]);
    expect(edges.map((e) => e.id)).toEqual(['c-r1', 'c-r2', 'c-w1']);
    expect(edges[2].ohms).toBe(0);
    expect(edges[2].kind).toBeUndefined(); // a wire is a plain 0-Ω link
    expect(between(d, 'V1.1', 'chassis')).toBeCloseTo(10e6, 3);
    expect(between(d, 'V1.2', 'chassis')).toBe(0);
    // B+ reaches the plate only: no DC path to chassis (the tube does not conduct cold)
    expect(between(d, 'B+', 'chassis')).toBeNull();
  });

  it('splits a pot into two edges at its wiper fraction', () => {
    // Volume pot 500 kΩ DET → chassis, wiper on V1.1 at 0.3 from DET: DET–wiper 150 kΩ, wiper–chassis 350 kΩ.
    // Diode load 47 kΩ DET → chassis. V1.1 to chassis = 350k ∥ (150k + 47k) = 350·197/547 k = 126.051 kΩ.
    const pot = part('R5', 'pot', 'DET', 'chassis', { ohms: 500e3 }, { wiper: { node: 'V1.1', fraction: 0.3 } });
    const d = doc([['V1', '6AV6']], [pot, R('R6', 'DET', 'chassis', 47e3)], [], ['DET']);
    const { edges, problems } = assembleNetwork(d, TYPES);
    expect(problems).toEqual([]);
    const [ida, idb] = potEdgeIds('c-r5');
    expect(edges.find((e) => e.id === ida)?.ohms).toBeCloseTo(150e3, 6);
    expect(edges.find((e) => e.id === idb)?.ohms).toBeCloseTo(350e3, 6);
    expect(between(d, 'V1.1', 'chassis')).toBeCloseTo((350e3 * 197e3) / 547e3, 3);
    // the whole track: 500k ∥ 47k from DET, 500·47/547 k = 42.961 kΩ
    expect(between(d, 'DET', 'chassis')).toBeCloseTo((500e3 * 47e3) / 547e3, 3);
  });

  it('joins the internally tied pins of a tube type with tubes in, and not with tubes out', () => {
    // 50C5: grid 1 on pins 1 and 7, tied inside (seed record). Grid leak 470 kΩ from pin 1 to B−.
    const d = doc([['V4', '50C5']], [R('R9', 'V4.1', 'B-', 470e3)]);
    const inEdges = assembleNetwork(d, TYPES, { tubesIn: true }).edges;
    expect(inEdges.some((e) => e.id === tieEdgeId('V4', 1, 7) && e.ohms === 0)).toBeTrue();
    expect(between(d, 'V4.7', 'B-', true)).toBeCloseTo(470e3, 3);
    const outEdges = assembleNetwork(d, TYPES, { tubesIn: false }).edges;
    expect(outEdges.some((e) => e.id.startsWith('tie:'))).toBeFalse();
    expect(between(d, 'V4.7', 'B-', false)).toBeNull();
    // and pin 1 still reads the grid leak with the tube out
    expect(between(d, 'V4.1', 'B-', false)).toBeCloseTo(470e3, 3);
  });

  it('adds the series heater string with tubes in and leaves the heaters inside the tubes out with tubes out', () => {
    // 12AV6 heater 3–4 measured cold 11 Ω; wire 4 → 50C5 pin 3; 50C5 heater 3–4 cold 45 Ω.
    // V1.3 to V4.4 = 11 + 0 + 45 = 56 Ω (series); tubes out: open.
    const d = doc(
      [['V1', '12AV6'], ['V4', '50C5']],
      [part('H1', 'heater', 'V1.3', 'V1.4', { ohms: 11 }), wire('W1', 'V1.4', 'V4.3'), part('H4', 'heater', 'V4.3', 'V4.4', { ohms: 45 })],
    );
    expect(assembleNetwork(d, TYPES).problems).toEqual([]);
    expect(between(d, 'V1.3', 'V4.4')).toBeCloseTo(56, 9);
    expect(between(d, 'V1.4', 'V4.3')).toBe(0);
    expect(assembleNetwork(d, TYPES, { tubesIn: false }).edges.map((e) => e.id)).toEqual(['c-w1']);
    // the template's own condition is the default
    expect(assembleNetwork({ ...d, conditions: { ...d.conditions, tubesIn: false } }, TYPES).edges.length).toBe(1);
  });

  it('warns when a heater is entered at its hot V/I instead of a measured cold value', () => {
    // 12AV6: 12.6 V / 0.15 A = 84 Ω hot (= V²/P); cold reads roughly 1/5–1/10 of it [MEM], check-values.md §5
    const hot = doc([['V1', '12AV6']], [part('H1', 'heater', 'V1.3', 'V1.4', { ohms: 84 })]);
    const warnings = assembleNetwork(hot, TYPES).problems;
    expect(warnings.length).toBe(1);
    expect(warnings[0].severity).toBe('warning');
    expect(warnings[0].path).toBe('components[0].nominal');
    expect(warnings[0].message).toContain('V/I');
    // 12AX7 half heater across 4–9: (12.6 V / 2) / 0.15 A = 42 Ω hot
    const half = doc([['V1', '12AX7']], [part('H1', 'heater', 'V1.4', 'V1.9', { ohms: 42 })]);
    expect(assembleNetwork(half, TYPES).problems.map((p) => p.severity)).toEqual(['warning']);
    // positive twin: a measured cold value is accepted silently
    const cold = doc([['V1', '12AV6']], [part('H1', 'heater', 'V1.3', 'V1.4', { ohms: 11 })]);
    expect(assembleNetwork(cold, TYPES).problems).toEqual([]);
  });

  it('refuses nodes that are neither a known pin, chassis, B−, B+ nor a declared junction', () => {
    const d = doc(
      [['V1', '12AV6']],
      [
        R('R1', 'V1.9', 'chassis', 1e3), // a 7-pin tube has no pin 9
        R('R2', 'V7.1', 'chassis', 1e3), // no socket V7
        R('R3', 'AVC', 'chassis', 1e3), // junction not declared
        R('R4', 'DET', 'B-', 1e3), // declared: fine
      ],
      [],
      ['DET'],
    );
    const problems = assembleNetwork(d, TYPES).problems;
    expect(problems.map((p) => p.path)).toEqual(['components[0].nodes[0]', 'components[1].nodes[0]', 'components[2].nodes[0]']);
    expect(problems[0].message).toContain('pin 9 is not a pin of the 12AV6');
    expect(problems[1].message).toContain('no socket V7');
    expect(problems.every((p) => p.severity === 'error')).toBeTrue();
    // the refused components stay out of the network; the good one is in
    expect(assembleNetwork(d, TYPES).edges.map((e) => e.id)).toEqual(['c-r4']);
  });

  it('refuses an IC pin as a node and accepts an NC pin', () => {
    // EL84 pin 1 entered IC (seed record); 35W4 pin 1 NC: usable as a tie point (DESIGN.md §2)
    const d = doc([['V3', 'EL84'], ['V5', '35W4']], [R('R1', 'V3.1', 'chassis', 1e3), R('R2', 'V5.1', 'chassis', 1e3)]);
    const problems = assembleNetwork(d, TYPES).problems;
    expect(problems.length).toBe(1);
    expect(problems[0].path).toBe('components[0].nodes[0]');
    expect(problems[0].message).toContain('IC');
  });

  it('reports an unknown tube type on the socket and a doubled designator', () => {
    const d = doc([['V1', '6XX9'], ['V1', '6AV6']], []);
    const problems = assembleNetwork(d, TYPES).problems;
    expect(problems.map((p) => p.path)).toEqual(['stages[0].sockets[0].tubeType', 'stages[0].sockets[1].designator']);
  });

  it('leaves capacitors and rectifiers out, and an open nominal out', () => {
    // C1 across R1 changes nothing at DC: 100 kΩ either way
    const cap = part('C1', 'capacitor', 'A', 'chassis', { state: 'open' });
    const rect = part('SR1', 'rectifier', 'A', 'B+', { state: 'open' });
    const d = doc([], [R('R1', 'A', 'chassis', 100e3), cap, rect, part('F1', 'fuse', 'A', 'B+', { state: 'open' })], [], ['A']);
    const { edges } = assembleNetwork(d, TYPES);
    expect(edges.map((e) => e.id)).toEqual(['c-r1']);
    expect(between(d, 'A', 'chassis')).toBeCloseTo(100e3, 6);
  });

  it('checks the test points: chart-reading nodes, component keys, pair-relation targets', () => {
    const d = doc(
      [],
      [R('R1', 'A', 'chassis', 100e3)],
      [chart('tp-1', 'A', 'NOWHERE', { ohms: 1 }), check('tp-2', 'c-missing'), { key: 'tp-3', stageKey: 'st-1', kind: 'pair-relation', a: 'tp-2', b: 'tp-9', ratioTolerancePct: 5 }, check('tp-4', 'c-r1')],
      ['A'],
    );
    expect(assembleNetwork(d, TYPES).problems.map((p) => p.path)).toEqual(['testPoints[0].to', 'testPoints[1].componentKey', 'testPoints[2].b']);
  });

  it('reads the balanced bridge of check-values.md §4 as 225 Ω, whatever the bridge arm', () => {
    // 100 (A–C), 200 (C–B), 300 (A–D), 600 (D–B), bridge C–D: (100+200)∥(300+600) = 300·900/1200 = 225 Ω
    for (const arm of [1, 1e3, 1e6]) {
      const d = doc([], [R('R1', 'A', 'C', 100), R('R2', 'C', 'B', 200), R('R3', 'A', 'D', 300), R('R4', 'D', 'B', 600), R('R5', 'C', 'D', arm)], [], ['A', 'B', 'C', 'D']);
      expect(between(d, 'A', 'B')).toBeCloseTo(225, 9);
    }
  });
});

describe('expectedReading', () => {
  it('gives a component check its in-circuit value and the parallel paths that lower it', () => {
    // R1 100 kΩ and R2 150 kΩ both A → chassis: in circuit R1 reads 100·150/250 = 60 kΩ, lowered by 40 %;
    // the parallel path is R2 (150 kΩ) and carries all of the meter's current without R1.
    const d = doc([], [R('R1', 'A', 'chassis', 100e3), R('R2', 'A', 'chassis', 150e3)], [check('tp-1', 'c-r1')], ['A']);
    const x = expectedReading(d, TYPES, d.testPoints[0]);
    expect(x.inCircuitOhms).toBeCloseTo(60e3, 6);
    expect(x.loweredByPct).toBeCloseTo(40, 9);
    expect(x.printed).toEqual({ ohms: 100e3 });
    expect(x.parallelPaths?.ohms).toBeCloseTo(150e3, 6);
    expect(x.parallelPaths?.edges.map((e) => e.edgeId)).toEqual(['c-r2']);
    expect(Math.abs(x.parallelPaths!.edges[0].share)).toBeCloseTo(1, 9);
  });

  it('gives a part with no parallel path its own nominal, nothing lowering it', () => {
    const d = doc([], [R('R1', 'A', 'chassis', 100e3), R('R2', 'A', 'B', 150e3)], [check('tp-1', 'c-r1')], ['A', 'B']);
    const x = expectedReading(d, TYPES, d.testPoints[0]);
    expect(x.inCircuitOhms).toBeCloseTo(100e3, 6); // R2 is a dead end from A
    expect(x.loweredByPct).toBeCloseTo(0, 9);
    expect(x.parallelPaths).toEqual({ ohms: null, edges: [] });
  });

  it('leaves a capacitor check and a pair relation without an expectation', () => {
    const d = doc(
      [],
      [R('R1', 'A', 'chassis', 100e3), part('C1', 'capacitor', 'A', 'chassis', { state: 'open' })],
      [check('tp-1', 'c-c1'), check('tp-2', 'c-r1'), { key: 'tp-3', stageKey: 'st-1', kind: 'pair-relation', a: 'tp-1', b: 'tp-2', ratioTolerancePct: 5 }],
      ['A'],
    );
    expect(expectedReading(d, TYPES, d.testPoints[0]).leftOut).toBe('non-network-kind');
    expect(expectedReading(d, TYPES, d.testPoints[2]).leftOut).toBe('pair-relation');
    expect(expectedReading(d, TYPES, d.testPoints[1]).leftOut).toBeNull();
  });

  it('follows a chart reading’s own tubes-in condition', () => {
    // 12AV6 heater 11 Ω between pins 3 and 4: tubes in 11 Ω, tubes out open
    const d = doc([['V1', '12AV6']], [part('H1', 'heater', 'V1.3', 'V1.4', { ohms: 11 }), wire('W1', 'V1.4', 'B-'), R('R1', 'V1.3', 'LINE', 1)], [chart('tp-1', 'V1.3', 'B-', { ohms: 11 }), chart('tp-2', 'V1.3', 'B-', { state: 'open' }, 10, false)], ['LINE']);
    expect(expectedReading(d, TYPES, d.testPoints[0]).inCircuitOhms).toBeCloseTo(11, 9);
    const out = expectedReading(d, TYPES, d.testPoints[1]);
    expect(out.tubesIn).toBeFalse();
    expect(out.inCircuitOhms).toBeNull();
  });
});

describe('chartDisagreements', () => {
  // Network: 350k ∥ (150k + 47k) = 126.05 kΩ from V1.1 to chassis (worked above).
  function potDoc(printed: ChartReading['expected'], tol: number): TemplateDocument {
    const pot = part('R5', 'pot', 'DET', 'chassis', { ohms: 500e3 }, { wiper: { node: 'V1.1', fraction: 0.3 } });
    return doc([['V1', '6AV6']], [pot, R('R6', 'DET', 'chassis', 47e3), R('R2', 'B+', 'V1.7', 220e3)], [chart('tp-1', 'V1.1', 'chassis', printed, tol)], ['DET']);
  }

  it('lists a chart reading that disagrees with the network beyond its tolerance', () => {
    const found = chartDisagreements(potDoc({ ohms: 470e3 }, 20), TYPES);
    expect(found.length).toBe(1);
    expect(found[0].testPointKey).toBe('tp-1');
    expect(found[0].path).toBe('testPoints[0]');
    expect(found[0].networkOhms).toBeCloseTo(126051.19, 1);
    expect(found[0].deviationPct).toBeCloseTo((126051.19 / 470e3 - 1) * 100, 3);
    expect(found[0].message).toContain('470000');
  });

  it('passes a chart reading within its tolerance (positive twin)', () => {
    expect(chartDisagreements(potDoc({ ohms: 120e3 }, 10), TYPES)).toEqual([]); // +5.04 %
    expect(chartDisagreements(potDoc({ ohms: 120e3 }, 5), TYPES).length).toBe(1); // beyond ±5 %
  });

  it('judges printed states: open against no path or ≥ 20 MΩ, short against ≤ 1 Ω', () => {
    expect(chartDisagreements(potDoc({ state: 'open' }, 10), TYPES).length).toBe(1); // network 126 kΩ
    expect(chartAgrees({ state: 'open' }, null, 10)).toBeTrue();
    expect(chartAgrees({ state: 'open' }, 22e6, 10)).toBeTrue(); // verdict default open threshold 20 MΩ
    expect(chartAgrees({ state: 'open' }, 2e6, 10)).toBeFalse();
    expect(chartAgrees({ state: 'short' }, 0.4, 10)).toBeTrue(); // default short threshold 1 Ω
    expect(chartAgrees({ state: 'short' }, 4, 10)).toBeFalse();
    expect(chartAgrees({ ohms: 100 }, null, 10)).toBeFalse();
  });
});
