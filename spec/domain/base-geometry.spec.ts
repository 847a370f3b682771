/**
 * The base-geometry table (api/domain/base-geometry.ts): pin counts, numbering clockwise seen
 * from the bottom after the gap or key, the heavier heater pins of old large bases.
 * Source of the conventions: check-values.md §5 — socket pins numbered clockwise seen from the
 * bottom [SEC: encyclopedia article "Tube socket"; RCA Receiving Tube Manual basing key].
 */
import { BASE_GEOMETRIES, BASE_NAMES, baseGeometry, isBaseName, pinXY, type BaseGeometry } from '../../api/domain/base-geometry';

/** Clockwise angular distance from a to b, degrees in [0, 360). */
const cw = (a: number, b: number): number => (((b - a) % 360) + 360) % 360;

/** The largest clockwise step between consecutive pins (last to first included) and where it is. */
function widestStep(g: BaseGeometry): { from: number; to: number; deg: number } {
  let best = { from: 0, to: 0, deg: -1 };
  g.pins.forEach((p, i) => {
    const q = g.pins[(i + 1) % g.pins.length];
    const d = cw(p.angleDeg, q.angleDeg);
    if (d > best.deg) best = { from: p.pin, to: q.pin, deg: d };
  });
  return best;
}

describe('base geometry', () => {
  it('has a geometry for every base name, under its own name', () => {
    for (const name of BASE_NAMES) expect(BASE_GEOMETRIES[name].name).toBe(name);
    expect(isBaseName('octal')).toBeTrue();
    expect(isBaseName('duodecal')).toBeFalse();
    expect(baseGeometry('noval')?.pinCount).toBe(9);
    expect(baseGeometry('B7G-unknown')).toBeUndefined();
  });

  it('knows the pin counts', () => {
    // common practice: 7-pin miniature, noval and magnoval 9, octal and loctal 8, old large bases by name
    const counts: Record<string, number> = {
      'miniature-7': 7,
      noval: 9,
      magnoval: 9,
      octal: 8,
      loctal: 8,
      'large-4': 4,
      'large-5': 5,
      'large-6': 6,
      'large-7-small': 7,
      'large-7-large': 7,
    };
    for (const name of BASE_NAMES) {
      const g = BASE_GEOMETRIES[name];
      expect(g.pinCount).withContext(name).toBe(counts[name]);
      expect(g.pins.map((p) => p.pin)).withContext(name).toEqual(Array.from({ length: counts[name] }, (_, i) => i + 1));
    }
  });

  it('numbers the pins clockwise seen from the bottom (angles grow with the pin number)', () => {
    // check-values.md §5: clockwise seen from the bottom [SEC]
    for (const name of BASE_NAMES) {
      const angles = BASE_GEOMETRIES[name].pins.map((p) => p.angleDeg);
      for (let i = 1; i < angles.length; i++) expect(angles[i]).withContext(`${name} pin ${i + 1}`).toBeGreaterThan(angles[i - 1]);
      expect(angles[0]).toBeGreaterThan(0);
      expect(angles[angles.length - 1]).toBeLessThan(360);
    }
  });

  it('puts the 7-pin miniature gap between pins 7 and 1, and the noval gap between 9 and 1', () => {
    // check-values.md §5 [SEC: "Tube socket"; RCA basing key]
    const mini = BASE_GEOMETRIES['miniature-7'];
    expect(mini.reference).toBe('gap');
    expect(widestStep(mini)).toEqual({ from: 7, to: 1, deg: 90 });
    const noval = BASE_GEOMETRIES.noval;
    expect(widestStep(noval)).toEqual({ from: 9, to: 1, deg: 72 });
    // the gap straddles the reference direction (12 o'clock)
    expect(cw(noval.pins[8].angleDeg, noval.referenceAngleDeg)).toBeCloseTo(36, 9);
    expect(cw(noval.referenceAngleDeg, noval.pins[0].angleDeg)).toBeCloseTo(36, 9);
  });

  it('puts the octal and loctal key between pins 8 and 1, the pins evenly spaced', () => {
    // check-values.md §5 [SEC]
    for (const name of ['octal', 'loctal'] as const) {
      const g = BASE_GEOMETRIES[name];
      expect(g.reference).toBe('key');
      expect(g.gapWidthDeg).toBeNull();
      const key = g.referenceAngleDeg;
      expect(cw(g.pins[7].angleDeg, key)).toBeCloseTo(22.5, 9);
      expect(cw(key, g.pins[0].angleDeg)).toBeCloseTo(22.5, 9);
      for (let i = 1; i < 8; i++) expect(cw(g.pins[i - 1].angleDeg, g.pins[i].angleDeg)).toBeCloseTo(45, 9);
    }
  });

  it('marks the two heavier heater pins as the reference of old large bases: pins 1 and 4 on the 4-pin base', () => {
    // check-values.md §5: 4-pin base heater pins 1 and 4 [SEC][MEM]
    const four = BASE_GEOMETRIES['large-4'];
    expect(four.reference).toBe('heavy-pins');
    expect(four.heavyPins).toEqual([1, 4]);
    expect(four.pins.filter((p) => p.heavy).map((p) => p.pin)).toEqual([1, 4]);
    const heavy = four.pins.find((p) => p.pin === 1)!;
    const light = four.pins.find((p) => p.pin === 2)!;
    expect(heavy.diameterMm).toBeGreaterThan(light.diameterMm);
    // the heavy pins straddle the reference: 4 just before it, 1 just after, clockwise
    expect(widestStep(four).deg).toBeCloseTo(90, 9);
    expect(cw(four.pins[3].angleDeg, four.referenceAngleDeg)).toBeLessThan(90);
    expect(cw(four.referenceAngleDeg, four.pins[0].angleDeg)).toBeLessThan(90);
    // 5-, 6- and 7-pin large bases: heater pins first and last [MEM, e.g. types 27, 6D6, 6A7]
    expect(BASE_GEOMETRIES['large-5'].heavyPins).toEqual([1, 5]);
    expect(BASE_GEOMETRIES['large-6'].heavyPins).toEqual([1, 6]);
    expect(BASE_GEOMETRIES['large-7-small'].heavyPins).toEqual([1, 7]);
  });

  it('has no heavy pins on keyed and gapped bases', () => {
    for (const name of ['miniature-7', 'noval', 'magnoval', 'octal', 'loctal'] as const) {
      expect(BASE_GEOMETRIES[name].heavyPins).withContext(name).toEqual([]);
      expect(BASE_GEOMETRIES[name].pins.some((p) => p.heavy)).withContext(name).toBeFalse();
    }
  });

  it('draws clockwise in SVG coordinates (y down): 90° is to the right, 180° at the bottom', () => {
    const right = pinXY(90);
    expect(right.x).toBeCloseTo(1, 12);
    expect(right.y).toBeCloseTo(0, 12);
    const top = pinXY(0, 2);
    expect(top.y).toBeCloseTo(-2, 12);
    const bottom = pinXY(180);
    expect(bottom.y).toBeCloseTo(1, 12);
    // noval pin 1 sits right of the gap, pin 9 left of it (seen from the bottom)
    const noval = BASE_GEOMETRIES.noval;
    expect(pinXY(noval.pins[0].angleDeg).x).toBeGreaterThan(0);
    expect(pinXY(noval.pins[8].angleDeg).x).toBeLessThan(0);
  });
});
