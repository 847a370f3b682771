import { csvField, replacementCsv, replacementList, resistorType, type OutFinding } from '../../api/domain/replacement-list';
import type { CapacitorInfo, Component, TemplateDocument } from '../../api/domain/template-format';
import { part } from '../support/template-parts';

const cap = (ref: string, a: string, b: string, info: Partial<CapacitorInfo>): Component =>
  part(ref, 'capacitor', a, b, { state: 'open' }, {
    tolerancePct: null,
    capacitor: { uF: 0.05, workingVolts: 400, dielectric: 'paper', polarised: false, can: null, safetyClass: null, lineConnected: false, ...info },
  });

/** An invented two-stage chassis: resistors of several kinds, a fuse-role resistor, a mains-side one, capacitors. */
function doc(): TemplateDocument {
  return {
    format: 'driftmark-template',
    formatVersion: 1,
    chassis: { maker: 'Tarnwick', model: 'Lark 5', chassisNumber: 'L5', variants: [], yearFrom: 1950, yearTo: 1951, kind: 'table-radio', power: 'ac-dc', hotChassis: true, hazardNotes: '', sources: [] },
    conditions: { tubesIn: true, speakerConnected: true, controls: '' },
    stages: [{ key: 'st-1', name: 'Audio', sockets: [] }],
    junctions: [],
    components: [
      // 100 kΩ with 150 V across → 0.225 W → ½ W (check-values.md §5 [CALC]); E24 has 100 k.
      part('R1', 'carbon-composition', 'A', 'B', { ohms: 100_000 }, { ratedWatts: 0.5, voltsAcross: 150 }),
      // 50 kΩ ±10 % → 51 k in E24 (check-values.md §2), no voltage recorded: the ½ W original kept.
      part('R2', 'carbon-composition', 'B', 'C', { ohms: 50_000 }, { ratedWatts: 0.5 }),
      part('R3', 'carbon-composition', 'C', 'D', { ohms: 50_000 }, { ratedWatts: 0.5 }),
      part('R4', 'wirewound', 'D', 'E', { ohms: 33 }, { ratedWatts: 1, voltsAcross: 3, fuseRole: true }),
      part('R5', 'carbon-composition', 'E', 'F', { ohms: 150 }, { ratedWatts: 1, voltsAcross: 6, mainsSide: true }),
      part('P1', 'pot', 'F', 'G', { ohms: 500_000 }, { wiper: { node: 'H', fraction: 0.5 } }),
      part('R6', 'metal-film', 'G', 'H', { ohms: 4750 }, { critical: { lowPct: -1, highPct: 1 }, ratedWatts: 0.25 }),
      cap('C1', 'B+', 'chassis', { uF: 40, workingVolts: 150, dielectric: 'electrolytic', polarised: true, can: { id: 'CAN1', section: 'A', commonReturn: 'B-' } }),
      cap('C2', 'A', 'B', { uF: 0.05, workingVolts: 400, dielectric: 'wax-paper' }),
      cap('C3', 'C', 'D', { uF: 0.05, workingVolts: 400, dielectric: 'paper' }),
      cap('C4', 'E', 'F', { uF: 0.0001, workingVolts: 500, dielectric: 'mica' }),
      cap('C5', 'line', 'chassis', { uF: 0.05, workingVolts: 400, dielectric: 'paper', lineConnected: true, safetyClass: 'Y' }),
    ],
    testPoints: [],
  };
}

let seq = 0;
const finding = (componentKey: string | null, list: 'order' | 'confirm', extra: Partial<OutFinding> = {}): OutFinding => ({
  testPointKey: componentKey ? `tp-${componentKey.slice(2)}` : 'tp-chart',
  componentKey,
  from: null,
  to: null,
  readingId: ++seq,
  verdict: 'high',
  method: list === 'order' ? 'lead-lifted' : 'in-circuit',
  decision: { list, nextStep: list === 'order' ? null : 'lift-a-lead' },
  ...extra,
});

describe('replacement list: order and to-confirm (DESIGN.md §2 "replacement list")', () => {
  it('orders only conclusive findings; everything else out goes to confirm, never to the order', () => {
    const l = replacementList({ document: doc(), findings: [finding('c-r1', 'order'), finding('c-r2', 'confirm', { verdict: 'low' })] });
    expect(l.order.map((o) => o.ref)).toEqual(['R1']);
    expect(l.confirm.map((c) => c.ref)).toEqual(['R2']);
    expect(l.confirm[0].nominalText).toBe('50 kΩ');
    expect(l.confirm[0].nextStep).toBe('lift-a-lead');
    expect(l.confirm[0].advice).toMatch(/lift a lead/i);
  });

  it('lists a part once: an order wins over a suspicion of the same part from another test point', () => {
    const l = replacementList({ document: doc(), findings: [finding('c-r1', 'confirm'), finding('c-r1', 'order')] });
    expect(l.order.length).toBe(1);
    expect(l.confirm.length).toBe(0);
  });

  it('sends a chart reading (a path, not a part) to confirm with a next step even when the grid says order', () => {
    const l = replacementList({ document: doc(), findings: [finding(null, 'order', { from: 'V1.7', to: 'B+', verdict: 'open' })] });
    expect(l.order).toEqual([]);
    expect(l.confirm[0]).toEqual(jasmine.objectContaining({ componentKey: null, ref: 'V1.7 to B+', nominalText: null, from: 'V1.7', to: 'B+', nextStep: 'lift-a-lead' }));
  });

  it('keeps a check-joint step from the grid for a high in-circuit reading', () => {
    const l = replacementList({ document: doc(), findings: [finding('c-r1', 'confirm', { decision: { list: 'confirm', nextStep: 'check-joint' } })] });
    expect(l.confirm[0].nextStep).toBe('check-joint');
    expect(l.confirm[0].advice).toMatch(/joints and contacts/);
  });
});

describe('order lines: value, wattage, type, warnings', () => {
  const lineOf = (key: string, extra: Parameters<typeof replacementList>[0] extends infer I ? Partial<I> : never = {}) =>
    replacementList({ document: doc(), findings: [finding(key, 'order')], ...extra }).order[0];

  it('suggests the E24 value and the rating from the dissipation: 100 kΩ at 150 V → 0.225 W → ½ W (check-values.md §5 [CALC])', () => {
    const r1 = lineOf('c-r1');
    expect(r1.suggested!.ohms).toBe(100_000);
    expect(r1.suggested!.text).toBe('100 kΩ');
    expect(r1.suggested!.code).toBe('100K'); // IEC 60062 clause 4 letter code
    expect(r1.dissipationWatts!).toBeCloseTo(0.225, 12);
    expect(r1.watts).toBe(0.5);
    expect(r1.type).toBe('carbon-film'); // carbon composition replaced by carbon film: common practice
  });

  it('scales the dissipation with the mains factor squared: 125/117 lifts 0.225 W to 0.257 W: twice that is above ½ W, so 1 W (DESIGN.md §3.6 [CALC])', () => {
    const r1 = lineOf('c-r1', { mainsFactor: 125 / 117 });
    expect(r1.dissipationWatts!).toBeCloseTo(0.225 * (125 / 117) ** 2, 12);
    expect(r1.watts).toBe(1);
  });

  it('takes 51 k for a 50 kΩ part in E24 and 47 k in E12 (check-values.md §2, IEC 60063)', () => {
    expect(lineOf('c-r2').suggested!.ohms).toBe(51_000);
    expect(lineOf('c-r2', { series: 'E12' }).suggested!.ohms).toBe(47_000);
    expect(lineOf('c-r2').suggested!.deviationPct).toBeCloseTo(2, 12);
  });

  it('keeps the original rating where the template records no voltage, and says so', () => {
    const r2 = lineOf('c-r2');
    expect(r2.watts).toBe(0.5);
    expect(r2.dissipationWatts).toBeNull();
    expect(r2.warnings.join(' ')).toMatch(/original ½ W rating is kept/);
  });

  it('keeps a fuse-role part\u2019s rating and type with a warning; a mains-side part gets a flameproof type (DESIGN.md §3.6)', () => {
    const r4 = lineOf('c-r4');
    expect(r4.watts).toBe(1);
    expect(r4.type).toBe('as-original');
    expect(r4.warnings.join(' ')).toMatch(/fuse-role/);
    const r5 = lineOf('c-r5');
    expect(r5.type).toBe('flameproof');
    expect(r5.warnings.join(' ')).toMatch(/flameproof/);
    expect(resistorType({ kind: 'carbon-composition', fuseRole: false, mainsSide: false, critical: null })).toBe('carbon-film');
  });

  it('gives no series value for a pot and says why (DESIGN.md §3.7)', () => {
    const p1 = lineOf('c-p1');
    expect(p1.suggested).toBeNull();
    expect(p1.noSuggestion).toMatch(/pot/);
    expect(lineOf('c-r1').noSuggestion).toBeNull();
  });

  it('judges a critical position against its own band: no E24 value inside ±1 % of 4.75 kΩ, E96 has 4.75 k (IEC 60063)', () => {
    const r6 = lineOf('c-r6');
    expect(r6.suggested!.ohms).toBe(4700);
    expect(r6.suggested!.inBand).toBeFalse();
    expect(r6.warnings.join(' ')).toMatch(/no E24 value/);
    expect(r6.type).toBe('metal-film');
    const e96 = lineOf('c-r6', { series: 'E96' });
    expect(e96.suggested!.ohms).toBe(4750);
    expect(e96.suggested!.inBand).toBeTrue();
  });

  it('orders a factory change\u2019s value, and restores the template value over a non-original part', () => {
    const factory = lineOf('c-r2', { deviations: [{ key: 'dv-1', kind: 'factory-change', componentKey: 'c-r2', nominal: { ohms: 68_000 }, tolerancePct: null, note: 'serials from 4400' }] });
    expect(factory.valueFrom).toBe('factory-change');
    expect(factory.suggested!.ohms).toBe(68_000);
    const nonOriginal = lineOf('c-r2', { deviations: [{ key: 'dv-2', kind: 'non-original', componentKey: 'c-r2', nominal: { ohms: 68_000 }, tolerancePct: null, note: 'later repair' }] });
    expect(nonOriginal.valueFrom).toBe('template');
    expect(nonOriginal.suggested!.ohms).toBe(51_000);
    expect(nonOriginal.warnings.join(' ')).toMatch(/non-original/);
  });
});

describe('quantities aggregated across the set', () => {
  it('counts R2 and R3 (both 51 k, ½ W, carbon film) as one purchase line of two; R1 stays one', () => {
    const l = replacementList({ document: doc(), findings: [finding('c-r1', 'order'), finding('c-r2', 'order'), finding('c-r3', 'order')] });
    const r2 = l.order.find((o) => o.ref === 'R2')!;
    const r3 = l.order.find((o) => o.ref === 'R3')!;
    expect(r2.purchaseKey).toBe(r3.purchaseKey);
    expect(r2.quantity).toBe(2);
    expect(l.order.find((o) => o.ref === 'R1')!.quantity).toBe(1);
    const p = l.purchase.find((x) => x.purchaseKey === r2.purchaseKey)!;
    expect(p.refs).toEqual(['R2', 'R3']);
    expect(p.quantity).toBe(2);
    expect(p.description).toBe('51 kΩ, ½ W, carbon-film');
  });
});

describe('capacitors by policy', () => {
  // check-values.md §5: replace electrolytic and wax-paper capacitors; line-connected ones safety-rated [SEC; CP].
  it('the standard recap lists electrolytic and paper capacitors and every line-connected one, not the mica', () => {
    const l = replacementList({ document: doc(), findings: [] });
    expect(l.capacitors.map((c) => c.ref)).toEqual(['C1', 'C2', 'C3', 'C5']);
    expect(l.capacitors.find((c) => c.ref === 'C5')!.type).toBe('Y-class');
    expect(l.capacitors.find((c) => c.ref === 'C5')!.safetyClass).toBe('Y');
    expect(l.capacitors.find((c) => c.ref === 'C1')!.text).toBe('40 µF 150 V');
    expect(l.capacitors.find((c) => c.ref === 'C2')!.type).toBe('film');
    expect(l.capacitors.find((c) => c.ref === 'C1')!.type).toBe('electrolytic');
    expect(l.capacitors.find((c) => c.ref === 'C1')!.warnings.join(' ')).toMatch(/can CAN1/);
  });

  it('aggregates the two 0.05 µF 400 V paper capacitors into one line of two', () => {
    const l = replacementList({ document: doc(), findings: [] });
    const c2 = l.capacitors.find((c) => c.ref === 'C2')!;
    expect(c2.quantity).toBe(2);
    expect(l.capacitors.find((c) => c.ref === 'C5')!.quantity).toBe(1);
  });

  it('the electrolytics policy lists only C1 (and the line capacitor); none lists nothing unless a reading found one out', () => {
    expect(replacementList({ document: doc(), findings: [], recap: 'electrolytics' }).capacitors.map((c) => c.ref)).toEqual(['C1', 'C5']);
    expect(replacementList({ document: doc(), findings: [], recap: 'none' }).capacitors).toEqual([]);
    const found = replacementList({ document: doc(), findings: [finding('c-c4', 'order', { verdict: 'short' })], recap: 'none' });
    expect(found.capacitors.map((c) => [c.ref, c.reason])).toEqual([['C4', 'reading']]);
    expect(found.order).toEqual([]);
  });

  it('carries the capacitor checks\u2019 findings as warnings', () => {
    const l = replacementList({ document: doc(), findings: [], capacitorWarnings: { 'c-c1': ['working voltage below the supply peak'] } });
    expect(l.capacitors.find((c) => c.ref === 'C1')!.warnings).toContain('working voltage below the supply peak');
  });
});

describe('marks and CSV', () => {
  it('carries ordered / received marks per component', () => {
    const l = replacementList({ document: doc(), findings: [finding('c-r1', 'order')], marks: { 'c-r1': { orderedAt: '2026-03-01T10:00:00Z', receivedAt: null } } });
    expect(l.order[0]).toEqual(jasmine.objectContaining({ ordered: true, orderedAt: '2026-03-01T10:00:00Z', received: false, receivedAt: null }));
    expect(l.capacitors[0].ordered).toBeFalse();
  });

  it('writes a header row and one row per purchase line (RFC 4180: CRLF, quotes doubled)', () => {
    const l = replacementList({ document: doc(), findings: [finding('c-r2', 'order'), finding('c-r3', 'order')], recap: 'none' });
    const csv = replacementCsv(l);
    const rows = csv.split('\r\n');
    expect(rows[0]).toBe('list,refs,description,quantity,value,series deviation %,watts,type,voltage warning,ordered,received');
    expect(rows[1]).toBe('order,R2 R3,"51 kΩ, ½ W, carbon-film",2,51 kΩ,2.0,0.5,carbon-film,,no,no');
    expect(rows.length).toBe(3); // header, one line, and the empty string after the final CRLF
    expect(csvField('say "hi", then')).toBe('"say ""hi"", then"');
    expect(csvField('=SUM(A1)')).toBe("'=SUM(A1)");
    expect(csvField('-5.2')).toBe('-5.2');
  });
});
