/**
 * A student's attempt side by side with the reference survey (DESIGN.md §3.9 "Scoring"): per test
 * point the student's current reading with its verdict and U (the survey grid), the reference's,
 * their comparison by E_n (api/domain/review.ts), the prediction and its error and the feedback
 * hints. Used by the review (GET /api/attempts/:id/review) and the class results.
 */
import type { ReadingComparison, ReviewRow } from '../domain/class-format';
import { compareReadings, conditionDifferences, feedbackHints, predictionOf, type ComparedReading } from '../domain/review';
import type { ReadingEvaluation, ReadingRecord, SurveyConditions } from '../domain/set-format';
import type { GridRow, SurveyGrid } from '../domain/survey-grid';
import type { Tx } from '../db';
import type { MeterProfile } from '../domain/meter';
import { findSet } from '../sets/sets.repository';
import { currentReadings, gridOf, gridReadingOf, meterOf } from '../surveys/survey-view';
import type { SurveyRow } from '../surveys/surveys.repository';

/** One survey's side of a comparison: its readings (an attempt's frozen ones, or the survey's own), grid and conditions. */
export interface Side {
  grid: SurveyGrid;
  current: Map<string, ReadingRecord>;
  jointChecks: Readonly<Record<string, unknown>>;
  conditions: SurveyConditions;
  meterProfileId: number | null;
  meter: MeterProfile | null;
}

export async function sideOf(tx: Tx, survey: SurveyRow, readings: readonly ReadingRecord[], conditions?: SurveyConditions): Promise<Side> {
  const found = await findSet(tx, survey.setId, 0);
  const grid = await gridOf(tx, survey, found!.set);
  return {
    grid,
    current: currentReadings(readings),
    jointChecks: survey.jointChecks as Record<string, unknown>,
    conditions: conditions ?? (survey.conditions as SurveyConditions),
    meterProfileId: survey.meterProfileId,
    meter: meterOf(survey),
  };
}

export interface PointComparison {
  row: GridRow;
  label: string;
  student: { reading: ReadingRecord | null; evaluation: ReadingEvaluation | null };
  reference: { reading: ReadingRecord | null; evaluation: ReadingEvaluation | null } | null;
  comparison: ReadingComparison;
  prediction: ReviewRow['prediction'];
  hints: ReviewRow['hints'];
}

/** A test point in words: the part and its probe nodes (`R2 V1.7–B+1`), or the nodes alone. */
export const pointLabel = (row: GridRow): string => {
  const nodes = row.from !== null && row.to !== null ? `${row.from}\u2013${row.to}` : row.testPointKey;
  return row.component ? `${row.component.ref} ${nodes}` : nodes;
};

function evaluate(side: Side, r: ReadingRecord | undefined): ReadingEvaluation | null {
  if (!r || side.grid.row(r.testPointKey) === undefined) return null;
  return side.grid.evaluate(gridReadingOf(r), { jointChecked: r.testPointKey in side.jointChecks });
}

const compared = (r: ReadingRecord | null, e: ReadingEvaluation | null): ComparedReading | null =>
  r === null ? null : { state: r.state, ohms: r.ohms, method: r.method, verdict: e?.verdict ?? null, uncertaintyOhms: e?.uncertaintyOhms ?? null };

/** The comparison of every test point of the student's survey (pair relations have no reading of their own: left out). */
export function comparePoints(student: Side, reference: Side | null): { points: PointComparison[]; differences: string[]; sameMeter: boolean } {
  const differences = reference ? conditionDifferences(student.conditions, reference.conditions) : [];
  const sameMeter = reference !== null && student.meterProfileId !== null && student.meterProfileId === reference.meterProfileId;
  const points: PointComparison[] = [];
  for (const row of student.grid.rows) {
    if (row.kind === 'pair-relation') continue;
    const sr = student.current.get(row.testPointKey) ?? null;
    const se = evaluate(student, sr ?? undefined);
    const rr = reference ? (reference.current.get(row.testPointKey) ?? null) : null;
    const re = reference ? evaluate(reference, rr ?? undefined) : null;
    const comparison = compareReadings(compared(sr, se), compared(rr, re), { conditionDifferences: differences, sameMeter });
    const prediction = sr ? predictionOf(sr) : null;
    const expectedOhms = row.inCircuit?.expectedOhms ?? (row.expected !== null && 'ohms' in row.expected ? row.expected.ohms : null);
    const hints = sr ? feedbackHints({ reading: sr, expectedOhms, meter: student.meter, predictionErrorPct: prediction?.errorPct ?? null }) : [];
    points.push({
      row,
      label: pointLabel(row),
      student: { reading: sr, evaluation: se },
      reference: reference ? { reading: rr, evaluation: re } : null,
      comparison,
      prediction,
      hints,
    });
  }
  return { points, differences, sameMeter };
}
