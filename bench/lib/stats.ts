/** Timing helpers and the figure lines the bench prints (one JSON object per line on stdout). */
import { performance } from 'node:perf_hooks';

export interface Figure {
  figure: string;
  value: number;
  unit: string;
  /** The target the value must not exceed; null for a figure given for information. */
  target: number | null;
  /** Where the target comes from, when there is one. */
  source?: string;
  /** false for an aim that is reported but does not fail `--check`. */
  gating?: boolean;
  [extra: string]: unknown;
}

export interface Timing {
  medianMs: number;
  p95Ms: number;
  minMs: number;
  /** Median CPU time of the process per call (process.cpuUsage: user + system, GC threads included): a diagnostic for a busy machine, where wall time also counts the time spent waiting for a core. */
  cpuMedianMs: number;
  iterations: number;
}

/** Progress and notes go to stderr so that stdout stays figure lines (and PASS/FAIL lines). */
export const progress = (s: string): void => void process.stderr.write(`[bench] ${s}\n`);

export function quantile(sorted: readonly number[], q: number): number {
  if (sorted.length === 0) return Number.NaN;
  const pos = (sorted.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return sorted[lo] + (sorted[hi] - sorted[lo]) * (pos - lo);
}

/** Values that the optimiser cannot prove unused. */
let sink = 0;
export const consume = (x: unknown): void => {
  sink = (sink + (typeof x === 'number' ? x : x === null || x === undefined ? 0 : 1)) % 1e9;
};
export const sinkValue = (): number => sink;

/**
 * Runs `fn` for a warm-up time, then times single calls until `minIterations` calls and
 * `minMs` of measured time are both reached (capped at `maxIterations`). Median and p95 of the
 * per-call times.
 */
export function timeIt(fn: () => unknown, opts: { warmupMs?: number; minMs?: number; minIterations?: number; maxIterations?: number } = {}): Timing {
  const warmupMs = opts.warmupMs ?? 300;
  const minMs = opts.minMs ?? 1500;
  const minIterations = opts.minIterations ?? 50;
  const maxIterations = opts.maxIterations ?? 200_000;
  const w0 = performance.now();
  while (performance.now() - w0 < warmupMs) consume(fn());
  const samples: number[] = [];
  const cpu: number[] = [];
  let total = 0;
  while ((samples.length < minIterations || total < minMs) && samples.length < maxIterations) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    consume(fn());
    const dt = performance.now() - t0;
    const c = process.cpuUsage(c0);
    samples.push(dt);
    cpu.push((c.user + c.system) / 1000);
    total += dt;
  }
  samples.sort((a, b) => a - b);
  cpu.sort((a, b) => a - b);
  return { medianMs: quantile(samples, 0.5), p95Ms: quantile(samples, 0.95), minMs: samples[0], cpuMedianMs: quantile(cpu, 0.5), iterations: samples.length };
}

export const round = (x: number, digits = 3): number => (Number.isFinite(x) ? Number(x.toPrecision(digits + 1)) : x);
