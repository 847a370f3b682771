/**
 * Tube base geometry for drawing a socket as a BOTTOM view (the wiring side) and for knowing how
 * many pins a base has.
 *
 * Convention of this table: angles in degrees, measured clockwise from 12 o'clock, seen from the
 * bottom, with the base's reference (the gap of a miniature base, the key of an octal or loctal
 * base, the middle between the two heavier heater pins of an old large base) at 12 o'clock.
 * Pins are numbered clockwise seen from the bottom, starting after the reference [SEC:
 * encyclopedia article "Tube socket"; RCA Receiving Tube Manual, basing diagrams key — as given
 * in check-values.md §5]: 7-pin miniature gap between pins 7 and 1; noval gap between 9 and 1;
 * octal and loctal key between 8 and 1; old large 4-, 5-, 6- and 7-pin bases have no key, the two
 * heavier heater pins are the reference (pins 1 and 4 on the 4-pin base [SEC][MEM]).
 *
 * Sizes (pin circle and pin diameters, millimetres) are for drawing only and from memory [MEM];
 * the pin positions of the old large bases are drawn on a circle, which is approximate.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import { BASE_NAMES, type BaseName } from './template-format';

export { BASE_NAMES, type BaseName } from './template-format';

/** What marks the reference of a base. */
export type ReferenceKind = 'gap' | 'key' | 'heavy-pins';

export interface PinPosition {
  pin: number;
  /** Degrees clockwise from 12 o'clock, seen from the bottom. */
  angleDeg: number;
  /** Pin diameter for drawing, mm. */
  diameterMm: number;
  /** One of the heavier (heater) pins of an old large base. */
  heavy: boolean;
}

export interface BaseGeometry {
  name: BaseName;
  /** Words for the screen. */
  label: string;
  pinCount: number;
  reference: ReferenceKind;
  /** Where the reference sits: the gap's middle, the key's direction, between the heavy pins. */
  referenceAngleDeg: number;
  /** Angular width of the gap (gap bases only), degrees. */
  gapWidthDeg: number | null;
  /** Pin circle diameter, mm (drawing only, [MEM]). */
  pinCircleMm: number;
  /** Pins in numbering order. */
  pins: PinPosition[];
  /** The heavier heater pins (old large bases); empty elsewhere. */
  heavyPins: number[];
  /** Overall base diameter for drawing, mm ([MEM]). */
  outlineMm: number;
}

/**
 * A miniature base: `positions` equally spaced positions, one left empty as the gap at 12 o'clock;
 * pin 1 is the first position clockwise after the gap.
 */
function gapBase(name: BaseName, label: string, positions: number, pinCircleMm: number, pinMm: number, outlineMm: number): BaseGeometry {
  const step = 360 / positions;
  const pins = Array.from({ length: positions - 1 }, (_, i) => ({ pin: i + 1, angleDeg: step * (i + 1), diameterMm: pinMm, heavy: false }));
  return { name, label, pinCount: positions - 1, reference: 'gap', referenceAngleDeg: 0, gapWidthDeg: 2 * step, pinCircleMm, pins, heavyPins: [], outlineMm };
}

/** An octal-style base: 8 pins equally spaced, the key at 12 o'clock between pins 8 and 1. */
function keyBase(name: BaseName, label: string, pinCircleMm: number, pinMm: number, outlineMm: number): BaseGeometry {
  const pins = Array.from({ length: 8 }, (_, i) => ({ pin: i + 1, angleDeg: 22.5 + 45 * i, diameterMm: pinMm, heavy: false }));
  return { name, label, pinCount: 8, reference: 'key', referenceAngleDeg: 0, gapWidthDeg: null, pinCircleMm, pins, heavyPins: [], outlineMm };
}

/**
 * An old large base without a key: `count` pins on a circle, the two heavier heater pins (1 and
 * `count`) either side of 12 o'clock, numbered clockwise from pin 1 [SEC][MEM]. Drawn equally
 * spaced, which is approximate.
 */
function heavyPinBase(name: BaseName, label: string, count: number, pinCircleMm: number, pinMm: number, heavyMm: number, outlineMm: number): BaseGeometry {
  const step = 360 / count;
  const pins = Array.from({ length: count }, (_, i) => {
    const pin = i + 1;
    const heavy = pin === 1 || pin === count;
    return { pin, angleDeg: step / 2 + step * i, diameterMm: heavy ? heavyMm : pinMm, heavy };
  });
  return { name, label, pinCount: count, reference: 'heavy-pins', referenceAngleDeg: 0, gapWidthDeg: null, pinCircleMm, pins, heavyPins: [1, count], outlineMm };
}

/** The base-geometry table, keyed by base name (the `base` of a tube-type record). */
export const BASE_GEOMETRIES: Readonly<Record<BaseName, BaseGeometry>> = {
  // Sizes [MEM]: 7-pin miniature pin circle 9.53 mm, pins 1.02 mm; noval 11.89 mm, 1.02 mm.
  'miniature-7': gapBase('miniature-7', '7-pin miniature', 8, 9.53, 1.02, 19),
  noval: gapBase('noval', 'noval (9-pin miniature)', 10, 11.89, 1.02, 22),
  magnoval: gapBase('magnoval', 'magnoval', 10, 17.45, 1.27, 29),
  // Octal pin circle 17.45 mm, pins 2.36 mm; loctal pin circle about 14.3 mm, pins 1.27 mm [MEM].
  octal: keyBase('octal', 'octal', 17.45, 2.36, 33),
  loctal: keyBase('loctal', 'loctal', 14.3, 1.27, 29),
  // Old large bases: pins 3.18 mm, heater pins 3.97 mm [MEM].
  'large-4': heavyPinBase('large-4', 'large 4-pin', 4, 22, 3.18, 3.97, 34),
  'large-5': heavyPinBase('large-5', 'large 5-pin', 5, 22, 3.18, 3.97, 34),
  'large-6': heavyPinBase('large-6', 'large 6-pin', 6, 22, 3.18, 3.97, 34),
  'large-7-small': heavyPinBase('large-7-small', 'large 7-pin (small)', 7, 19, 2.36, 3.18, 30),
  'large-7-large': heavyPinBase('large-7-large', 'large 7-pin (large)', 7, 24, 3.18, 3.97, 38),
};

export function isBaseName(name: string): name is BaseName {
  return (BASE_NAMES as readonly string[]).includes(name);
}

/** The geometry of a base; undefined for an unknown name. */
export function baseGeometry(name: string): BaseGeometry | undefined {
  return isBaseName(name) ? BASE_GEOMETRIES[name] : undefined;
}

/**
 * Drawing coordinates of a pin on a unit pin circle (x right, y down, as in SVG), seen from the
 * bottom: angle 0 at the top, growing clockwise.
 */
export function pinXY(angleDeg: number, radius = 1): { x: number; y: number } {
  const t = (angleDeg * Math.PI) / 180;
  return { x: radius * Math.sin(t), y: -radius * Math.cos(t) };
}
