/**
 * Copper temperature correction for windings (DESIGN.md §3.10): IEC 60028 (International
 * standard of resistance for copper) gives the temperature coefficient of annealed copper at
 * 20 °C as 0.00393 per kelvin, so R_T = R₂₀ [1 + 0.00393 (T − 20 °C)] (check-values.md §5) [STD].
 * Template values are at 20 °C unless recorded otherwise.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */

/** Temperature coefficient of resistance of annealed copper at 20 °C, per kelvin (IEC 60028). */
export const COPPER_ALPHA_20 = 0.00393;

/** The reference temperature of IEC 60028 and of template values, °C. */
export const COPPER_REFERENCE_C = 20;

function factor(tempC: number): number {
  if (!Number.isFinite(tempC)) throw new RangeError(`a temperature in °C is needed, not ${String(tempC)}`);
  const f = 1 + COPPER_ALPHA_20 * (tempC - COPPER_REFERENCE_C);
  // The linear law reaches zero near −234.5 °C; it is meant for bench and operating temperatures.
  if (f <= 0) throw new RangeError(`${tempC} °C is outside the range of the linear copper law`);
  return f;
}

function checkOhms(ohms: number, name: string): void {
  if (!Number.isFinite(ohms) || ohms < 0) throw new RangeError(`${name} must be a resistance of zero or more, not ${String(ohms)}`);
}

/** Resistance at tempC of a copper winding that measures r20 at 20 °C. */
export function copperResistanceAt(r20: number, tempC: number): number {
  checkOhms(r20, 'r20');
  return r20 * factor(tempC);
}

/** Resistance at 20 °C of a copper winding that measures rT at tempC. */
export function copperResistanceTo20(rT: number, tempC: number): number {
  checkOhms(rT, 'rT');
  return rT / factor(tempC);
}
