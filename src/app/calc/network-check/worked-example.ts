import type { EdgeRowValue } from './network-request';

/**
 * The worked example a first visit sees (invented amplifier, real tube type). A 6SJ7 pentode
 * stage: plate load R5 100 kΩ from the plate (V1.8) to the decoupled supply B+2; the screen
 * (V1.6) fed from B+2 by R6 470 kΩ and held down by R7 220 kΩ to chassis (a screen divider),
 * bypassed by C4; B+2 decoupled from B+1 by R8 22 kΩ, and a 47 kΩ bleeder R9 from B+1 to
 * chassis (about 1.9 W at 300 V: a 5 W wirewound part). Octal pins of the 6SJ7 from memory:
 * 6 screen, 8 plate.
 *
 * R6 is checked in circuit across its own leads: the meter also reads the path back through
 * R7, the chassis, R9 and R8 (289 kΩ), so a healthy R6 reads only 179 kΩ. The reading of 205 kΩ
 * is what an R6 drifted up to about 705 kΩ gives.
 */
export const WORKED_EXAMPLE: {
  readonly rows: readonly EdgeRowValue[];
  readonly from: string;
  readonly to: string;
  readonly partId: string;
  readonly reading: string;
} = {
  rows: [
    { id: 'R5', a: 'V1.8', b: 'B+2', ohms: '100k', kind: 'carbon-composition', tolerance: '10' },
    { id: 'R6', a: 'V1.6', b: 'B+2', ohms: '470k', kind: 'carbon-composition', tolerance: '10' },
    { id: 'R7', a: 'V1.6', b: 'chassis', ohms: '220k', kind: 'carbon-composition', tolerance: '10' },
    { id: 'C4', a: 'V1.6', b: 'chassis', ohms: '', kind: 'capacitor', tolerance: '' },
    { id: 'R8', a: 'B+2', b: 'B+1', ohms: '22k', kind: 'carbon-composition', tolerance: '10' },
    { id: 'R9', a: 'B+1', b: 'chassis', ohms: '47k', kind: 'wirewound', tolerance: '10' },
  ],
  from: 'V1.6',
  to: 'B+2',
  partId: 'R6',
  reading: '205k',
};
