/**
 * Demo chassis (c): an INVENTED small amplifier — "Quenby Audio QA-10", about 10 W. Fictional
 * maker and model; real tube types are trade terms.
 *
 * 12AX7: section 1 voltage amplifier with negative feedback into its cathode, section 2
 * split-load phase inverter; push-pull EL84 with individual cathode resistors (a matched pair);
 * EZ81 full-wave rectifier on a 250-0-250 V winding, capacitor input 32 µF (within the EZ81's
 * 50 µF maximum [MEM — check the datasheet]). Service-data voltages (invented): B+1 300 V at the
 * rectifier cathode, B+2 288 V (screens), B+3 240 V (12AX7). The highest circuit voltage is the
 * no-load peak 250 × √2 = 354 V [CALC] during warm-up: B+ capacitors are rated 450 V, coupling
 * capacitors 630 V.
 */
import type { TemplateDocument } from '../../api/domain/template-format';
import { ChassisBuilder } from './builder';

/** The HV winding, volts RMS each side of the centre tap. */
export const QUENBY_HV_RMS = 250;

export function quenbyQa10(): TemplateDocument {
  const b = new ChassisBuilder(
    'qa10',
    {
      maker: 'Quenby Audio',
      model: 'QA-10',
      chassisNumber: 'QA-10/2',
      variants: ['QA-10/1'],
      yearFrom: 1958,
      yearTo: 1962,
      kind: 'amplifier',
      power: 'transformer',
      hotChassis: false,
      hazardNotes: '',
      sources: [{ title: 'Quenby QA-10 circuit and parts list (invented for the demo)', kind: 'schematic', note: '' }],
    },
    { tubesIn: true, speakerConnected: true, controls: 'no controls; 8 Ω load connected' },
  );
  b.junction('LINE-L', 'mains inlet, live')
    .junction('LINE-N', 'mains inlet, neutral')
    .junction('FUSED', 'after the fuse')
    .junction('PRI', 'after the power switch')
    .junction('HVCT', 'HV winding centre tap')
    .junction('H', '6.3 V heater line')
    .junction('B+2', 'screen supply')
    .junction('B+3', 'preamplifier supply')
    .junction('IN', 'input socket')
    .junction('KFB', 'feedback point under the first cathode')
    .junction('KS', 'phase inverter cathode load top')
    .junction('SPK', 'speaker terminal, hot side');

  // ---- 1. Power supply ----
  b.stage(1, 'Power supply and heaters', [['V4', 'EZ81']]);
  b.part('F1', 'fuse', 'LINE-L', 'FUSED', 0.15, { tolerancePct: 50, fuseRole: true, mainsSide: true, note: '1 A slow-blow, in the live conductor ahead of the switch' });
  b.wire('S1', 'FUSED', 'PRI', 'power switch, closed');
  b.winding('T1P', 'PRI', 'LINE-N', 6, 'power transformer, primary', { mainsSide: true });
  b.cap('C1', 'PRI', 'LINE-N', { uF: 0.01, workingVolts: 275, dielectric: 'film', safetyClass: 'X', lineConnected: true }, { mainsSide: true, note: 'across the primary (X class)' });
  b.winding('T1HA', 'V4.7', 'HVCT', 95, 'HV winding, first half', { voltsAcross: QUENBY_HV_RMS });
  b.winding('T1HB', 'HVCT', 'V4.1', 100, 'HV winding, second half', { voltsAcross: QUENBY_HV_RMS });
  b.wire('W1', 'HVCT', 'chassis', 'HV centre tap to chassis');
  b.winding('T1H', 'H', 'chassis', 0.05, '6.3 V heater winding');
  b.heater('V4H', 'V4.4', 'V4.5', 0.9, 'EZ81 heater');
  b.wire('W2', 'V4.4', 'chassis');
  b.wire('W3', 'V4.5', 'H');
  b.cap('C2A', 'V4.3', 'chassis', { uF: 32, workingVolts: 450, dielectric: 'electrolytic', can: { id: 'C2', section: 'A', commonReturn: 'chassis' } }, { note: 'reservoir (first filter)' });
  b.r('R1', 'V4.3', 'B+2', 1000, 10, 2, 12, { note: 'filter resistor to the screens' });
  b.cap('C2B', 'B+2', 'chassis', { uF: 32, workingVolts: 450, dielectric: 'electrolytic', can: { id: 'C2', section: 'B', commonReturn: 'chassis' } }, { note: 'screen supply filter' });
  b.r('R2', 'B+2', 'B+3', 22e3, 10, 1, 48, { note: 'dropper to the preamplifier' });
  b.cap('C3', 'B+3', 'chassis', { uF: 16, workingVolts: 450, dielectric: 'electrolytic' }, { note: 'preamplifier decoupling' });
  b.r('R3', 'V4.3', 'chassis', 220e3, 10, 1, 300, { note: 'bleeder (0.41 W)' });

  // ---- 2. Input, preamplifier and phase inverter ----
  b.stage(2, 'Preamplifier and phase inverter', [['V1', '12AX7']]);
  b.heater('V1HA', 'V1.4', 'V1.9', 6.1, '12AX7 heater, first half (pins 4–9)');
  b.heater('V1HB', 'V1.5', 'V1.9', 6.1, '12AX7 heater, second half (pins 5–9)');
  b.wire('W4', 'V1.4', 'V1.5', 'pins 4 and 5 joined for 6.3 V');
  b.wire('W5', 'V1.4', 'chassis');
  b.wire('W6', 'V1.9', 'H');
  b.r('R4', 'IN', 'chassis', 1e6, 10, 0.5, null, { note: 'input grid leak' });
  b.r('R5', 'IN', 'V1.7', 68e3, 10, 0.5, null, { note: 'grid stopper' });
  b.r('R6', 'V1.8', 'KFB', 1500, 10, 0.5, 1.3, { note: 'first cathode bias' });
  b.cap('C4', 'V1.8', 'KFB', { uF: 25, workingVolts: 25, dielectric: 'electrolytic' }, { note: 'first cathode bypass' });
  b.r('R7', 'KFB', 'chassis', 100, 10, 0.5, 0.1, { note: 'feedback resistor, lower arm' });
  b.r('R8', 'SPK', 'KFB', 3300, 10, 0.5, 3, { note: 'feedback resistor from the 8 Ω output' });
  b.r('R9', 'B+3', 'V1.6', 100e3, 10, 0.5, 90, { note: 'first plate load' });
  b.cap('C5', 'V1.6', 'V1.2', { uF: 0.047, workingVolts: 630, dielectric: 'film' }, { note: 'coupling to the phase inverter' });
  b.r('R10', 'V1.2', 'KS', 1e6, 10, 0.5, null, { note: 'phase inverter grid leak, returned to the cathode load' });
  b.r('R11', 'V1.3', 'KS', 1500, 10, 0.5, 2, { note: 'phase inverter cathode bias' });
  b.r('R12', 'KS', 'chassis', 47e3, 5, 1, 61, { critical: { lowPct: -5, highPct: 5 }, note: 'phase inverter cathode load (matched to R13)' });
  b.r('R13', 'B+3', 'V1.1', 47e3, 5, 1, 61, { critical: { lowPct: -5, highPct: 5 }, note: 'phase inverter plate load (matched to R12)' });
  b.pair('R12', 'R13', 5);

  // ---- 3. Push-pull output ----
  b.stage(3, 'Push-pull output', [['V2', 'EL84'], ['V3', 'EL84']]);
  b.heater('V2H', 'V2.4', 'V2.5', 1.2, 'EL84 heater');
  b.wire('W7', 'V2.4', 'chassis');
  b.wire('W8', 'V2.5', 'H');
  b.heater('V3H', 'V3.4', 'V3.5', 1.2, 'EL84 heater');
  b.wire('W9', 'V3.4', 'chassis');
  b.wire('W10', 'V3.5', 'H');
  b.cap('C6', 'V1.1', 'V2.2', { uF: 0.1, workingVolts: 630, dielectric: 'film' }, { note: 'coupling to V2 grid' });
  b.cap('C7', 'V1.3', 'V3.2', { uF: 0.1, workingVolts: 630, dielectric: 'film' }, { note: 'coupling to V3 grid' });
  b.r('R14', 'V2.2', 'chassis', 470e3, 10, 0.5, null, { note: 'V2 grid leak' });
  b.r('R15', 'V3.2', 'chassis', 470e3, 10, 0.5, null, { note: 'V3 grid leak' });
  b.r('R16', 'V2.3', 'chassis', 270, 5, 1, 10.8, { critical: { lowPct: -5, highPct: 5 }, note: 'V2 cathode bias (matched pair with R17)' });
  b.r('R17', 'V3.3', 'chassis', 270, 5, 1, 10.8, { critical: { lowPct: -5, highPct: 5 }, note: 'V3 cathode bias (matched pair with R16)' });
  b.cap('C8', 'V2.3', 'chassis', { uF: 100, workingVolts: 50, dielectric: 'electrolytic' }, { note: 'V2 cathode bypass' });
  b.cap('C9', 'V3.3', 'chassis', { uF: 100, workingVolts: 50, dielectric: 'electrolytic' }, { note: 'V3 cathode bypass' });
  b.r('R18', 'B+2', 'V2.9', 100, 10, 0.5, 0.5, { note: 'V2 screen stopper' });
  b.r('R19', 'B+2', 'V3.9', 100, 10, 0.5, 0.5, { note: 'V3 screen stopper' });
  b.winding('T2A', 'V4.3', 'V2.7', 150, 'output transformer, primary half to V2');
  b.winding('T2B', 'V4.3', 'V3.7', 160, 'output transformer, primary half to V3');
  b.winding('T2S', 'SPK', 'chassis', 0.6, 'output transformer, 8 Ω secondary');
  b.winding('LS1', 'SPK', 'chassis', 7, 'loudspeaker voice coil, 8 Ω (load connected)');
  b.pair('R16', 'R17', 5);

  return b.build();
}
