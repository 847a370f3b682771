/**
 * Tube-type records for the shared library: the receiving types the demo chassis use. Real type
 * numbers are trade terms. Pinouts follow the standard basing diagrams as best known to the
 * author; each record whose pinout is not certain says so beside it:
 * `// pinout from memory — check against a tube manual`.
 *
 * Conventions (api/domain/template-format.ts): pins numbered clockwise seen from the bottom after
 * the gap or key; `NC` = no connection (usable as a tie point); `IC` = internally connected
 * (never a tie point); `ties` = pins joined inside the tube that ARE one node. Where a datasheet
 * may mark an unused pin "i.c." and the author is unsure, the pin is entered as `IC` — the safe
 * side, since an IC pin is never used as a tie point.
 * Heater volts and amps are the datasheet's nominal operating values (hot): never use them to
 * derive a cold heater resistance (check-values.md §5).
 */
import type { TubePin, TubeTypeRecord } from '../api/domain/template-format';

type PinRow = [pin: number, electrode: TubePin['electrode'], label: string];
const pins = (rows: PinRow[]): TubePin[] => rows.map(([pin, electrode, label]) => ({ pin, electrode, label }));

/** 6BE6 / 12BE6 pentagrid converter, 7-pin miniature (basing 7CH). Grid 5 is joined to the cathode inside. */
const PENTAGRID_7CH = pins([
  [1, 'g1', 'grid 1 (oscillator grid)'],
  [2, 'k', 'cathode, grid 5'],
  [3, 'h', 'heater'],
  [4, 'h', 'heater'],
  [5, 'p', 'plate'],
  [6, 'g2', 'grids 2 and 4 (screen)'],
  [7, 'g3', 'grid 3 (signal grid)'],
]);

/** 6BA6 / 12BA6 remote-cutoff pentode, 7-pin miniature (basing 7BK). */
const PENTODE_7BK = pins([
  [1, 'g1', 'grid 1'],
  [2, 'g3', 'grid 3 (suppressor), internal shield'],
  [3, 'h', 'heater'],
  [4, 'h', 'heater'],
  [5, 'p', 'plate'],
  [6, 'g2', 'grid 2 (screen)'],
  [7, 'k', 'cathode'],
]);

/** 6AV6 / 12AV6 duplex diode, high-mu triode, 7-pin miniature (basing 7BT). */
const DIODE_TRIODE_7BT = pins([
  [1, 'g', 'triode grid'],
  [2, 'k', 'cathode'],
  [3, 'h', 'heater'],
  [4, 'h', 'heater'],
  [5, 'd', 'diode plate 2'],
  [6, 'd', 'diode plate 1'],
  [7, 'p', 'triode plate'],
]);

export const DEMO_TUBE_TYPES: readonly TubeTypeRecord[] = [
  // ---- AC/DC five-tube set (150 mA series string) ----
  {
    designation: '12BE6',
    base: 'miniature-7',
    heating: 'indirect',
    heaterVolts: 12.6,
    heaterAmps: 0.15,
    pins: PENTAGRID_7CH,
    ties: [],
    notes: 'Pentagrid converter. Grid 5 joined to the cathode inside.',
  },
  {
    designation: '12BA6',
    base: 'miniature-7',
    heating: 'indirect',
    heaterVolts: 12.6,
    heaterAmps: 0.15,
    pins: PENTODE_7BK,
    ties: [],
    notes: 'Remote-cutoff pentode (IF amplifier).',
  },
  {
    designation: '12AV6',
    base: 'miniature-7',
    heating: 'indirect',
    heaterVolts: 12.6,
    heaterAmps: 0.15,
    pins: DIODE_TRIODE_7BT,
    ties: [],
    notes: 'Duplex diode, high-mu triode (detector, AVC, first audio).',
  },
  {
    // pinout from memory — check against a tube manual (basing 7CV: grid 1 on pins 1 and 7)
    designation: '50C5',
    base: 'miniature-7',
    heating: 'indirect',
    heaterVolts: 50,
    heaterAmps: 0.15,
    pins: pins([
      [1, 'g1', 'grid 1'],
      [2, 'k', 'cathode, beam plates'],
      [3, 'h', 'heater'],
      [4, 'h', 'heater'],
      [5, 'p', 'plate'],
      [6, 'g2', 'grid 2 (screen)'],
      [7, 'g1', 'grid 1'],
    ]),
    ties: [[1, 7]],
    notes: 'Beam power tube. Grid 1 brought out on two pins, joined inside (from memory).',
  },
  {
    // pinout from memory — check against a tube manual (basing 5BQ; which heater end the tap is
    // nearer, and pins 1 and 2, are the uncertain parts)
    designation: '35W4',
    base: 'miniature-7',
    heating: 'indirect',
    heaterVolts: 35,
    heaterAmps: 0.15,
    pins: pins([
      [1, 'NC', 'no connection'],
      [2, 'NC', 'no connection'],
      [3, 'h', 'heater'],
      [4, 'h', 'heater'],
      [5, 'p', 'plate'],
      [6, 'htap', 'heater tap (pilot lamp)'],
      [7, 'k', 'cathode'],
    ]),
    ties: [],
    notes: 'Half-wave rectifier, tapped heater: a pilot lamp across the 7.5 V section between pins 3 and 6 (from memory).',
  },

  // ---- Transformer console ----
  {
    designation: '6BE6',
    base: 'miniature-7',
    heating: 'indirect',
    heaterVolts: 6.3,
    heaterAmps: 0.3,
    pins: PENTAGRID_7CH,
    ties: [],
    notes: 'Pentagrid converter. Grid 5 joined to the cathode inside.',
  },
  {
    designation: '6BA6',
    base: 'miniature-7',
    heating: 'indirect',
    heaterVolts: 6.3,
    heaterAmps: 0.3,
    pins: PENTODE_7BK,
    ties: [],
    notes: 'Remote-cutoff pentode (IF amplifier).',
  },
  {
    designation: '6AV6',
    base: 'miniature-7',
    heating: 'indirect',
    heaterVolts: 6.3,
    heaterAmps: 0.3,
    pins: DIODE_TRIODE_7BT,
    ties: [],
    notes: 'Duplex diode, high-mu triode.',
  },
  {
    designation: '6SN7GT',
    base: 'octal',
    heating: 'indirect',
    heaterVolts: 6.3,
    heaterAmps: 0.6,
    pins: pins([
      [1, 'g', 'grid (section 2)'],
      [2, 'p', 'plate (section 2)'],
      [3, 'k', 'cathode (section 2)'],
      [4, 'g', 'grid (section 1)'],
      [5, 'p', 'plate (section 1)'],
      [6, 'k', 'cathode (section 1)'],
      [7, 'h', 'heater'],
      [8, 'h', 'heater'],
    ]),
    ties: [],
    notes: 'Twin medium-mu triode (basing 8BD).',
  },
  {
    // pinout from memory — check against a tube manual for pins 1 and 6 of a given make
    designation: '6V6GT',
    base: 'octal',
    heating: 'indirect',
    heaterVolts: 6.3,
    heaterAmps: 0.45,
    pins: pins([
      [1, 'NC', 'no connection'],
      [2, 'h', 'heater'],
      [3, 'p', 'plate'],
      [4, 'g2', 'grid 2 (screen)'],
      [5, 'g1', 'grid 1'],
      [6, 'NC', 'no connection'],
      [7, 'h', 'heater'],
      [8, 'k', 'cathode, beam plates'],
    ]),
    ties: [],
    notes: 'Beam power tube (basing 7AC). On the metal 6V6 pin 1 is the shell.',
  },
  {
    designation: '5Y3GT',
    base: 'octal',
    heating: 'direct',
    heaterVolts: 5,
    heaterAmps: 2,
    pins: pins([
      [1, 'NC', 'no connection'],
      [2, 'f', 'filament'],
      [3, 'NC', 'no connection'],
      [4, 'p', 'plate 2'],
      [5, 'NC', 'no connection'],
      [6, 'p', 'plate 1'],
      [7, 'NC', 'no connection'],
      [8, 'f', 'filament'],
    ]),
    ties: [],
    notes: 'Full-wave rectifier, directly heated (basing 5T): B+ is taken from the filament.',
  },

  // ---- Small amplifier ----
  {
    designation: '12AX7',
    base: 'noval',
    heating: 'indirect',
    heaterVolts: 12.6,
    heaterAmps: 0.15,
    pins: pins([
      [1, 'p', 'plate (section 2)'],
      [2, 'g', 'grid (section 2)'],
      [3, 'k', 'cathode (section 2)'],
      [4, 'h', 'heater'],
      [5, 'h', 'heater'],
      [6, 'p', 'plate (section 1)'],
      [7, 'g', 'grid (section 1)'],
      [8, 'k', 'cathode (section 1)'],
      [9, 'hct', 'heater centre tap'],
    ]),
    ties: [],
    notes: 'Twin high-mu triode (basing 9A). 12.6 V 0.15 A across pins 4–5, or 6.3 V 0.3 A with 4 and 5 joined against 9.',
  },
  {
    // pinout from memory — check against a tube manual (the unused pins are entered IC, the safe side)
    designation: 'EL84',
    base: 'noval',
    heating: 'indirect',
    heaterVolts: 6.3,
    heaterAmps: 0.76,
    pins: pins([
      [1, 'IC', 'internal connection'],
      [2, 'g1', 'grid 1'],
      [3, 'k', 'cathode, grid 3'],
      [4, 'h', 'heater'],
      [5, 'h', 'heater'],
      [6, 'IC', 'internal connection'],
      [7, 'p', 'plate'],
      [8, 'IC', 'internal connection'],
      [9, 'g2', 'grid 2 (screen)'],
    ]),
    ties: [],
    notes: 'Output pentode (US equivalent 6BQ5, basing 9CV).',
  },
  {
    // pinout from memory — check against a tube manual (the unused pins are entered IC, the safe side)
    designation: 'EZ81',
    base: 'noval',
    heating: 'indirect',
    heaterVolts: 6.3,
    heaterAmps: 1,
    pins: pins([
      [1, 'p', 'plate 2'],
      [2, 'IC', 'internal connection'],
      [3, 'k', 'cathode'],
      [4, 'h', 'heater'],
      [5, 'h', 'heater'],
      [6, 'IC', 'internal connection'],
      [7, 'p', 'plate 1'],
      [8, 'IC', 'internal connection'],
      [9, 'IC', 'internal connection'],
    ]),
    ties: [],
    notes: 'Full-wave rectifier, indirectly heated (US equivalent 6CA4).',
  },
];

/** The demo tube types keyed by designation, as the chassis network takes them. */
export function demoTubeTypeMap(): Map<string, TubeTypeRecord> {
  return new Map(DEMO_TUBE_TYPES.map((t) => [t.designation, t]));
}
