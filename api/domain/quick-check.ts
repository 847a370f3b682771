/**
 * The quick check: text as typed → parsed reading → verdict, and the in-circuit analysis with a
 * meter's U. One composition used by `POST /api/calc/verdict`, `POST /api/calc/network` and the
 * browser's quick-check page, so both always compute the same answer.
 * Pure TypeScript: no framework or Node-only imports.
 */
import { analyseInCircuit, type InCircuitInput, type InCircuitResult } from './in-circuit';
import { expandedUncertainty, inferRange, meterProblems, type MeterProfile } from './meter';
import { parseResistance } from './notation';
import { judge, VerdictInputError, type VerdictInput, type VerdictResult } from './verdict';
import type { ReadingState } from './words';

/** A problem with the request, naming the field (the API answers 400 with it). */
export class QuickCheckError extends Error {
  constructor(
    readonly field: string,
    message: string,
  ) {
    super(message);
  }
}

export type VerdictRequest = Omit<VerdictInput, 'reading'> & {
  /** As typed (`4k7`, `OL`, `open`) or a number of ohms. */
  reading: string | number;
  /** Year of the service data, for the pre-1950 bare-M warning. */
  serviceDataYear?: number;
};

export type VerdictResponse = VerdictResult & {
  /** The reading as understood: state, ohms, how a technician writes it, and parse warnings. */
  reading: { state: ReadingState; ohms: number | null; display: string; warnings: string[]; notes: string[] };
};

function resolutionFor(meter: MeterProfile | undefined, ohms: number | null, rangeIndex?: number): number | undefined {
  if (!meter || meter.kind !== 'digital' || !meter.ranges.length) return undefined;
  const i = rangeIndex ?? (ohms !== null && ohms >= 0 ? inferRange(meter, ohms) : 0);
  return meter.ranges[Math.max(0, Math.min(meter.ranges.length - 1, i))]?.resolutionOhms;
}

/** Parses the reading and judges it. Throws QuickCheckError on bad input. */
export function checkReading(req: VerdictRequest): VerdictResponse {
  let reading: VerdictResponse['reading'];
  if (typeof req.reading === 'number') {
    if (!Number.isFinite(req.reading)) throw new QuickCheckError('reading', 'reading must be a finite number of ohms, or text such as 4k7, OL or open');
    if (req.reading < 0) throw new QuickCheckError('reading', 'reading is negative: type it as text (e.g. "-0.1") so a small negative can count as a short');
    const parsed = parseResistance(String(req.reading) + ' Ω');
    reading = { state: 'value', ohms: req.reading, display: parsed.ok ? parsed.display : String(req.reading), warnings: [], notes: [] };
  } else {
    const parsed = parseResistance(req.reading, {
      serviceDataYear: req.serviceDataYear,
      leadOhms: req.meter?.leadOhms,
      resolutionOhms: resolutionFor(req.meter, 0, req.rangeIndex),
    });
    if (!parsed.ok) throw new QuickCheckError('reading', parsed.message);
    reading = { state: parsed.state, ohms: parsed.ohms, display: parsed.display, warnings: parsed.warnings, notes: parsed.notes };
  }
  try {
    // Fields copied one by one (no object rest/spread: this runs for every reading of a survey).
    const input: VerdictInput = {
      expected: req.expected,
      reading: { state: reading.state, ohms: reading.ohms },
      tolerancePct: req.tolerancePct,
      band: req.band,
      critical: req.critical,
      kind: req.kind,
      method: req.method,
      rangeIndex: req.rangeIndex,
      rule: req.rule,
      meter: req.meter,
      thresholds: req.thresholds,
    };
    const result = judge(input) as VerdictResponse;
    result.reading = reading;
    return result;
  } catch (e) {
    if (e instanceof VerdictInputError) {
      const first = e.problems[0];
      throw new QuickCheckError(first?.field ?? 'body', first?.message ?? e.message);
    }
    throw e;
  }
}

export type NetworkRequest = InCircuitInput & {
  /** Instead of uncertaintyOhms: U at the reading from this meter. */
  meter?: MeterProfile;
  rangeIndex?: number;
};

/** The in-circuit analysis; U from `uncertaintyOhms`, or from `meter` at the reading. */
export function checkNetwork(req: NetworkRequest): InCircuitResult {
  const { meter, rangeIndex, ...input } = req;
  if (meter && input.uncertaintyOhms !== undefined) throw new QuickCheckError('meter', 'give either uncertaintyOhms or meter, not both');
  if (meter) {
    const problem = meterProblems(meter)[0];
    if (problem) throw new QuickCheckError(problem.field, problem.message);
  }
  if (meter && input.readingOhms !== undefined && Number.isFinite(input.readingOhms)) {
    const U = expandedUncertainty(meter, input.readingOhms, rangeIndex);
    if (!Number.isFinite(U)) {
      throw new QuickCheckError('meter', 'this meter cannot bound the reading on that range (too far up the analogue scale): read it on a range with a higher centre value');
    }
    input.uncertaintyOhms = U;
  }
  return analyseInCircuit(input);
}
