/**
 * Demo chassis (a): an INVENTED five-tube AC/DC table set — "Marrowfield Radio Works Kestrel 5",
 * chassis MK-52. Fictional maker and model; real tube types are trade terms.
 *
 * Series heater string, 150 mA: 35W4 (35 V) + 50C5 (50 V) + 12BE6 + 12BA6 + 12AV6 (12.6 V each)
 * = 122.8 V on a 120 V line (+2.3 %). Pilot lamp (#47 type, 6.3 V 0.15 A) across the 7.5 V tapped
 * section of the 35W4 heater (pins 3–6), in the rectifier's plate path. B− bus isolated from the
 * chassis by 470 kΩ ∥ 0.05 µF (Y class): hot chassis set, worked through an isolation transformer.
 *
 * Heater values are cold resistances as measured on a known-good set (invented, roughly 1/7 of the
 * hot V/I — a cold tungsten heater reads 1/5 to 1/10 of its hot value [MEM], check-values.md §5).
 * Chart readings: pin to B−, tubes in, volume at maximum, power switch on, speaker connected — the
 * values computed from this network with assembleNetwork and effectiveResistance and written in
 * rounded as service data prints them, ±20 % (the usual chart tolerance, common practice).
 */
import type { Expected, TemplateDocument } from '../../api/domain/template-format';
import { ChassisBuilder } from './builder';

/** The line voltage the heater string is designed for, volts. */
export const KESTREL_5_LINE_VOLTS = 120;

const CHART_TOL = 20;

const OPEN: Expected = { state: 'open' };
const SHORT: Expected = { state: 'short' };
const ohms = (v: number): Expected => ({ ohms: v });

/**
 * The printed resistance chart: [stage, node, value to B−], tubes in, volume max. B+ side pins
 * read open at DC (the filter capacitors charge from the meter; no bleeder in this set). Values
 * computed from this network (assembleNetwork + effectiveResistance) and rounded: e.g. V5.3 =
 * 107.6 + (7.1 ∥ 4.2) = 107.6 + 2.64 = 110.2 Ω → 110; V1.7 = 1.6 + 2.2 M + 47 k + 500 k = 2.747 MΩ → 2.7 M.
 */
const KESTREL_5_CHART: [number, string, Expected][] = [
  [1, 'V5.3', ohms(110)],
  [1, 'V5.4', ohms(82)],
  [1, 'V5.5', ohms(135)],
  [1, 'V5.6', ohms(108)],
  [1, 'V5.7', OPEN],
  [1, 'B+', OPEN],
  [1, 'chassis', ohms(470e3)],
  [2, 'V1.1', ohms(22e3)],
  [2, 'V1.2', SHORT],
  [2, 'V1.3', ohms(24)],
  [2, 'V1.4', ohms(36)],
  [2, 'V1.5', OPEN],
  [2, 'V1.6', OPEN],
  [2, 'V1.7', ohms(2.7e6)],
  [3, 'V2.1', ohms(2.7e6)],
  [3, 'V2.2', SHORT],
  [3, 'V2.3', ohms(11.5)],
  [3, 'V2.4', ohms(24)],
  [3, 'V2.5', OPEN],
  [3, 'V2.6', OPEN],
  [3, 'V2.7', SHORT],
  [4, 'V3.1', ohms(10e6)],
  [4, 'V3.2', SHORT],
  [4, 'V3.3', SHORT],
  [4, 'V3.4', ohms(11.5)],
  [4, 'V3.5', ohms(550e3)],
  [4, 'V3.6', ohms(550e3)],
  [4, 'V3.7', OPEN],
  [5, 'V4.1', ohms(470e3)],
  [5, 'V4.2', ohms(150)],
  [5, 'V4.3', ohms(82)],
  [5, 'V4.4', ohms(36)],
  [5, 'V4.5', OPEN],
  [5, 'V4.6', OPEN],
  [5, 'V4.7', ohms(470e3)],
];

export function kestrel5(): TemplateDocument {
  const b = new ChassisBuilder(
    'kst5',
    {
      maker: 'Marrowfield Radio Works',
      model: 'Kestrel 5',
      chassisNumber: 'MK-52',
      variants: ['MK-52A'],
      yearFrom: 1952,
      yearTo: 1955,
      kind: 'table-radio',
      power: 'ac-dc',
      hotChassis: true,
      hazardNotes: 'AC/DC set: the B− bus is live to the mains when plugged in. Work through an isolation transformer; polarised plug.',
      sources: [
        { title: 'Marrowfield service sheet MK-52 (invented for the demo)', kind: 'service-data', note: 'resistance chart: pin to B−, tubes in, volume max' },
        { title: 'Schematic MK-52', kind: 'schematic', note: '' },
      ],
    },
    { tubesIn: true, speakerConnected: true, controls: 'volume max, power switch on, dial at 1000 kHz' },
  );
  b.junction('LINE', 'line cord, unswitched conductor')
    .junction('OSC', 'oscillator coil top (to the gang and the grid capacitor)')
    .junction('AVC', 'AVC line')
    .junction('DET', 'detector output, bottom of the second IF secondary')
    .junction('VOL', 'volume control top')
    .junction('WIPER', 'volume control wiper')
    .junction('VC1', 'voice coil, hot side')
    .junction('VC2', 'voice coil, return');

  // ---- 1. Rectifier, filter and heater string ----
  b.stage(1, 'Rectifier, filter and heater string', [['V5', '35W4']]);
  b.wire('W1', 'LINE', 'V5.3', 'line cord to the 35W4 heater (short section end)');
  b.heater('V5H1', 'V5.3', 'V5.6', 7.1, '35W4 heater, 7.5 V tapped section (pins 3–6)');
  b.part('PL1', 'lamp', 'V5.3', 'V5.6', 4.2, { tolerancePct: 30, valueSource: 'known-good-set', note: 'pilot lamp 6.3 V 0.15 A across the tapped section' });
  b.heater('V5H2', 'V5.6', 'V5.4', 26, '35W4 heater, 27.5 V section (pins 6–4)');
  b.r('R1', 'V5.6', 'V5.5', 27, 10, 0.5, 1.6, { fuseRole: true, mainsSide: true, note: 'surge limiter, fusible: keeps the 35W4 plate supply impedance above its minimum' });
  b.r('R2', 'V5.7', 'B+', 1200, 10, 1, 18, { note: 'filter resistor' });
  b.cap('C1A', 'V5.7', 'B-', { uF: 30, workingVolts: 200, dielectric: 'electrolytic', can: { id: 'C1', section: 'A', commonReturn: 'B-' } }, { note: 'first filter' });
  b.cap('C1B', 'B+', 'B-', { uF: 20, workingVolts: 200, dielectric: 'electrolytic', can: { id: 'C1', section: 'B', commonReturn: 'B-' } }, { note: 'second filter' });
  b.cap('C2', 'LINE', 'B-', { uF: 0.047, workingVolts: 250, dielectric: 'film', safetyClass: 'X', lineConnected: true }, { mainsSide: true, note: 'line bypass across the line (X class)' });
  b.r('R3', 'B-', 'chassis', 470e3, 10, 0.5, null, { note: 'B− bus to chassis' });
  b.cap('C3', 'B-', 'chassis', { uF: 0.047, workingVolts: 250, dielectric: 'ceramic', safetyClass: 'Y', lineConnected: true }, { mainsSide: true, note: 'B− bus to chassis (Y class)' });
  b.wire('W2', 'V5.4', 'V4.3', 'heater string: 35W4 → 50C5');
  b.wire('W3', 'V4.4', 'V1.4', 'heater string: 50C5 → 12BE6');
  b.wire('W4', 'V1.3', 'V2.4', 'heater string: 12BE6 → 12BA6');
  b.wire('W5', 'V2.3', 'V3.4', 'heater string: 12BA6 → 12AV6');
  b.wire('W6', 'V3.3', 'B-', 'heater string: 12AV6 → B− (through the power switch to the line)');

  // ---- 2. Converter ----
  b.stage(2, 'Converter', [['V1', '12BE6']]);
  b.heater('V1H', 'V1.4', 'V1.3', 11.8, '12BE6 heater');
  b.winding('L1', 'AVC', 'V1.7', 1.6, 'loop antenna');
  b.r('R4', 'V1.1', 'B-', 22e3, 10, 0.5, 8, { note: 'oscillator grid leak' });
  b.cap('C4', 'V1.1', 'OSC', { uF: 0.0001, workingVolts: 500, dielectric: 'mica' }, { note: 'oscillator grid capacitor' });
  b.winding('L2A', 'OSC', 'V1.2', 1.2, 'oscillator coil, top to cathode tap');
  b.winding('L2B', 'V1.2', 'B-', 0.3, 'oscillator coil, cathode tap to bottom');
  b.winding('T1P', 'B+', 'V1.5', 9, 'first IF transformer, primary');
  b.wire('W7', 'V1.6', 'B+', 'screen to B+');

  // ---- 3. IF amplifier ----
  b.stage(3, 'IF amplifier', [['V2', '12BA6']]);
  b.heater('V2H', 'V2.4', 'V2.3', 12.3, '12BA6 heater');
  b.winding('T1S', 'AVC', 'V2.1', 8, 'first IF transformer, secondary');
  b.winding('T2P', 'B+', 'V2.5', 9, 'second IF transformer, primary');
  b.wire('W8', 'V2.6', 'B+', 'screen to B+');
  b.wire('W9', 'V2.7', 'B-', 'cathode to B−');
  b.wire('W10', 'V2.2', 'V2.7', 'grid 3 to cathode');

  // ---- 4. Detector, AVC and first audio ----
  b.stage(4, 'Detector, AVC and first audio', [['V3', '12AV6']]);
  b.heater('V3H', 'V3.4', 'V3.3', 11.5, '12AV6 heater');
  b.wire('W11', 'V3.5', 'V3.6', 'diode plates joined');
  b.winding('T2S', 'V3.5', 'DET', 8, 'second IF transformer, secondary');
  b.r('R5', 'DET', 'VOL', 47e3, 10, 0.5, null, { note: 'IF filter' });
  b.cap('C5', 'DET', 'B-', { uF: 0.0001, workingVolts: 500, dielectric: 'mica' }, { note: 'IF filter' });
  b.part('R6', 'pot', 'VOL', 'B-', 500e3, { tolerancePct: 20, ratedWatts: 0.25, wiper: { node: 'WIPER', fraction: 0 }, note: 'volume control, audio taper, with the power switch; wiper at the top (volume max)' });
  b.r('R7', 'DET', 'AVC', 2.2e6, 10, 0.5, null, { note: 'AVC filter' });
  b.cap('C6', 'AVC', 'B-', { uF: 0.047, workingVolts: 200, dielectric: 'film' }, { note: 'AVC bypass' });
  b.cap('C7', 'WIPER', 'V3.1', { uF: 0.01, workingVolts: 400, dielectric: 'film' }, { note: 'audio coupling to the triode grid' });
  b.r('R8', 'V3.1', 'B-', 10e6, 10, 0.5, null, { note: 'grid leak (contact bias)' });
  b.wire('W12', 'V3.2', 'B-', 'cathode to B−');
  b.r('R9', 'B+', 'V3.7', 220e3, 10, 0.5, 60, { note: 'plate load' });

  // ---- 5. Audio output ----
  b.stage(5, 'Audio output', [['V4', '50C5']]);
  b.heater('V4H', 'V4.3', 'V4.4', 46, '50C5 heater');
  b.cap('C8', 'V3.7', 'V4.1', { uF: 0.01, workingVolts: 400, dielectric: 'film' }, { note: 'coupling to the output grid' });
  b.r('R10', 'V4.1', 'B-', 470e3, 10, 0.5, null, { note: 'grid leak' });
  b.r('R11', 'V4.2', 'B-', 150, 10, 0.5, 7.5, { note: 'cathode resistor (unbypassed)' });
  b.wire('W13', 'V4.6', 'B+', 'screen to B+');
  b.winding('T3P', 'V5.7', 'V4.5', 280, 'output transformer, primary (from the first filter)');
  b.cap('C9', 'V4.5', 'B-', { uF: 0.005, workingVolts: 630, dielectric: 'film' }, { note: 'tone capacitor, plate to B−' });
  b.winding('T3S', 'VC1', 'VC2', 0.5, 'output transformer, secondary');
  b.winding('LS1', 'VC1', 'VC2', 3.0, 'speaker voice coil (speaker connected)');

  for (const [stage, from, expected] of KESTREL_5_CHART) b.chartIn(b.stageKey(stage), from, 'B-', expected, CHART_TOL);
  return b.build();
}
