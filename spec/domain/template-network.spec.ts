/**
 * Every test point's in-circuit expectation at once (api/domain/template-network.ts), checked
 * against the one-point-at-a-time functions of api/domain/chassis-network.ts (expectedReading,
 * chartDisagreements — independent factorizations per point) on the three demo chassis, and on a
 * small network worked by hand (series and parallel rules: Ohm's and Kirchhoff's laws, any
 * circuits textbook).
 */
import { chartDisagreements, expectedReading } from '../../api/domain/chassis-network';
import type { Component, TemplateDocument, TestPoint, TubeTypeRecord } from '../../api/domain/template-format';
import { disagreementsOf, templateNetwork } from '../../api/domain/template-network';
import { demoChassis, kestrel5 } from '../../seeds/chassis';
import { DEMO_TUBE_TYPES } from '../../seeds/tube-types';

const TYPES = new Map<string, TubeTypeRecord>(DEMO_TUBE_TYPES.map((t) => [t.designation, t]));

function part(ref: string, kind: Component['kind'], a: string, b: string, ohms: number | 'open', extra: Partial<Component> = {}): Component {
  return {
    key: `c-${ref.toLowerCase()}`,
    ref,
    kind,
    stageKey: 'st-1',
    nodes: [a, b],
    wiper: null,
    nominal: ohms === 'open' ? { state: 'open' } : { ohms },
    tolerancePct: 10,
    ratedWatts: null,
    ratedVolts: null,
    voltsAcross: null,
    critical: null,
    fuseRole: false,
    mainsSide: false,
    nonLinear: false,
    valueSource: 'schematic',
    capacitor: null,
    note: '',
    ...extra,
  };
}

/** R1 1 k (A–B) in parallel with R2 2 k + R3 1 k (A–M–B); R4 3 k (B–chassis); pot P1 10 k from A to chassis, wiper W at 0.25 (tied to nothing else); C1 from A to N. */
function small(chartOhms: number): TemplateDocument {
  const tp = (key: string, componentKey: string): TestPoint => ({ key, stageKey: 'st-1', kind: 'component-check', componentKey });
  return {
    format: 'driftmark-template',
    formatVersion: 1,
    chassis: { maker: 'Testbench Works', model: 'Net 1', chassisNumber: '', variants: [], yearFrom: null, yearTo: null, kind: 'other', power: 'battery', hotChassis: false, hazardNotes: '', sources: [] },
    conditions: { tubesIn: true, speakerConnected: true, controls: '' },
    stages: [{ key: 'st-1', name: 'All', sockets: [] }],
    junctions: ['A', 'B', 'M', 'W', 'N'].map((name) => ({ name, note: '' })),
    components: [
      part('R1', 'carbon-composition', 'A', 'B', 1000),
      part('R2', 'carbon-composition', 'A', 'M', 2000),
      part('R3', 'carbon-composition', 'M', 'B', 1000),
      part('R4', 'carbon-composition', 'B', 'chassis', 3000),
      part('P1', 'pot', 'A', 'chassis', 10000, { wiper: { node: 'W', fraction: 0.25 } }),
      part('C1', 'capacitor', 'A', 'N', 'open', { capacitor: { uF: 0.1, workingVolts: 400, dielectric: 'film', polarised: false, can: null, safetyClass: null, lineConnected: false } }),
    ],
    testPoints: [
      tp('tp-r1', 'c-r1'),
      tp('tp-r4', 'c-r4'),
      tp('tp-p1', 'c-p1'),
      tp('tp-c1', 'c-c1'),
      { key: 'tp-ab', stageKey: 'st-1', kind: 'chart-reading', from: 'A', to: 'B', expected: { ohms: chartOhms }, tolerancePct: 20, conditions: {}, valueSource: 'service-data' },
      { key: 'tp-n', stageKey: 'st-1', kind: 'chart-reading', from: 'N', to: 'chassis', expected: { state: 'open' }, tolerancePct: 20, conditions: {}, valueSource: 'service-data' },
      { key: 'tp-pair', stageKey: 'st-1', kind: 'pair-relation', a: 'tp-r1', b: 'tp-r4', ratioTolerancePct: 5 },
    ],
  };
}

describe('template network (every test point, one factorization per condition set)', () => {
  it('agrees with expectedReading point by point on the three demo chassis', () => {
    for (const d of demoChassis()) {
      const answer = templateNetwork(d, TYPES);
      expect(Object.keys(answer.testPoints)).withContext(d.chassis.model).toEqual(d.testPoints.map((t) => t.key));
      expect(answer.problems).withContext(d.chassis.model).toEqual([]);
      for (const tp of d.testPoints) {
        const one = expectedReading(d, TYPES, tp);
        const all = answer.testPoints[tp.key];
        const ctx = `${d.chassis.model} ${tp.key}`;
        if (one.inCircuitOhms === null) expect(all.expectedOhms).withContext(ctx).toBeNull();
        else expect(all.expectedOhms!).withContext(ctx).toBeCloseTo(one.inCircuitOhms, 6);
        expect(all.leftOut ?? null).withContext(ctx).toEqual(one.leftOut);
        if (tp.kind === 'component-check' && one.parallelPaths !== null && one.parallelPaths.ohms !== null && Number.isFinite(one.parallelPaths.ohms)) {
          // R0 = R_in·R_p/(R_p − R_in) against a factorization without the part
          expect(all.parallelPaths!.ohms!).withContext(ctx).toBeCloseTo(one.parallelPaths.ohms, Math.max(0, 6 - Math.ceil(Math.log10(one.parallelPaths.ohms + 1))));
        }
      }
    }
  });

  it('finds the same chart disagreements as chartDisagreements, and none on the demo chassis', () => {
    for (const d of demoChassis()) expect(disagreementsOf(templateNetwork(d, TYPES))).withContext(d.chassis.model).toEqual(chartDisagreements(d, TYPES));
    const k = kestrel5();
    const i = k.testPoints.findIndex((t) => t.kind === 'chart-reading' && 'ohms' in t.expected && t.expected.ohms === 470e3);
    const bad = k.testPoints[i] as Extract<TestPoint, { kind: 'chart-reading' }>;
    bad.expected = { ohms: 940e3 }; // off by a factor of two
    const found = disagreementsOf(templateNetwork(k, TYPES));
    expect(found).toEqual(chartDisagreements(k, TYPES));
    expect(found.map((x) => x.path)).toEqual([`testPoints[${i}]`]);
    expect(found[0].deviationPct!).toBeCloseTo(-50, 0);
  });

  it('answers a small network worked by hand', () => {
    const a = templateNetwork(small(750), TYPES);
    // A–B: R1 ∥ (R2 + R3) = 1000 ∥ 3000 = 750 Ω; R4 and the pot hang off to chassis, no second path A→B
    // except A–P1–chassis–R4–B: 10 k + 3 k = 13 k in parallel: 1/(1/750 + 1/13000) = 709.1 Ω
    const rAB = 1 / (1 / 750 + 1 / 13000);
    expect(a.testPoints['tp-ab'].expectedOhms!).toBeCloseTo(rAB, 9);
    expect(a.testPoints['tp-ab'].disagreement).toBeUndefined(); // 709 vs 750 ±20 %
    // R1 check: in circuit = rAB; the rest across A–B = 3000 ∥ 13000 = 2437.5 Ω
    expect(a.testPoints['tp-r1'].expectedOhms!).toBeCloseTo(rAB, 9);
    expect(a.testPoints['tp-r1'].parallelPaths!.ohms!).toBeCloseTo(1 / (1 / 3000 + 1 / 13000), 6);
    const shares = new Map(a.testPoints['tp-r1'].parallelPaths!.edges.map((e) => [e.edgeId, e.share]));
    expect(shares.has('c-r1')).toBeFalse();
    // a unit current through the rest splits 13/16 via R2+R3 (3 k) and 3/16 via P1, R4 (13 k)
    expect(Math.abs(shares.get('c-r2')!)).toBeCloseTo(13000 / 16000, 9);
    expect(Math.abs(shares.get('c-r4')!)).toBeCloseTo(3000 / 16000, 9);
    // the pot across its ends: 10 k ∥ (R1∥(R2+R3) + R4) = 10000 ∥ 3750 = 2727.27 Ω; the rest is 3750 Ω
    expect(a.testPoints['tp-p1'].expectedOhms!).toBeCloseTo(1 / (1 / 10000 + 1 / 3750), 6);
    expect(a.testPoints['tp-p1'].parallelPaths!.ohms!).toBeCloseTo(3750, 6);
    // the capacitor and the pair have no in-circuit expectation; N touches only the capacitor: open
    expect(a.testPoints['tp-c1'].leftOut).toBe('non-network-kind');
    expect(a.testPoints['tp-pair'].leftOut).toBe('pair-relation');
    expect(a.testPoints['tp-n'].expectedOhms).toBeNull();
    expect(a.testPoints['tp-n'].disagreement).toBeUndefined();
    expect(a.conditionSets).toEqual([{ tubesIn: true, nodes: 5, edges: 6 }]); // A, B, M, W, chassis (N only on the capacitor); R1–R4 and the pot's two halves
    // the refused twin: a chart printing twice the value disagrees
    const off = templateNetwork(small(1500), TYPES).testPoints['tp-ab'].disagreement!;
    expect(off.path).toBe('testPoints[4]');
    expect(off.deviationPct!).toBeCloseTo((rAB / 1500 - 1) * 100, 6);
  });
});
