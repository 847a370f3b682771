import type { SurveyView } from '@domain/set-format';
import { SurveyGrid, type GridRow } from '@domain/survey-grid';
import type { Method, Verdict } from '@domain/words';

/** One test point of a survey as the printed record shows it. */
export interface RecordRow {
  readonly testPointKey: string;
  readonly label: string;
  readonly expectedText: string;
  readonly bandText: string;
  readonly readingText: string;
  readonly method: Method | null;
  readonly verdict: Verdict | null;
  readonly driftPct: number | null;
  /** Earlier readings of the point superseded by a follow-up (kept, and counted here). */
  readonly superseded: number;
}

export interface RecordStage {
  readonly key: string;
  readonly name: string;
  readonly rows: readonly RecordRow[];
}

/** `V3.7 (cathode) – chassis · R12` */
export function rowLabel(row: GridRow): string {
  const parts: string[] = [];
  if (row.component) parts.push(row.component.ref);
  if (row.from && row.to && row.kind !== 'component-check') parts.push(`${row.socket?.label ?? row.from} – ${row.to}`);
  if (row.pair) parts.push(`pair ${row.pair.a} / ${row.pair.b}`);
  return parts.join(' · ') || row.testPointKey;
}

function bandText(row: GridRow): string {
  if (!row.band) return '';
  const f = (x: number) => `${x > 0 ? '+' : x < 0 ? '−' : ''}${Math.abs(x)}`;
  return `${f(row.band.lowPct)} % to ${f(row.band.highPct)} % (${row.band.source})`;
}

/**
 * The survey's test points grouped by stage in bench order (the survey's carried-over order when
 * it has one), each with its current reading (the newest one no follow-up supersedes) and the
 * verdict the API computed for it.
 */
export function recordStages(view: SurveyView): RecordStage[] {
  const grid = new SurveyGrid({
    document: view.template.document,
    tubeTypes: view.tubeTypes,
    deviations: view.set.deviations,
    meter: view.survey.meter?.profile ?? null,
    rule: view.survey.rule,
    conditions: view.survey.conditions,
  });
  const current = grid.current(view.readings);
  const perPoint = new Map<string, number>();
  for (const r of view.readings) perPoint.set(r.testPointKey, (perPoint.get(r.testPointKey) ?? 0) + 1);
  const order = new Map(view.order.map((k, i) => [k, i]));
  const rows = [...grid.rows].sort((a, b) => (order.get(a.testPointKey) ?? a.index + order.size) - (order.get(b.testPointKey) ?? b.index + order.size));
  const stages = new Map<string, { key: string; name: string; rows: RecordRow[] }>();
  for (const stage of view.template.document.stages) stages.set(stage.key, { key: stage.key, name: stage.name, rows: [] });
  for (const row of rows) {
    const reading = current.get(row.testPointKey);
    const evaluation = reading ? view.evaluations[reading.id] : undefined;
    const stage = stages.get(row.stageKey) ?? { key: row.stageKey, name: row.stageName, rows: [] };
    stages.set(row.stageKey, stage);
    stage.rows.push({
      testPointKey: row.testPointKey,
      label: rowLabel(row),
      expectedText: row.expectedText,
      bandText: bandText(row),
      readingText: reading ? reading.text || reading.state : '',
      method: reading?.method ?? null,
      verdict: evaluation?.verdict ?? null,
      driftPct: evaluation?.driftPct ?? null,
      superseded: Math.max(0, (perPoint.get(row.testPointKey) ?? 0) - 1),
    });
  }
  return [...stages.values()].filter((s) => s.rows.length > 0);
}
