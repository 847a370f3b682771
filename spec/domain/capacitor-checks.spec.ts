/**
 * Rule checks on the capacitor list (api/domain/capacitor-checks.ts), on small invented chassis
 * worked by hand and on the three demo chassis. Each refusal stands beside a passing twin.
 * Sources beside each value; check-values.md §5 ("Filter capacitors", "Safety before first
 * power-up") is the start.
 */
import { DEFAULT_VOLTAGE_MARGIN_PCT, RECTIFIER_MAX_FIRST_FILTER_UF, analyseCapacitors, checkCapacitors, isRectifierTube, type CapacitorFinding } from '../../api/domain/capacitor-checks';
import type { CapacitorInfo, Component, PowerArrangement, TemplateDocument, TubeTypeRecord } from '../../api/domain/template-format';
import { demoChassis } from '../../seeds/chassis';
import { DEMO_TUBE_TYPES } from '../../seeds/tube-types';
import { part } from '../support/template-parts';

// 5U4GB: octal, filament 2–8, plates 4 and 6 (from memory, check against a tube manual).
const U4GB: TubeTypeRecord = {
  designation: '5U4GB',
  base: 'octal',
  heating: 'direct',
  heaterVolts: 5,
  heaterAmps: 3,
  pins: [
    { pin: 1, electrode: 'NC', label: 'no connection' },
    { pin: 2, electrode: 'f', label: 'filament' },
    { pin: 3, electrode: 'NC', label: 'no connection' },
    { pin: 4, electrode: 'p', label: 'plate 2' },
    { pin: 5, electrode: 'NC', label: 'no connection' },
    { pin: 6, electrode: 'p', label: 'plate 1' },
    { pin: 7, electrode: 'NC', label: 'no connection' },
    { pin: 8, electrode: 'f', label: 'filament' },
  ],
  ties: [],
  notes: '',
};
// An invented rectifier type, absent from the limits table.
const RECT_X: TubeTypeRecord = { ...U4GB, designation: 'SPEC-RX1' };
const TYPES = new Map<string, TubeTypeRecord>([...DEMO_TUBE_TYPES, U4GB, RECT_X].map((t) => [t.designation, t]));

const R = (ref: string, a: string, b: string, ohms: number, extra: Partial<Component> = {}) => part(ref, 'carbon-composition', a, b, { ohms }, extra);
const L = (ref: string, a: string, b: string, ohms: number, extra: Partial<Component> = {}) => part(ref, 'winding', a, b, { ohms }, extra);
const W = (ref: string, a: string, b: string) => part(ref, 'wire', a, b, { state: 'short' });
function C(ref: string, a: string, b: string, info: Partial<CapacitorInfo> & Pick<CapacitorInfo, 'uF' | 'workingVolts'>, extra: Partial<Component> = {}): Component {
  const capacitor: CapacitorInfo = { dielectric: 'film', polarised: false, can: null, safetyClass: null, lineConnected: false, ...info };
  if (capacitor.dielectric === 'electrolytic' && info.polarised === undefined) capacitor.polarised = true;
  return part(ref, 'capacitor', a, b, { state: 'open' }, { capacitor, tolerancePct: null, ...extra });
}

function doc(power: PowerArrangement, sockets: [string, string][], components: Component[], junctions: string[] = []): TemplateDocument {
  return {
    format: 'driftmark-template',
    formatVersion: 1,
    chassis: {
      maker: 'Testbench Works',
      model: 'Cap 1',
      chassisNumber: 'T-C1',
      variants: [],
      yearFrom: 1950,
      yearTo: 1951,
      kind: 'amplifier',
      power,
      hotChassis: power === 'ac-dc' || power === 'autotransformer',
      hazardNotes: '',
      sources: [],
    },
    conditions: { tubesIn: true, speakerConnected: true, controls: '' },
    stages: [{ key: 'st-1', name: 'All', sockets: sockets.map(([designator, tubeType]) => ({ key: `so-${designator.toLowerCase()}`, designator, tubeType })) }],
    junctions: junctions.map((name) => ({ name, note: '' })),
    components,
    testPoints: [],
  };
}

/**
 * An invented transformer amplifier: 5Y3GT (V1) full-wave on a centre-tapped HV winding of `hvRms`
 * volts each side (null: not recorded), capacitor input C1, choke to B+, bleeder; a 6V6GT (V2)
 * with its plate on B+ through the output transformer, cathode resistor and bypass C3, grid leak,
 * coupling capacitor C2 from B+ side to the grid.
 */
function amp(opts: { hvRms?: number | null; c1?: Partial<CapacitorInfo>; c2?: Partial<CapacitorInfo>; c3?: Partial<CapacitorInfo>; c3Volts?: number | null; rectifier?: string; extra?: Component[] } = {}): TemplateDocument {
  const hv = opts.hvRms === undefined ? 350 : opts.hvRms;
  return doc(
    'transformer',
    [
      ['V1', opts.rectifier ?? '5Y3GT'],
      ['V2', '6V6GT'],
    ],
    [
      L('T1HA', 'V1.6', 'HVCT', 120, { voltsAcross: hv }),
      L('T1HB', 'HVCT', 'V1.4', 125, { voltsAcross: hv }),
      W('W1', 'HVCT', 'chassis'),
      L('T1F', 'V1.2', 'V1.8', 0.1),
      C('C1', 'V1.8', 'chassis', { uF: 20, workingVolts: 600, dielectric: 'electrolytic', ...opts.c1 }),
      L('L1', 'V1.8', 'B+', 300),
      R('R1', 'B+', 'chassis', 100e3, { voltsAcross: 320 }),
      L('T2P', 'B+', 'V2.3', 250),
      W('W2', 'V2.4', 'B+'),
      R('R2', 'V2.8', 'chassis', 470, { voltsAcross: 18 }),
      C('C3', 'V2.8', 'chassis', { uF: 25, workingVolts: 50, dielectric: 'electrolytic', ...opts.c3 }, { voltsAcross: opts.c3Volts ?? null }),
      R('R3', 'V2.5', 'chassis', 470e3),
      R('R4', 'B+', 'PLATE1', 100e3, { voltsAcross: 150 }),
      C('C2', 'PLATE1', 'V2.5', { uF: 0.05, workingVolts: 630, ...opts.c2 }),
      ...(opts.extra ?? []),
    ],
    ['PLATE1', 'HVCT'],
  );
}

const codes = (f: CapacitorFinding[]) => f.map((x) => `${x.severity} ${x.code} ${x.path}`);
const errors = (f: CapacitorFinding[]) => f.filter((x) => x.severity === 'error');

describe('capacitor checks', () => {
  describe('the demo chassis', () => {
    it('pass with no errors; the console’s 450 V can sits within 10 % of its winding’s warm-up peak and is warned', () => {
      const [kestrel, larkspur, quenby] = demoChassis();
      expect(checkCapacitors(kestrel, TYPES)).toEqual([]);
      expect(checkCapacitors(quenby, TYPES)).toEqual([]);
      const f = checkCapacitors(larkspur, TYPES);
      expect(errors(f)).toEqual([]);
      // 300-0-300 V RMS winding: √2 × 300 = 424.3 V at warm-up [CALC]; 450 V is only 6 % above it.
      expect(codes(f)).toEqual([
        'warning working-volts-margin components[12].capacitor.workingVolts',
        'warning working-volts-margin components[14].capacitor.workingVolts',
        'warning working-volts-margin components[16].capacitor.workingVolts',
      ]);
    });

    it('warn that the supply peak is unknown when the HV winding’s voltage is not recorded', () => {
      const [, larkspur] = demoChassis();
      const doc = structuredClone(larkspur);
      for (const c of doc.components) if (c.ref.startsWith('T1H')) c.voltsAcross = null;
      const f = checkCapacitors(doc, TYPES);
      expect(codes(f)).toEqual(['warning supply-peak-unknown chassis.power']);
      expect(f[0].values).toEqual({ basis: 'highest-b-plus', volts: 300 }); // the bleeder's 300 V of the invented service data
    });

    it('find the B+ side from the rectifier’s output, not through the return', () => {
      const [kestrel, larkspur] = demoChassis();
      const k = analyseCapacitors(kestrel, TYPES);
      expect(k.rectifiers.map((r) => [r.tubeType, r.outputNodes])).toEqual([['35W4', ['V5.7']]]); // 35W4 cathode, pin 7 (from memory, check a tube manual)
      const side = (a: typeof k, ref: string) => a.positions.find((p) => p.ref === ref)!.onBPlusSide;
      expect(side(k, 'C1A')).toBeTrue(); // first filter on the 35W4 cathode
      expect(side(k, 'C8')).toBeTrue(); // coupling from the 12AV6 plate (B+ through the plate load)
      expect(side(k, 'C6')).toBeFalse(); // AVC bypass
      const l = analyseCapacitors(larkspur, TYPES);
      expect(side(l, 'C2C')).toBeTrue();
      expect(side(l, 'C15')).toBeFalse(); // 6V6 cathode bypass: reached only through a conducting tube
      // AC/DC: √2 × 120 V = 169.7 V [CALC]
      expect(k.supplyPeak!.volts).toBeCloseTo(169.706, 3);
      expect(k.supplyPeak!.basis).toBe('line-peak');
    });
  });

  describe('working voltage', () => {
    it('covers the no-load peak of the HV winding in warm-up: 350-0-350 V peaks near 495 V', () => {
      // check-values.md §5 [CP]; 350 × √2 = 494.97 V [CALC]
      const below = checkCapacitors(amp({ c1: { workingVolts: 450 } }), TYPES);
      expect(codes(below)).toEqual(['error working-volts-below components[4].capacitor.workingVolts']);
      expect(below[0].values['volts']).toBeCloseTo(495.0, 1);
      expect(below[0].values['basis']).toBe('hv-winding-peak');
      // within the default 10 % margin (common practice): 495 × 1.1 = 544.5 V [CALC]
      expect(DEFAULT_VOLTAGE_MARGIN_PCT).toBe(10);
      expect(codes(checkCapacitors(amp({ c1: { workingVolts: 525 } }), TYPES))).toEqual(['warning working-volts-margin components[4].capacitor.workingVolts']);
      // the twin: 600 V passes
      expect(checkCapacitors(amp(), TYPES)).toEqual([]);
    });

    it('reads a winding from plate to plate as two halves', () => {
      const d = amp({ hvRms: null, c1: { workingVolts: 450 } });
      d.components.splice(0, 2, L('T1H', 'V1.6', 'V1.4', 245, { voltsAcross: 700 }));
      d.components.push(W('W9', 'HVCT', 'V1.1')); // keep the junction used (NC pin as a tie point)
      const a = analyseCapacitors(d, TYPES);
      expect(a.supplyPeak!.volts).toBeCloseTo(350 * Math.SQRT2, 9);
    });

    it('a coupling capacitor from the B+ side to a grid sees the whole peak in warm-up', () => {
      const f = checkCapacitors(amp({ c2: { workingVolts: 400 } }), TYPES);
      expect(codes(f)).toEqual(['error working-volts-below components[13].capacitor.workingVolts']);
      expect(checkCapacitors(amp({ c2: { workingVolts: 630 } }), TYPES)).toEqual([]);
    });

    it('scales with the mains factor (a set for 117 V on 125 V)', () => {
      // DESIGN.md §3.6: voltage ratio 125/117; 350 × √2 × 125/117 = 528.8 V [CALC]
      const mf = 125 / 117;
      const f = checkCapacitors(amp({ c1: { workingVolts: 525 } }), TYPES, { mainsFactor: mf });
      expect(codes(f)).toEqual(['error working-volts-below components[4].capacitor.workingVolts']);
      expect(f[0].values['volts']).toBeCloseTo(528.8, 1);
      expect(errors(checkCapacitors(amp({ c1: { workingVolts: 600 } }), TYPES, { mainsFactor: mf }))).toEqual([]);
    });

    it('AC/DC sets: √2 × the line (120 V → 169.7 V; 230 V → 325.3 V)', () => {
      // [CALC] 120 √2 = 169.71, 230 √2 = 325.27
      const acdc = (workingVolts: number) =>
        doc(
          'ac-dc',
          [['V1', '35W4']],
          [
            W('W1', 'LINE', 'V1.5'),
            C('C1', 'V1.7', 'B-', { uF: 30, workingVolts, dielectric: 'electrolytic' }),
            R('R1', 'V1.7', 'B+', 1200),
          ],
          ['LINE'],
        );
      expect(codes(checkCapacitors(acdc(160), TYPES))).toEqual(['error working-volts-below components[1].capacitor.workingVolts']);
      expect(checkCapacitors(acdc(200), TYPES)).toEqual([]);
      const at230 = checkCapacitors(acdc(200), TYPES, { lineVolts: 230 });
      expect(codes(at230)).toEqual(['error working-volts-below components[1].capacitor.workingVolts']);
      expect(at230[0].values['volts']).toBeCloseTo(325.3, 1);
      expect(checkCapacitors(acdc(400), TYPES, { lineVolts: 230 })).toEqual([]);
    });

    it('without the HV winding’s voltage: the highest B+ of the service data, and a warning that says so', () => {
      const low = checkCapacitors(amp({ hvRms: null, c1: { workingVolts: 250 } }), TYPES);
      expect(codes(low)).toEqual(['warning supply-peak-unknown chassis.power', 'error working-volts-below components[4].capacitor.workingVolts']);
      expect(low[1].values).toEqual(jasmine.objectContaining({ basis: 'highest-b-plus', volts: 320 })); // the bleeder's voltsAcross
      const ok = checkCapacitors(amp({ hvRms: null, c1: { workingVolts: 450 } }), TYPES);
      expect(codes(ok)).toEqual(['warning supply-peak-unknown chassis.power']);
    });

    it('off the B+ side (a cathode bypass) only the capacitor’s own voltsAcross is checked', () => {
      expect(checkCapacitors(amp({ c3: { workingVolts: 25 } }), TYPES)).toEqual([]);
      const f = checkCapacitors(amp({ c3: { workingVolts: 25 }, c3Volts: 30 }), TYPES);
      expect(codes(f)).toEqual(['error working-volts-below components[10].capacitor.workingVolts']);
      expect(f[0].values['basis']).toBe('volts-across');
      expect(checkCapacitors(amp({ c3: { workingVolts: 50 }, c3Volts: 30 }), TYPES)).toEqual([]);
    });
  });

  describe('first filter capacitance', () => {
    it('5Y3: at most 20 µF capacitor input', () => {
      // check-values.md §5 [SEC]: 5Y3 20 µF
      expect(RECTIFIER_MAX_FIRST_FILTER_UF['5Y3GT'].maxUF).toBe(20);
      const f = checkCapacitors(amp({ c1: { uF: 30 } }), TYPES);
      expect(codes(f)).toEqual(['error first-filter-above-maximum components[4].capacitor.uF']);
      expect(f[0].values).toEqual(jasmine.objectContaining({ rectifier: '5Y3GT', uF: 30, maxUF: 20 }));
      expect(checkCapacitors(amp({ c1: { uF: 20 } }), TYPES)).toEqual([]);
    });

    it('sums capacitors in parallel at the rectifier’s output (also through a 0-Ω link)', () => {
      const two = amp({ c1: { uF: 16 }, extra: [W('W5', 'V1.8', 'RES'), C('C9', 'RES', 'chassis', { uF: 16, workingVolts: 600, dielectric: 'electrolytic' })] });
      two.junctions.push({ name: 'RES', note: '' });
      expect(codes(checkCapacitors(two, TYPES))).toEqual(['error first-filter-above-maximum components[4].capacitor.uF']);
      const one = amp({ c1: { uF: 4 }, extra: [W('W5', 'V1.8', 'RES'), C('C9', 'RES', 'chassis', { uF: 16, workingVolts: 600, dielectric: 'electrolytic' })] });
      one.junctions.push({ name: 'RES', note: '' });
      expect(checkCapacitors(one, TYPES)).toEqual([]);
    });

    it('5U4: at most 40 µF', () => {
      // check-values.md §5 [SEC]: 5U4 40 µF
      expect(codes(checkCapacitors(amp({ rectifier: '5U4GB', c1: { uF: 47 } }), TYPES))).toEqual(['error first-filter-above-maximum components[4].capacitor.uF']);
      expect(checkCapacitors(amp({ rectifier: '5U4GB', c1: { uF: 40 } }), TYPES)).toEqual([]);
    });

    it('a rectifier with no known maximum is a warning to check its datasheet', () => {
      expect(codes(checkCapacitors(amp({ rectifier: 'SPEC-RX1' }), TYPES))).toEqual(['warning first-filter-limit-unknown components[4].capacitor.uF']);
    });

    it('tells a rectifier tube from a signal diode', () => {
      const t = (d: string) => TYPES.get(d)!;
      expect(isRectifierTube(t('5Y3GT'))).toBeTrue();
      expect(isRectifierTube(t('35W4'))).toBeTrue();
      expect(isRectifierTube(t('EZ81'))).toBeTrue();
      expect(isRectifierTube(t('12AV6'))).toBeFalse(); // duplex-diode triode: has a grid
      expect(isRectifierTube(t('6V6GT'))).toBeFalse();
    });
  });

  describe('line-connected capacitors', () => {
    const withLine = (cap: Component) => amp({ extra: [L('T1P', 'PRI', 'LINE-N', 5, { mainsSide: true }), cap] });
    const lineDoc = (cap: Component) => {
      const d = withLine(cap);
      d.junctions.push({ name: 'PRI', note: '' }, { name: 'LINE-N', note: '' });
      return d;
    };
    const line = (safetyClass: 'X' | 'Y' | null, a = 'PRI', b = 'LINE-N', workingVolts = 275) => lineDoc(C('C8', a, b, { uF: 0.01, workingVolts, safetyClass, lineConnected: true }, { mainsSide: true }));

    it('carry a safety class: none is refused, X across the line passes', () => {
      // check-values.md §5 [SEC: antique-radio hobby FAQ; CP]: X across the line, Y line to chassis
      expect(codes(checkCapacitors(line(null), TYPES))).toEqual(['error safety-class-missing components[15].capacitor.safetyClass']);
      expect(checkCapacitors(line('X'), TYPES)).toEqual([]);
      expect(checkCapacitors(line('Y'), TYPES)).toEqual([]); // a Y capacitor serves across the line too (common practice)
    });

    it('line to chassis must be Y', () => {
      expect(codes(checkCapacitors(line('X', 'PRI', 'chassis'), TYPES))).toEqual(['error safety-class-y-required components[15].capacitor.safetyClass']);
      expect(checkCapacitors(line('Y', 'PRI', 'chassis'), TYPES)).toEqual([]);
    });

    it('is rated for the line voltage', () => {
      expect(codes(checkCapacitors(line('X', 'PRI', 'LINE-N', 250), TYPES, { lineVolts: 260 }))).toEqual(['error line-volts-below components[15].capacitor.workingVolts']);
      expect(checkCapacitors(line('X', 'PRI', 'LINE-N', 275), TYPES, { lineVolts: 230 })).toEqual([]);
    });

    it('a mains-side capacitor not marked line-connected is warned about', () => {
      const d = lineDoc(C('C8', 'PRI', 'LINE-N', { uF: 0.01, workingVolts: 630 }, { mainsSide: true }));
      expect(codes(checkCapacitors(d, TYPES))).toEqual(['warning mains-side-not-line-connected components[15].capacitor.lineConnected']);
    });
  });

  describe('electrolytics', () => {
    it('are polarised: an electrolytic marked non-polar is warned about', () => {
      expect(codes(checkCapacitors(amp({ c3: { polarised: false } }), TYPES))).toEqual(['warning electrolytic-not-polarised components[10].capacitor.polarised']);
      expect(checkCapacitors(amp({ c3: { polarised: true } }), TYPES)).toEqual([]);
    });

    it('have their + end first: + on the chassis with − on the B+ side is reversed', () => {
      const rev = amp();
      rev.components[4] = C('C1', 'chassis', 'V1.8', { uF: 20, workingVolts: 600, dielectric: 'electrolytic' });
      expect(codes(checkCapacitors(rev, TYPES))).toEqual(['error polarity-reversed components[4].nodes']);
      expect(checkCapacitors(amp(), TYPES)).toEqual([]);
    });
  });

  describe('can sections', () => {
    const can = (id: string, section: string, commonReturn: string) => ({ id, section, commonReturn });
    const withCan = (c1Can: ReturnType<typeof can>, extraCap: Component) => amp({ c1: { can: c1Can }, extra: [extraCap] });
    const second = (section: string, commonReturn: string, a = 'B+', b = 'chassis') => C('C10', a, b, { uF: 20, workingVolts: 600, dielectric: 'electrolytic', can: can('C1', section, commonReturn) });

    it('share their common return', () => {
      expect(codes(checkCapacitors(withCan(can('C1', 'A', 'chassis'), second('B', 'B-')), TYPES))).toEqual(['error can-returns-differ components[14].capacitor.can.commonReturn']);
      expect(checkCapacitors(withCan(can('C1', 'A', 'chassis'), second('B', 'chassis')), TYPES)).toEqual([]);
    });

    it('each section has the common return as one of its nodes', () => {
      const off = withCan(can('C1', 'A', 'chassis'), second('B', 'chassis', 'B+', 'PLATE1'));
      expect(codes(checkCapacitors(off, TYPES))).toContain('error can-section-off-return components[14].nodes');
    });

    it('do not repeat a section letter', () => {
      expect(codes(checkCapacitors(withCan(can('C1', 'A', 'chassis'), second('A', 'chassis')), TYPES))).toEqual(['error can-section-repeated components[14].capacitor.can.section']);
    });
  });
});
