/**
 * A complete survey's points in its set's history (GET /api/sets/:id/history): each current
 * reading of a part, evaluated by the survey's grid — the in-circuit ones through the network,
 * which is most of the route's work (a set of ten 400-point surveys is 2,500 evaluations, and
 * under load the grid's own memo, shared by every survey of the chassis, cannot hold them).
 *
 * So the points of a survey are kept, by survey id, under a key made of everything they are
 * computed from: the grid's inputs (template version, the set's deviations, meter, rule,
 * conditions), the joint checks, and every field of every reading of the survey that the points
 * or the choice of current readings read. The readings are read from PostgreSQL on every request
 * anyway; a new reading, an amendment, a correction or any other change to them (or to the
 * survey or the set's deviations) gives another key, and the points are computed again. Nothing
 * is invalidated by hand, so nothing can be forgotten. (Like the grid cache, a tube-type library
 * edit is not seen until the process restarts: api/surveys/survey-view.ts.)
 *
 * Bounded: at most POINTS_CACHE_MAX surveys, least recently used first out (measured on the
 * bench's scaled database: about 60 kB of heap per survey of 250 readings, so 30 MB at most).
 */
import { createHash } from 'node:crypto';
import type { HistoryPointInput } from '../domain/part-history';
import type { SurveyGrid } from '../domain/survey-grid';
import type { SetRow } from '../sets/sets.repository';
import { currentReadings } from '../surveys/survey-view';
import type { MeterSnapshot, SurveyRow } from '../surveys/surveys.repository';
import type { HistoryReading } from './records.repository';

export interface SurveyPoint {
  componentKey: string;
  ref: string;
  point: HistoryPointInput;
}

export const POINTS_CACHE_MAX = 512;
const cache = new Map<number, { key: string; points: readonly SurveyPoint[] }>();

/** Counts since the process started (the spec reads them to tell a computed answer from a kept one). */
export const pointsCacheStats = { computed: 0, reused: 0 };

/** The key of a survey's points: a digest of every input they are computed from. */
function pointsKey(survey: SurveyRow, set: Pick<SetRow, 'deviations'>, readings: readonly HistoryReading[]): string {
  const h = createHash('sha256');
  h.update(JSON.stringify([survey.templateVersionId, set.deviations, survey.meter, survey.rule, survey.conditions, survey.jointChecks]));
  const lines: string[] = [];
  for (const r of readings) {
    lines.push(`${r.id}\t${r.testPointKey}\t${r.followsReadingId}\t${r.text}\t${r.state}\t${r.ohms}\t${r.method}\t${r.liftedEnd}\t${r.rangeIndex}\t${r.takenAt}`);
  }
  h.update(lines.join('\n'));
  return h.digest('base64');
}

/**
 * The history points of one complete survey, in the order of its current readings: computed with
 * `grid` (the survey's grid) or, when nothing they come from has changed, the ones kept. The
 * points are shared between answers: callers copy, never change them.
 */
export async function surveyPoints(
  survey: SurveyRow,
  set: Pick<SetRow, 'deviations'>,
  readings: readonly HistoryReading[],
  grid: () => Promise<SurveyGrid>,
): Promise<readonly SurveyPoint[]> {
  const key = pointsKey(survey, set, readings);
  const kept = cache.get(survey.id);
  if (kept !== undefined && kept.key === key) {
    cache.delete(survey.id);
    cache.set(survey.id, kept);
    pointsCacheStats.reused++;
    return kept.points;
  }
  const points = computePoints(survey, readings, await grid());
  cache.delete(survey.id);
  cache.set(survey.id, { key, points });
  if (cache.size > POINTS_CACHE_MAX) cache.delete(cache.keys().next().value!);
  pointsCacheStats.computed++;
  return points;
}

/** One string per enum word (the driver makes a new one per row), one band object per grid row. */
const words = new Map<string, string>();
const word = <T extends string>(w: T): T => {
  const had = words.get(w);
  if (had !== undefined) return had as T;
  if (words.size < 256) words.set(w, w);
  return w;
};
const bands = new WeakMap<object, { lowPct: number; highPct: number }>();
function bandOf(band: { lowPct: number; highPct: number }): { lowPct: number; highPct: number } {
  let b = bands.get(band);
  if (b === undefined) {
    b = { lowPct: band.lowPct, highPct: band.highPct };
    bands.set(band, b);
  }
  return b;
}

function computePoints(survey: SurveyRow, readings: readonly HistoryReading[], grid: SurveyGrid): SurveyPoint[] {
  const meter = (survey.meter as MeterSnapshot | null)?.name ?? null;
  const jointChecks = survey.jointChecks as Record<string, unknown>;
  const out: SurveyPoint[] = [];
  for (const [key, r] of currentReadings(readings)) {
    const row = grid.row(key);
    if (!row || row.kind !== 'component-check' || !row.component || row.excluded) continue;
    const nominalOhms = row.expected && 'ohms' in row.expected ? row.expected.ohms : null;
    const ev = grid.evaluate(r, { jointChecked: key in jointChecks });
    // In circuit, where the network gives the part's implied value, the point is that value; its
    // uncertainty is half its honest interval (the meter's U and the other parts' tolerances, DESIGN.md §3.5).
    const implied = r.method === 'in-circuit' && ev.implied?.ohms != null ? ev.implied : null;
    const half = implied && implied.lowOhms !== null && implied.highOhms !== null ? (implied.highOhms - implied.lowOhms) / 2 : null;
    out.push({
      componentKey: row.component.key,
      ref: row.component.ref,
      point: {
        surveyId: survey.id,
        readingId: r.id,
        at: r.takenAt,
        state: word(r.state),
        ohms: implied ? implied.ohms : r.ohms,
        valueFrom: implied ? 'implied' : 'reading',
        nominalOhms,
        uncertaintyOhms: implied ? half : ev.uncertaintyOhms,
        band: row.band ? bandOf(row.band) : null,
        verdict: ev.verdict,
        method: word(r.method),
        meter,
      },
    });
  }
  return out;
}
