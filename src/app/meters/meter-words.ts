import type { MeterProfile } from '@domain/meter';
import { formatOhms } from '@domain/notation';

/** `5 ranges, 199.9 Ω … 1.999 MΩ, ±(0.8 % + 2)` or `6 ranges, centre 10 Ω … 100 kΩ, 3 % of arc`. */
export function rangesText(p: MeterProfile): string {
  const n = `${p.ranges.length} range${p.ranges.length === 1 ? '' : 's'}`;
  if (p.ranges.length === 0) return n;
  if (p.kind === 'digital') {
    const fs = p.ranges.map((r) => r.fullScaleOhms);
    const first = p.ranges[0];
    return `${n}, ${formatOhms(Math.min(...fs))} … ${formatOhms(Math.max(...fs))}, ±(${first.pctOfReading} % + ${first.counts})${p.autorange ? ', autorange' : ''}`;
  }
  const cs = p.ranges.map((r) => r.centreOhms);
  return `${n}, centre ${formatOhms(Math.min(...cs))} … ${formatOhms(Math.max(...cs))}, ${+(p.ranges[0].arcFraction * 100).toPrecision(6)} % of arc`;
}
