/**
 * Demo chassis (b): an INVENTED transformer-powered console — "Vellacott & Sons Larkspur 7-P",
 * chassis VS-7P. Fictional maker and model; real tube types are trade terms.
 *
 * 6BE6 converter, 6BA6 IF, 6AV6 detector/AVC/first audio, tone control, 6SN7GT driver (section 1)
 * and split-load phase inverter (section 2), push-pull 6V6GT with individual cathode resistors
 * (a matched pair), 5Y3GT full-wave rectifier on a 300-0-300 V winding, capacitor input
 * (20 µF, the 5Y3's maximum [SEC, check-values.md §5]), choke, a three-section can. Parallel 6.3 V heaters. Service-data voltages (invented): B+1 330 V at the rectifier
 * filament, B+ 300 V after the choke, B+3 250 V after the dropper.
 * The highest circuit voltage is the no-load peak of one half of the HV winding during warm-up,
 * 300 × √2 = 424 V [CALC]: every capacitor on the B+ side is rated 450 V or more.
 */
import type { TemplateDocument } from '../../api/domain/template-format';
import { ChassisBuilder } from './builder';

/** The HV winding, volts RMS each side of the centre tap. */
export const LARKSPUR_HV_RMS = 300;

export function larkspur7p(): TemplateDocument {
  const b = new ChassisBuilder(
    'lks7',
    {
      maker: 'Vellacott & Sons',
      model: 'Larkspur 7-P',
      chassisNumber: 'VS-7P',
      variants: [],
      yearFrom: 1950,
      yearTo: 1953,
      kind: 'console',
      power: 'transformer',
      hotChassis: false,
      hazardNotes: 'Wax-paper capacitors throughout; 424 V peak on the rectifier during warm-up.',
      sources: [{ title: 'Vellacott service manual VS-7P (invented for the demo)', kind: 'service-data', note: '' }],
    },
    { tubesIn: true, speakerConnected: true, controls: 'volume max, tone treble, band BC, power switch on' },
  );
  b.junction('LINE-L', 'line cord, live')
    .junction('LINE-N', 'line cord, neutral')
    .junction('FUSED', 'after the fuse')
    .junction('PRI', 'after the power switch')
    .junction('HVCT', 'HV winding centre tap')
    .junction('H', '6.3 V heater line')
    .junction('B+3', 'after the dropper: converter, IF and audio')
    .junction('ANT', 'aerial terminal')
    .junction('OSC', 'oscillator coil top')
    .junction('AVC', 'AVC line')
    .junction('DET', 'detector load')
    .junction('VOL', 'volume control top')
    .junction('WIPER', 'volume control wiper')
    .junction('TC', 'tone capacitor to the tone control')
    .junction('KL', 'phase inverter cathode load top')
    .junction('SPK', 'speaker, hot side');

  // ---- 1. Power supply ----
  b.stage(1, 'Power supply and heaters', [['V7', '5Y3GT']]);
  b.part('F1', 'fuse', 'LINE-L', 'FUSED', 0.2, { tolerancePct: 50, fuseRole: true, mainsSide: true, note: '1 A slow-blow, in the live conductor ahead of the switch' });
  b.wire('S1', 'FUSED', 'PRI', 'power switch (on the tone control), closed');
  b.winding('T1P', 'PRI', 'LINE-N', 4.5, 'power transformer, primary', { mainsSide: true });
  b.cap('C1', 'PRI', 'LINE-N', { uF: 0.01, workingVolts: 275, dielectric: 'film', safetyClass: 'X', lineConnected: true }, { mainsSide: true, note: 'line bypass across the primary (X class)' });
  b.winding('T1HA', 'V7.6', 'HVCT', 115, 'HV winding, first half', { voltsAcross: LARKSPUR_HV_RMS });
  b.winding('T1HB', 'HVCT', 'V7.4', 122, 'HV winding, second half', { voltsAcross: LARKSPUR_HV_RMS });
  b.wire('W1', 'HVCT', 'chassis', 'HV centre tap to chassis');
  b.winding('T1F', 'V7.2', 'V7.8', 0.1, '5 V rectifier filament winding');
  b.heater('V7F', 'V7.2', 'V7.8', 0.35, '5Y3GT filament');
  b.winding('T1H', 'H', 'chassis', 0.06, '6.3 V heater winding');
  b.part('PL1', 'lamp', 'H', 'chassis', 4.2, { tolerancePct: 30, valueSource: 'known-good-set', note: 'dial lamp 6.3 V 0.15 A' });
  b.part('PL2', 'lamp', 'H', 'chassis', 4.2, { tolerancePct: 30, valueSource: 'known-good-set', note: 'dial lamp 6.3 V 0.15 A' });
  b.cap('C2A', 'V7.8', 'chassis', { uF: 20, workingVolts: 450, dielectric: 'electrolytic', can: { id: 'C2', section: 'A', commonReturn: 'chassis' } }, { note: 'first filter (5Y3: 20 µF maximum)' });
  b.winding('L1', 'V7.8', 'B+', 280, 'filter choke');
  b.cap('C2B', 'B+', 'chassis', { uF: 20, workingVolts: 450, dielectric: 'electrolytic', can: { id: 'C2', section: 'B', commonReturn: 'chassis' } }, { note: 'second filter' });
  b.r('R1', 'B+', 'B+3', 4700, 10, 2, 50, { note: 'dropper to B+3 (about 10.6 mA)' });
  b.cap('C2C', 'B+3', 'chassis', { uF: 20, workingVolts: 450, dielectric: 'electrolytic', can: { id: 'C2', section: 'C', commonReturn: 'chassis' } }, { note: 'B+3 decoupling' });
  b.r('R2', 'B+', 'chassis', 100e3, 10, 2, 300, { note: 'bleeder (0.9 W at 300 V)' });

  // ---- 2. Converter ----
  b.stage(2, 'Converter', [['V1', '6BE6']]);
  b.heater('V1H', 'V1.3', 'V1.4', 2.9, '6BE6 heater');
  b.wire('W2', 'V1.3', 'chassis');
  b.wire('W3', 'V1.4', 'H');
  b.winding('L2P', 'ANT', 'chassis', 25, 'aerial coil, primary');
  b.winding('L2S', 'AVC', 'V1.7', 4, 'aerial coil, secondary');
  b.r('R3', 'V1.1', 'chassis', 22e3, 10, 0.5, 9, { note: 'oscillator grid leak' });
  b.cap('C3', 'V1.1', 'OSC', { uF: 0.0001, workingVolts: 500, dielectric: 'mica' }, { note: 'oscillator grid capacitor' });
  b.winding('L3A', 'OSC', 'V1.2', 1.3, 'oscillator coil, top to cathode tap');
  b.winding('L3B', 'V1.2', 'chassis', 0.4, 'oscillator coil, cathode tap to bottom');
  b.winding('T2P', 'B+3', 'V1.5', 10, 'first IF transformer, primary');
  b.r('R4', 'B+3', 'V1.6', 22e3, 10, 2, 150, { note: 'screen dropper (about 6.8 mA)' });
  b.cap('C4', 'V1.6', 'chassis', { uF: 0.05, workingVolts: 600, dielectric: 'wax-paper' }, { note: 'screen bypass' });

  // ---- 3. IF amplifier ----
  b.stage(3, 'IF amplifier', [['V2', '6BA6']]);
  b.heater('V2H', 'V2.3', 'V2.4', 2.9, '6BA6 heater');
  b.wire('W4', 'V2.3', 'chassis');
  b.wire('W5', 'V2.4', 'H');
  b.winding('T2S', 'AVC', 'V2.1', 9, 'first IF transformer, secondary');
  b.r('R5', 'V2.7', 'chassis', 68, 10, 0.5, 1, { note: 'cathode bias' });
  b.cap('C5', 'V2.7', 'chassis', { uF: 0.05, workingVolts: 200, dielectric: 'wax-paper' }, { note: 'cathode bypass' });
  b.wire('W6', 'V2.2', 'chassis', 'grid 3 and shield to chassis');
  b.winding('T3P', 'B+3', 'V2.5', 10, 'second IF transformer, primary');
  b.r('R6', 'B+3', 'V2.6', 33e3, 10, 1, 150, { note: 'screen dropper (about 4.5 mA)' });
  b.cap('C6', 'V2.6', 'chassis', { uF: 0.05, workingVolts: 600, dielectric: 'wax-paper' }, { note: 'screen bypass' });

  // ---- 4. Detector, AVC, first audio and tone ----
  b.stage(4, 'Detector, AVC, first audio and tone', [['V3', '6AV6']]);
  b.heater('V3H', 'V3.3', 'V3.4', 3.0, '6AV6 heater');
  b.wire('W7', 'V3.3', 'chassis');
  b.wire('W8', 'V3.4', 'H');
  b.wire('W9', 'V3.5', 'V3.6', 'diode plates joined');
  b.winding('T3S', 'V3.5', 'DET', 9, 'second IF transformer, secondary');
  b.r('R7', 'DET', 'VOL', 47e3, 10, 0.5, null, { note: 'IF filter' });
  b.part('R8', 'pot', 'VOL', 'chassis', 500e3, { tolerancePct: 20, ratedWatts: 0.25, wiper: { node: 'WIPER', fraction: 0 }, note: 'volume control, audio taper; wiper at the top (volume max)' });
  b.r('R9', 'DET', 'AVC', 2.2e6, 10, 0.5, null, { note: 'AVC filter' });
  b.cap('C7', 'AVC', 'chassis', { uF: 0.05, workingVolts: 200, dielectric: 'wax-paper' }, { note: 'AVC bypass' });
  b.cap('C8', 'WIPER', 'V3.1', { uF: 0.01, workingVolts: 400, dielectric: 'wax-paper' }, { note: 'coupling to the triode grid' });
  b.r('R10', 'V3.1', 'chassis', 10e6, 10, 0.5, null, { note: 'grid leak (contact bias)' });
  b.wire('W10', 'V3.2', 'chassis', 'cathode to chassis');
  b.r('R11', 'B+3', 'V3.7', 220e3, 10, 0.5, 100, { note: 'plate load' });
  b.cap('C9', 'V3.7', 'TC', { uF: 0.02, workingVolts: 600, dielectric: 'wax-paper' }, { note: 'tone capacitor' });
  b.part('R12', 'pot', 'TC', 'chassis', 1e6, { tolerancePct: 20, ratedWatts: 0.25, wiper: { node: 'chassis', fraction: 1 }, note: 'tone control as a rheostat (wiper to the chassis end); at treble the whole track is in' });

  // ---- 5. Driver and phase inverter ----
  b.stage(5, 'Driver and phase inverter', [['V4', '6SN7GT']]);
  b.heater('V4H', 'V4.7', 'V4.8', 1.5, '6SN7GT heater');
  b.wire('W11', 'V4.7', 'chassis');
  b.wire('W12', 'V4.8', 'H');
  b.cap('C10', 'V3.7', 'V4.4', { uF: 0.02, workingVolts: 600, dielectric: 'wax-paper' }, { note: 'coupling to the driver' });
  b.r('R13', 'V4.4', 'chassis', 1e6, 10, 0.5, null, { note: 'driver grid leak' });
  b.r('R14', 'V4.6', 'chassis', 2200, 10, 0.5, 6, { note: 'driver cathode bias' });
  b.cap('C11', 'V4.6', 'chassis', { uF: 25, workingVolts: 25, dielectric: 'electrolytic' }, { note: 'driver cathode bypass' });
  b.r('R15', 'B+3', 'V4.5', 47e3, 10, 1, 130, { note: 'driver plate load' });
  b.cap('C12', 'V4.5', 'V4.1', { uF: 0.05, workingVolts: 600, dielectric: 'wax-paper' }, { note: 'driver to phase inverter' });
  b.r('R16', 'V4.1', 'KL', 470e3, 10, 0.5, null, { note: 'phase inverter grid leak, returned to the cathode load' });
  b.r('R17', 'B+3', 'V4.2', 22e3, 5, 1, 70, { critical: { lowPct: -5, highPct: 5 }, note: 'phase inverter plate load (matched to R19)' });
  b.r('R18', 'V4.3', 'KL', 1500, 10, 0.5, 4.8, { note: 'phase inverter cathode bias' });
  b.r('R19', 'KL', 'chassis', 22e3, 5, 1, 70, { critical: { lowPct: -5, highPct: 5 }, note: 'phase inverter cathode load (matched to R17)' });
  b.pair('R17', 'R19', 5);

  // ---- 6. Push-pull output ----
  b.stage(6, 'Push-pull output', [['V5', '6V6GT'], ['V6', '6V6GT']]);
  b.heater('V5H', 'V5.2', 'V5.7', 2.0, '6V6GT heater');
  b.wire('W13', 'V5.2', 'chassis');
  b.wire('W14', 'V5.7', 'H');
  b.heater('V6H', 'V6.2', 'V6.7', 2.0, '6V6GT heater');
  b.wire('W15', 'V6.2', 'chassis');
  b.wire('W16', 'V6.7', 'H');
  b.cap('C13', 'V4.2', 'V5.5', { uF: 0.05, workingVolts: 600, dielectric: 'wax-paper' }, { note: 'coupling to V5 grid' });
  b.cap('C14', 'V4.3', 'V6.5', { uF: 0.05, workingVolts: 600, dielectric: 'wax-paper' }, { note: 'coupling to V6 grid' });
  b.r('R20', 'V5.5', 'chassis', 220e3, 10, 0.5, null, { note: 'V5 grid leak' });
  b.r('R21', 'V6.5', 'chassis', 220e3, 10, 0.5, null, { note: 'V6 grid leak' });
  b.r('R22', 'V5.8', 'chassis', 470, 5, 2, 17, { critical: { lowPct: -5, highPct: 5 }, note: 'V5 cathode bias (matched pair with R23)' });
  b.r('R23', 'V6.8', 'chassis', 470, 5, 2, 17, { critical: { lowPct: -5, highPct: 5 }, note: 'V6 cathode bias (matched pair with R22)' });
  b.cap('C15', 'V5.8', 'chassis', { uF: 25, workingVolts: 50, dielectric: 'electrolytic' }, { note: 'V5 cathode bypass' });
  b.cap('C16', 'V6.8', 'chassis', { uF: 25, workingVolts: 50, dielectric: 'electrolytic' }, { note: 'V6 cathode bypass' });
  b.r('R24', 'B+', 'V5.4', 470, 10, 0.5, 2.1, { note: 'V5 screen stopper' });
  b.r('R25', 'B+', 'V6.4', 470, 10, 0.5, 2.1, { note: 'V6 screen stopper' });
  b.winding('T4A', 'B+', 'V5.3', 180, 'output transformer, primary half to V5');
  b.winding('T4B', 'B+', 'V6.3', 190, 'output transformer, primary half to V6');
  b.cap('C17', 'V5.3', 'V6.3', { uF: 0.005, workingVolts: 1000, dielectric: 'wax-paper' }, { note: 'plate-to-plate tone capacitor' });
  b.winding('T4S', 'SPK', 'chassis', 0.4, 'output transformer, secondary');
  b.winding('LS1', 'SPK', 'chassis', 3.0, 'speaker voice coil (speaker connected)');
  b.pair('R22', 'R23', 5);

  return b.build();
}
