/**
 * Generated inputs for the bench: a meter profile, a 400-reading survey without a network, and
 * random connected chassis networks. Seeded, so every run measures the same work. The values are
 * invented; nothing here is service data of a real set.
 */
import type { MeterProfile } from '../../api/domain/meter';
import type { NetworkEdge } from '../../api/domain/network';
import { formatCode } from '../../api/domain/notation';
import { preferred } from '../../api/domain/preferred-values';
import type { VerdictRequest } from '../../api/domain/quick-check';
import type { AcceptanceRule } from '../../api/domain/verdict';
import type { ComponentKind, Method } from '../../api/domain/words';
import { intBelow, mulberry32, pick, type Rng } from './prng';

/**
 * A 2000-count handheld meter, ±(0.8 % + 2 digits), ±(1 % + 2) on the top range: the worked
 * meter of check-values.md §3 [CALC]. Full scale is the largest displayable value (1999 counts).
 */
export const DIGITAL_METER: MeterProfile = {
  kind: 'digital',
  autorange: true,
  leadOhms: 0.2,
  ranges: [
    { fullScaleOhms: 199.9, resolutionOhms: 0.1, pctOfReading: 0.8, counts: 2 },
    { fullScaleOhms: 1999, resolutionOhms: 1, pctOfReading: 0.8, counts: 2 },
    { fullScaleOhms: 19990, resolutionOhms: 10, pctOfReading: 0.8, counts: 2 },
    { fullScaleOhms: 199900, resolutionOhms: 100, pctOfReading: 0.8, counts: 2 },
    { fullScaleOhms: 1999000, resolutionOhms: 1000, pctOfReading: 1, counts: 2 },
  ],
};

/** The same meter switched by hand (OL then means "over this range"). */
export const MANUAL_METER: MeterProfile = { ...DIGITAL_METER, autorange: false } as MeterProfile;

/** The guarded rule (ILAC-G8 §4.2.3) with the template's band and near-limit at 0.75 of each side. */
export const GUARDED_RULE: AcceptanceRule = { decision: 'guarded', nearLimitFraction: 0.75, bandFrom: 'template' };

/** Log-uniform in [lo, hi], snapped to the E12 series (most parts in old sets are E12 values). */
export function e12Between(rng: Rng, lo: number, hi: number): number {
  const x = Math.exp(Math.log(lo) + rng() * (Math.log(hi) - Math.log(lo)));
  return preferred(x, 'E12').nearest;
}

/** How a technician types a reading: the letter code most of the time, sometimes `4.85k` style. */
function typed(rng: Rng, ohms: number): string {
  const r = rng();
  if (r < 0.5) return formatCode(Number(ohms.toPrecision(3)));
  if (r < 0.8) {
    if (ohms >= 1e6) return `${(ohms / 1e6).toPrecision(3)}M`;
    if (ohms >= 1e3) return `${(ohms / 1e3).toPrecision(3)}k`;
    return `${ohms.toPrecision(3)}`;
  }
  return `${ohms.toPrecision(4)} ohm`;
}

/**
 * A 400-reading survey as the API's `POST /api/calc/verdict` would receive it, one request per
 * reading: expected values from E12 across 10 Ω … 2.2 MΩ at ±10 % and ±20 % (a few ±5 % and
 * asymmetric or critical bands), readings drifted mostly upward with a few opens, OL, shorts and
 * the other reading states, some expected `open`/`short`, heaters and windings (continuity), a
 * mix of methods, the digital meter (a few on the manual-range twin with a recorded range), the
 * guarded rule for about half of them and the simple rule for the rest.
 */
export function surveyRequests(count = 400, seed = 0x5eed01): VerdictRequest[] {
  const rng = mulberry32(seed);
  const out: VerdictRequest[] = [];
  const methods: Method[] = ['in-circuit', 'lead-lifted', 'out-of-circuit'];
  for (let i = 0; i < count; i++) {
    const roll = rng();
    const rule: AcceptanceRule = i % 2 === 0 ? GUARDED_RULE : { decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'template' };
    const base = { rule, meter: DIGITAL_METER, method: pick(rng, methods) };
    if (roll < 0.03) {
      // Expected open (a coupling capacitor's path, a switch open in this position).
      out.push({ ...base, expected: 'open', reading: pick(rng, ['OL', 'open', '25M', '1M5']) });
      continue;
    }
    if (roll < 0.06) {
      // Expected short (a tie, a closed switch).
      out.push({ ...base, expected: 'short', reading: pick(rng, ['0R2', '0.4', 'short', '3R3']) });
      continue;
    }
    if (roll < 0.12) {
      // Heaters, lamps and windings: continuity verdicts.
      const kind: ComponentKind = pick(rng, ['heater', 'lamp', 'winding'] as const);
      const nominal = kind === 'winding' ? e12Between(rng, 10, 1000) : e12Between(rng, 2, 200);
      const reading = rng() < 0.1 ? 'OL' : typed(rng, nominal * (0.3 + rng()));
      out.push({ ...base, kind, expected: nominal, reading });
      continue;
    }
    const nominal = e12Between(rng, 10, 2.2e6);
    const req: VerdictRequest = { ...base, expected: nominal, reading: '', kind: pick(rng, ['carbon-composition', 'carbon-composition', 'carbon-film', 'wirewound'] as const) };
    const tolRoll = rng();
    if (tolRoll < 0.45) req.tolerancePct = 10;
    else if (tolRoll < 0.85) req.tolerancePct = 20;
    else if (tolRoll < 0.92) req.tolerancePct = 5;
    else req.band = { lowPct: -10, highPct: 20 };
    if (rng() < 0.05) req.critical = { lowPct: -5, highPct: 5 };
    const s = rng();
    if (s < 0.03) req.reading = pick(rng, ['OL', 'open', '∞']);
    else if (s < 0.05) req.reading = 'short';
    else if (s < 0.07) req.reading = pick(rng, ['climbing', 'unstable', 'no-access']);
    else {
      // Composition parts drift mostly upward; a few far out.
      const drift = rng() < 0.15 ? 0.2 + rng() * 0.6 : -0.08 + rng() * 0.3;
      req.reading = typed(rng, nominal * (1 + drift));
    }
    if (rng() < 0.05) {
      // Manual ranging with the range recorded (OL is then "over this range").
      req.meter = MANUAL_METER;
      req.rangeIndex = Math.min(4, Math.max(0, Math.ceil(Math.log10(nominal / 199.9)) + (rng() < 0.3 ? -1 : 0)));
    }
    out.push(req);
  }
  return out;
}

/**
 * A random connected network of `nodes` nodes and about 1.5 × nodes edges: a ladder/tree
 * backbone (each node joined to one of the few nodes before it, so chains and branches as in a
 * chassis) plus extra edges between random pairs (parallel paths, feedback, bias networks).
 * Values E12 from 10 Ω to 2.2 MΩ (log-uniform), tolerance ±10 % or ±20 %. Node n0 is `chassis`.
 */
export function randomNetwork(nodes: number, edges = Math.round(nodes * 1.5), seed = 0xc4a551 + nodes): NetworkEdge[] {
  const rng = mulberry32(seed);
  const name = (k: number) => (k === 0 ? 'chassis' : `n${k}`);
  const out: NetworkEdge[] = [];
  const seen = new Set<string>();
  const add = (u: number, v: number): boolean => {
    const key = u < v ? `${u}-${v}` : `${v}-${u}`;
    if (u === v || seen.has(key)) return false;
    seen.add(key);
    out.push({ id: `R${out.length + 1}`, a: name(u), b: name(v), ohms: e12Between(rng, 10, 2.2e6), kind: 'carbon-composition', tolerancePct: rng() < 0.6 ? 10 : 20 });
    return true;
  };
  for (let k = 1; k < nodes; k++) add(k, Math.max(0, k - 1 - intBelow(rng, 4)));
  while (out.length < edges) add(intBelow(rng, nodes), intBelow(rng, nodes));
  return out;
}
