import { HttpErrorResponse } from '@angular/common/http';
import { DestroyRef, Injectable, computed, inject, signal } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type {
  MeterCheck,
  ReadingConflict,
  ReadingEdit,
  ReadingEvaluation,
  ReadingInput,
  ReadingRecord,
  SurveyView,
  VerdictCounts,
} from '@domain/set-format';
import { GridInputError, SurveyGrid, parseReadingText, worstVerdict, type GridReading, type GridRow } from '@domain/survey-grid';
import type { AssignmentDetail, AttemptSummary, Classwork } from '@domain/class-format';
import type { Component as Part, TubeTypeRecord } from '@domain/template-format';
import type { Method, ReadingState, Verdict } from '@domain/words';
import { apiErrorOf } from '../core/errors/api-error';
import { newClientKey } from './offline/client-key';
import { OutboxSender, conflictOf, isTransient, type SentResult } from './offline/outbox-sender';
import { SurveyDb, nextSeq, type OutboxItem, type OutboxOp } from './offline/survey-db';
import { SurveysApi, type AmendmentInput } from './surveys-api';
import type { StateKey } from './survey-words';

/** A class survey's submission, as the attempt list or the submission queue names it. */
export type AttemptRef = Pick<AttemptSummary, 'id' | 'number' | 'submittedAt' | 'late'> & { review?: AttemptSummary['review'] };

/** How far the API has answered for a row's current reading. */
export type RowStatus = 'empty' | 'waiting' | 'confirmed' | 'differs';

/** A lead lifted on a row: the next reading there is `lead-lifted` at that end, following the prompting reading. */
export interface LiftMode {
  end: 0 | 1;
  followsReadingId: number | null;
  followsClientKey: string | null;
}

/** Everything one grid row shows. Objects are reused while nothing in them changed (rows re-render only when theirs did). */
export interface RowState {
  readonly row: GridRow;
  readonly reading: GridReading | null;
  readonly record: ReadingRecord | null;
  /** Computed in the browser by the same domain module as the API. */
  readonly evaluation: ReadingEvaluation | null;
  /** The API's verdict for the stored reading, when it has answered. */
  readonly serverVerdict: Verdict | null;
  readonly status: RowStatus;
  /** The API refused the newest write of this row (kept until discarded). */
  readonly refusal: { seq: number; message: string } | null;
  readonly jointChecked: boolean;
  /** The previous survey's value: only once this survey has a reading here. */
  readonly previous: { text: string; state: ReadingState; ohms: number | null } | null;
  readonly lift: LiftMode | null;
  /** Pair relations: the verdict on the ratio of the two positions. */
  readonly pair: { verdict: Verdict; ratio: number | null; driftPct: number | null } | null;
  readonly conflict: ReadingConflict | null;
  /** A returned class survey: this test point was not asked to be re-measured (read-only). */
  readonly locked: boolean;
  /** Predict first: the row has no reading and no prediction yet — the field takes the prediction, the expectation stays hidden. */
  readonly predicting: boolean;
  /** The prediction of this row: typed and waiting for the measured value, or kept with the current reading. */
  readonly prediction: string | null;
  /** The prediction is typed and the measured value is still to come. */
  readonly predictionWaiting: boolean;
}

/** `cached`: this browser's copy shows while the API is asked; `offline`: the API did not answer, the copy stands. */
export type LoadState = 'loading' | 'cached' | 'ok' | 'offline' | 'failed';

/** Large ids for readings still waiting, so the newest-reading rule ranks them after stored ones. */
const PENDING_ID_BASE = 1e12;

/**
 * One survey at the bench (issue #5 items 2–7): the view from the API (or this browser's copy),
 * the readings stored and those still waiting in the outbox, the verdict of each row computed
 * at once by `SurveyGrid` and confirmed by the API's answer, lifted leads, joint checks,
 * conflicts. Provided by the survey page.
 */
@Injectable()
export class SurveySession {
  private readonly api = inject(SurveysApi);
  private readonly db = inject(SurveyDb);
  private sender: OutboxSender | null = null;

  readonly surveyId = signal<number | null>(null);
  readonly view = signal<SurveyView | null>(null);
  readonly loadState = signal<LoadState>('loading');
  readonly loadError = signal<string>('');
  /** The API cannot be reached right now (writes wait in the outbox). */
  readonly away = signal(false);
  readonly stored = signal<readonly ReadingRecord[]>([]);
  readonly serverEvals = signal<ReadonlyMap<number, ReadingEvaluation>>(new Map());
  readonly outbox = signal<readonly OutboxItem[]>([]);
  readonly jointChecks = signal<ReadonlySet<string>>(new Set());
  /** Lifts chosen on rows; null: the lead is back (the row reads in circuit again). */
  readonly lifts = signal<ReadonlyMap<string, LiftMode | null>>(new Map());
  readonly conflicts = signal<ReadonlyMap<string, ReadingConflict>>(new Map());
  readonly meterCheck = signal<MeterCheck | null>(null);
  /** Per row: the meter range and note the next reading there is taken with (range null: inferred). */
  readonly nextOptions = signal<ReadonlyMap<string, { rangeIndex: number | null; note: string }>>(new Map());
  /** Predict first: predictions typed on rows whose measured value is not keyed yet (kept with this browser's copy). */
  readonly predictions = signal<ReadonlyMap<string, string>>(new Map());
  /** A class survey: the newest attempt (submission) of it, once the API has said (null: none, or not known yet). */
  readonly latestAttempt = signal<AttemptRef | null>(null);

  private readonly pendingIds = new Map<string, number>();
  private pendingCounter = 0;
  private readonly pendingReadings = new Map<string, GridReading>();
  private readonly storedReadings = new WeakMap<ReadingRecord, GridReading>();
  private readonly localEvals = new WeakMap<GridReading, { joint: boolean; ev: ReadingEvaluation }>();
  private previousRows = new Map<string, RowState>();
  private persistTimer: ReturnType<typeof setTimeout> | null = null;

  constructor() {
    inject(DestroyRef).onDestroy(() => {
      this.sender?.dispose();
      if (this.persistTimer !== null) {
        clearTimeout(this.persistTimer);
        void this.persist();
      }
    });
  }

  // -------------------------------------------------------------------------------------------
  // Derived state

  readonly grid = computed<SurveyGrid | null>(() => {
    const v = this.view();
    if (v === null) return null;
    return new SurveyGrid({
      document: v.template.document,
      tubeTypes: v.tubeTypes,
      deviations: v.set.deviations,
      meter: v.survey.meter?.profile ?? null,
      rule: v.survey.rule,
      conditions: v.survey.conditions,
    });
  });

  /** A class survey (an assignment's): its options and the caller's place; null outside a class. */
  readonly classwork = computed<Classwork | null>(() => this.view()?.classwork ?? null);

  /** The student's own class survey while it is worked on (draft, or returned for re-measuring). */
  private readonly studentWorking = computed(() => {
    const v = this.view();
    const cw = v?.classwork;
    return !!cw && cw.viewer === 'student' && (v!.survey.state === 'draft' || v!.survey.state === 'returned');
  });

  /** The assignment hides verdicts until the survey is submitted: glyphs, words, drift, summaries and advice stay hidden. */
  readonly verdictsHidden = computed(() => this.studentWorking() && this.classwork()?.showVerdicts === false);

  /** The assignment asks for a prediction before each first measurement. */
  readonly predictFirst = computed(() => this.studentWorking() && this.classwork()?.predictFirst === true && this.editable());

  /** A returned class survey: the only test points that take a reading (null: no such limit). */
  readonly remeasureKeys = computed<ReadonlySet<string> | null>(() => {
    const v = this.view();
    if (v?.classwork == null || v.survey.state !== 'returned') return null;
    return new Set(v.classwork.remeasureKeys ?? []);
  });

  readonly editable = computed(() => {
    const v = this.view();
    // The API says whether the caller may add readings (a draft, or a returned class survey).
    return v !== null && v.survey.editable && v.survey.state !== 'complete' && v.survey.state !== 'accepted';
  });

  /** Rows in bench order: the carried-over order when there is one, else the template's. */
  readonly rows = computed<readonly GridRow[]>(() => {
    const g = this.grid();
    if (g === null) return [];
    const order = this.view()?.order ?? [];
    if (order.length === 0) return g.rows;
    const at = new Map(order.map((k, i) => [k, i]));
    return [...g.rows].sort((a, b) => (at.get(a.testPointKey) ?? order.length + a.index) - (at.get(b.testPointKey) ?? order.length + b.index));
  });

  readonly stages = computed(() => {
    const v = this.view();
    if (v === null) return [];
    const rows = this.rows();
    return v.template.document.stages
      .map((s) => ({ key: s.key, name: s.name, rows: rows.filter((r) => r.stageKey === s.key) }))
      .filter((s) => s.rows.length > 0);
  });

  private readonly components = computed(() => new Map<string, Part>((this.view()?.template.document.components ?? []).map((c) => [c.key, c])));

  /** Stored readings and the readings still waiting (not refused), as the grid reads them. */
  readonly readings = computed<readonly GridReading[]>(() => {
    const stored = this.stored();
    const storedKeys = new Set(stored.map((r) => r.clientKey));
    const out = stored.map((r) => this.gridReadingOf(r));
    for (const item of this.outbox()) {
      if (item.op.kind !== 'reading' || item.refused !== null || storedKeys.has(item.op.input.clientKey)) continue;
      const pending = this.pendingReadingOf(item.op);
      if (pending !== null) out.push(pending);
    }
    return out;
  });

  readonly current = computed(() => this.grid()?.current(this.readings()) ?? new Map<string, GridReading>());

  readonly waitingCount = computed(() => {
    const storedKeys = new Set(this.stored().map((r) => r.clientKey));
    return this.outbox().filter((i) => i.refused === null && !(i.op.kind === 'reading' && storedKeys.has(i.op.input.clientKey))).length;
  });
  readonly refusedItems = computed(() => this.outbox().filter((i) => i.refused !== null));

  private readonly previousByKey = computed(() => {
    const m = new Map<string, { text: string; state: ReadingState; ohms: number | null }>();
    for (const r of this.view()?.previous?.readings ?? []) m.set(r.testPointKey, r);
    return m;
  });

  readonly rowStates = computed<ReadonlyMap<string, RowState>>(() => {
    const grid = this.grid();
    const out = new Map<string, RowState>();
    if (grid === null) return out;
    const current = this.current();
    const recordById = new Map<number, ReadingRecord>(this.stored().map((r) => [r.id, r]));
    const serverEvals = this.serverEvals();
    const joints = this.jointChecks();
    const lifts = this.lifts();
    const conflicts = this.conflicts();
    const previous = this.previousByKey();
    const remeasure = this.remeasureKeys();
    const predictFirst = this.predictFirst();
    const typed = this.predictions();
    const pendingPredictions = this.pendingPredictions();
    const refusals = new Map<string, { seq: number; message: string }>();
    for (const item of this.outbox()) {
      if (item.refused === null) continue;
      const key = item.op.kind === 'reading' ? item.op.input.testPointKey : item.op.kind === 'joint-check' ? item.op.testPointKey : null;
      if (key !== null) refusals.set(key, { seq: item.seq, message: item.refused.message });
    }
    for (const row of this.rows()) {
      const key = row.testPointKey;
      const reading = current.get(key) ?? null;
      const jointChecked = joints.has(key);
      const record = reading === null ? null : (recordById.get(reading.id) ?? null);
      const evaluation = reading === null || row.pair !== null ? null : this.evaluationOf(grid, reading, jointChecked, record);
      const server = record === null ? null : (serverEvals.get(record.id) ?? null);
      const status: RowStatus = reading === null ? 'empty' : record === null ? 'waiting' : server === null || evaluation === null ? 'waiting' : server.verdict === evaluation.verdict ? 'confirmed' : 'differs';
      const pair = row.pair === null ? null : grid.evaluatePair(row, current.get(row.pair.a), current.get(row.pair.b));
      const next: RowState = {
        row,
        reading,
        record,
        evaluation,
        serverVerdict: server?.verdict ?? null,
        status,
        refusal: refusals.get(key) ?? null,
        jointChecked,
        previous: reading === null ? null : (previous.get(key) ?? null),
        lift: lifts.has(key) ? (lifts.get(key) ?? null) : (reading !== null && reading.method === 'lead-lifted' && reading.liftedEnd !== null ? { end: reading.liftedEnd, followsReadingId: null, followsClientKey: null } : null),
        pair: pair === null ? null : samePair(this.previousRows.get(key)?.pair ?? null, pair),
        conflict: conflicts.get(key) ?? null,
        locked: remeasure !== null && !remeasure.has(key),
        predicting: predictFirst && row.pair === null && reading === null && !typed.has(key),
        prediction: reading === null ? (typed.get(key) ?? null) : (record !== null ? record.prediction : pendingPredictions.size > 0 ? (pendingPredictions.get(this.clientKeyOfPending(reading.id) ?? '') ?? null) : null),
        predictionWaiting: reading === null && typed.has(key),
      };
      const before = this.previousRows.get(key);
      out.set(key, before !== undefined && sameRow(before, next) ? before : next);
    }
    this.previousRows = out;
    return out;
  });

  /** Predictions sent with readings still waiting in the outbox, by client key. */
  private readonly pendingPredictions = computed(() => {
    const m = new Map<string, string>();
    for (const item of this.outbox()) if (item.op.kind === 'reading' && item.op.input.prediction) m.set(item.op.input.clientKey, item.op.input.prediction);
    return m;
  });

  /** Test points that take a reading and have none yet (pair relations are judged, not read). */
  readonly unreadRows = computed(() => [...this.rowStates().values()].filter((s) => s.row.pair === null && s.reading === null).map((s) => s.row));

  /**
   * A returned class survey: the requested test points not re-measured since the last submission
   * (a reading newer than it, or one still waiting here, counts). Unknown submission time: every requested point.
   */
  readonly remeasureLeft = computed(() => {
    const keys = this.remeasureKeys();
    if (keys === null) return [];
    const since = this.latestAttempt()?.submittedAt ?? null;
    return [...this.rowStates().values()]
      .filter((s) => keys.has(s.row.testPointKey))
      .filter((s) => s.reading === null || (s.record !== null && (since === null || s.record.takenAt <= since)))
      .map((s) => s.row);
  });

  /** The verdict each test point counts with (the browser's, which the API confirms). */
  readonly summary = computed(() => {
    const grid = this.grid();
    if (grid === null) return null;
    const evals = new Map<string, ReadingEvaluation>();
    for (const [key, s] of this.rowStates()) if (s.evaluation !== null) evals.set(key, s.evaluation);
    return grid.summary(evals) as { stages: Record<string, VerdictCounts>; total: VerdictCounts };
  });

  /** Worst verdict per pin of each socket (by designator), for the bottom view. */
  readonly socketMarks = computed(() => {
    const byPin = new Map<string, Map<number, Verdict[]>>();
    for (const s of this.rowStates().values()) {
      const sock = s.row.socket;
      if (sock === null || s.evaluation === null) continue;
      const pins = byPin.get(sock.designator) ?? new Map<number, Verdict[]>();
      byPin.set(sock.designator, pins);
      pins.set(sock.pin, [...(pins.get(sock.pin) ?? []), s.evaluation.verdict]);
    }
    const out = new Map<string, Record<number, Verdict>>();
    for (const [d, pins] of byPin) {
      const marks: Record<number, Verdict> = {};
      for (const [pin, vs] of pins) marks[pin] = worstVerdict(vs);
      out.set(d, marks);
    }
    return out;
  });

  /** The tube type of a socket designator. */
  tubeOf(designator: string): TubeTypeRecord | null {
    const v = this.view();
    if (v === null) return null;
    for (const st of v.template.document.stages) {
      const so = st.sockets.find((s) => s.designator === designator);
      if (so) return v.tubeTypes.find((t) => t.designation === so.tubeType) ?? null;
    }
    return null;
  }

  /** A component's two nodes (for the lifted-lead choice). */
  nodesOf(componentKey: string): [string, string] | null {
    return this.components().get(componentKey)?.nodes ?? null;
  }

  // -------------------------------------------------------------------------------------------
  // Loading

  async load(surveyId: number): Promise<void> {
    this.sender?.dispose();
    if (this.surveyId() !== surveyId) {
      // Another survey on the same page: its predictions and attempts are its own.
      this.predictions.set(new Map());
      this.latestAttempt.set(null);
    }
    this.surveyId.set(surveyId);
    this.loadState.set('loading');
    this.sender = new OutboxSender(surveyId, this.db, this.api, {
      readingIdOf: (key) => this.stored().find((r) => r.clientKey === key)?.id ?? null,
      sent: (item, result) => this.applySent(item, result),
      refused: (item, conflict) => this.applyRefused(item, conflict),
      unreachable: (away) => this.away.set(away),
    });
    const local = Promise.all([this.db.view(surveyId), this.db.outbox(surveyId)]).then(([cached, items]) => {
      if (this.surveyId() !== surveyId) return undefined;
      // Writes keyed before the store answered stay; the stored ones come first (older).
      const known = new Set(items.map((i) => i.seq));
      this.outbox.set([...items, ...this.outbox().filter((i) => !known.has(i.seq))].sort((a, b) => a.seq - b.seq));
      if (cached?.lifts?.length) this.lifts.set(new Map([...cached.lifts, ...this.lifts()]));
      if (cached?.predictions?.length) this.predictions.set(new Map([...cached.predictions, ...this.predictions()]));
      // This browser's copy shows until the API answers.
      if (cached !== undefined && this.loadState() === 'loading') this.applyView(cached.view, 'cached');
      return cached;
    });
    let settled: { ok: true; view: SurveyView } | { ok: false; err: unknown };
    try {
      settled = { ok: true, view: await firstValueFrom(this.api.survey(surveyId)) };
    } catch (err: unknown) {
      settled = { ok: false, err };
    }
    if (this.surveyId() !== surveyId) return;
    if (settled.ok) {
      this.applyView(settled.view, 'ok');
      this.away.set(false);
      await local;
      void this.db.putView(settled.view, [...this.lifts()], [...this.predictions()]);
      void this.loadAttempt();
    } else {
      const cached = await local;
      if (this.surveyId() !== surveyId) return;
      if (cached !== undefined && isTransient(settled.err)) {
        this.applyView(cached.view, 'offline');
        this.away.set(true);
      } else {
        const e = apiErrorOf(settled.err);
        this.loadError.set(
          e.status === 404 ? 'No such survey, or it is not shared with you.' : isTransient(settled.err) ? 'The server cannot be reached, and this survey is not kept in this browser yet.' : e.message,
        );
        this.loadState.set('failed');
        return;
      }
    }
    await local;
    void this.sender.flush();
  }

  private applyView(view: SurveyView, state: LoadState): void {
    this.view.set(view);
    this.stored.set(view.readings);
    this.serverEvals.set(new Map(Object.values(view.evaluations).map((e) => [e.readingId, e])));
    this.jointChecks.set(new Set(Object.keys(view.survey.jointChecks)));
    this.meterCheck.set(view.survey.meterCheck);
    this.loadState.set(state);
  }

  /** Sends what waits now (the page's "Send now"). */
  retry(): void {
    void this.sender?.flush();
  }

  // -------------------------------------------------------------------------------------------
  // Keying

  /**
   * A reading keyed on a row: shown at once with the browser's verdict, kept in the outbox
   * (IndexedDB) and sent in order. Returns the core's message when the text does not parse
   * (nothing is kept then).
   */
  keyReading(testPointKey: string, entry: { text: string } | { state: StateKey }): string | null {
    const v = this.view();
    const id = this.surveyId();
    if (v === null || id === null || !this.editable()) return 'This survey takes no new readings.';
    const row = this.grid()?.row(testPointKey);
    if (row === undefined) return 'Unknown test point.';
    if (row.pair !== null) return 'A pair relation is judged from its two positions; it takes no reading of its own.';
    const rowState = this.rowStates().get(testPointKey);
    if (rowState?.locked) return 'Only the test points the instructor asked to re-measure take a reading now.';
    if (rowState?.predicting) return 'Predict first: type the reading you expect in circuit, Enter; then the measured value.';
    const lift = rowState?.lift ?? null;
    const options = this.nextOptions().get(testPointKey);
    const rangeIndex = options?.rangeIndex ?? null;
    let input: ReadingInput;
    if ('text' in entry) {
      try {
        parseReadingText(entry.text, v.survey.meter?.profile ?? null, rangeIndex);
      } catch (e) {
        return e instanceof GridInputError ? e.message : String(e);
      }
      input = { testPointKey, clientKey: newClientKey(), text: entry.text.trim() };
    } else {
      input = { testPointKey, clientKey: newClientKey(), state: entry.state };
    }
    input.method = lift !== null ? 'lead-lifted' : 'in-circuit';
    input.liftedEnd = lift?.end ?? null;
    input.followsReadingId = lift?.followsReadingId ?? null;
    let followsClientKey = lift?.followsClientKey ?? null;
    if (this.remeasureKeys() !== null && input.followsReadingId === null && followsClientKey === null && rowState?.reading) {
      // A returned survey: the re-measurement follows (supersedes) the current reading of its test point.
      if (rowState.record !== null) input.followsReadingId = rowState.record.id;
      else followsClientKey = this.clientKeyOfPending(rowState.reading.id);
    }
    const prediction = rowState?.predictionWaiting ? this.predictions().get(testPointKey) : undefined;
    if (prediction !== undefined) input.prediction = prediction;
    input.takenAt = new Date().toISOString();
    if (rangeIndex !== null) input.rangeIndex = rangeIndex;
    if (options?.note) {
      input.note = options.note;
      // The note belongs to this reading; the range stays for the row.
      this.setNextOptions(testPointKey, { rangeIndex, note: '' });
    }
    if (lift !== null && (lift.followsReadingId !== null || lift.followsClientKey !== null)) {
      // Only the first reading after the lift follows the prompting one; later ones stay on the lifted lead.
      this.setLift(testPointKey, { end: lift.end, followsReadingId: null, followsClientKey: null });
    }
    this.enqueue({ kind: 'reading', input, followsClientKey });
    if (prediction !== undefined) this.setPrediction(testPointKey, null);
    return null;
  }

  /**
   * Predict first: the reading the student expects in circuit, typed before the measured value
   * (checked like a reading; kept in this browser until the measured value goes with it).
   */
  predict(testPointKey: string, text: string): string | null {
    const s = this.rowStates().get(testPointKey);
    if (!this.predictFirst() || s === undefined || !s.predicting) return 'This row takes no prediction now.';
    const t = text.trim();
    if (t.length > 40) return 'A prediction is at most 40 characters.';
    try {
      parseReadingText(t, null);
    } catch (e) {
      return e instanceof GridInputError ? e.message : String(e);
    }
    this.setPrediction(testPointKey, t);
    return null;
  }

  /** Takes a typed prediction back (the row asks for one again), or sets it. */
  setPrediction(testPointKey: string, text: string | null): void {
    const m = new Map(this.predictions());
    if (text === null) {
      if (!m.has(testPointKey)) return;
      m.delete(testPointKey);
    } else m.set(testPointKey, text);
    this.predictions.set(m);
    // At once, not debounced: a prediction must survive a reload right after it is typed.
    void this.persist();
  }

  /** Lifts a lead of the row's component at one end: recorded on the set's lifted-lead list. */
  liftLead(testPointKey: string, end: 0 | 1): string | null {
    const s = this.rowStates().get(testPointKey);
    const comp = s?.row.component;
    if (!s || !comp) return 'Only a component check names a part whose lead can be lifted.';
    if (!this.editable()) return 'This survey takes no new readings.';
    const prompting = s.reading;
    const storedId = s.record?.id ?? null;
    const promptedByClientKey = prompting !== null && storedId === null ? this.clientKeyOfPending(prompting.id) : null;
    this.setLift(testPointKey, { end, followsReadingId: storedId, followsClientKey: promptedByClientKey });
    this.enqueue({
      kind: 'lifted-lead',
      clientKey: newClientKey(),
      body: { componentKey: comp.key, end, promptedByReadingId: storedId, note: '' },
      promptedByClientKey,
    });
    return null;
  }

  setNextOptions(testPointKey: string, options: { rangeIndex: number | null; note: string }): void {
    const m = new Map(this.nextOptions());
    m.set(testPointKey, options);
    this.nextOptions.set(m);
  }

  /** The row reads in circuit again (a lift chosen by mistake, or the lead re-soldered; the set's lifted-lead list keeps its entry). */
  cancelLift(testPointKey: string): void {
    const m = new Map(this.lifts());
    m.set(testPointKey, null);
    this.lifts.set(m);
    this.persistSoon();
  }

  setJointChecked(testPointKey: string, checked: boolean): void {
    if (!this.editable()) return;
    const next = new Set(this.jointChecks());
    if (checked) next.add(testPointKey);
    else next.delete(testPointKey);
    this.jointChecks.set(next);
    this.enqueue({ kind: 'joint-check', clientKey: newClientKey(), testPointKey, checked });
  }

  /** Drops a write the API refused (it stays visible until then). */
  async discard(seq: number): Promise<void> {
    await this.db.remove(seq);
    this.outbox.update((list) => list.filter((i) => i.seq !== seq));
  }

  private enqueue(op: OutboxOp): void {
    const id = this.surveyId();
    if (id === null) return;
    const item: OutboxItem = { seq: nextSeq(), surveyId: id, op, queuedAt: new Date().toISOString(), refused: null };
    this.outbox.update((list) => [...list, item]);
    void this.db.add(item).then(() => this.sender?.flush());
  }

  private setLift(key: string, mode: LiftMode): void {
    const m = new Map(this.lifts());
    m.set(key, mode);
    this.lifts.set(m);
    this.persistSoon();
  }

  private applySent(item: OutboxItem, result: SentResult): void {
    this.outbox.update((list) => list.filter((i) => i.seq !== item.seq));
    if (result.kind === 'reading') {
      const { reading, evaluation } = result.saved.body;
      if (!this.stored().some((r) => r.id === reading.id)) this.stored.update((list) => [...list, reading]);
      const evals = new Map(this.serverEvals());
      evals.set(reading.id, evaluation);
      this.serverEvals.set(evals);
      // Lift modes waiting on this reading's client key now know its id.
      let changed = false;
      const lifts = new Map(this.lifts());
      for (const [k, m] of lifts) {
        if (m !== null && m.followsClientKey === reading.clientKey) {
          lifts.set(k, { ...m, followsReadingId: reading.id, followsClientKey: null });
          changed = true;
        }
      }
      if (changed) this.lifts.set(lifts);
    }
    this.persistSoon();
  }

  private applyRefused(item: OutboxItem, conflict: ReadingConflict | null): void {
    this.outbox.update((list) => list.map((i) => (i.seq === item.seq ? item : i)));
    if (conflict !== null) this.setConflict(conflict.current.testPointKey, conflict);
    if (item.op.kind === 'reading' && item.op.input.prediction) {
      // The refused reading took its prediction along: the row has no reading again, so the prediction waits for the next one.
      const key = item.op.input.testPointKey;
      if (!this.predictions().has(key) && !this.current().has(key)) this.setPrediction(key, item.op.input.prediction);
    }
  }

  // -------------------------------------------------------------------------------------------
  // Corrections (PATCH, online), amendments, meter check, complete

  /** Corrects the row's current stored reading (a typo): PATCH with the version shown; a stale version shows both values. */
  async correct(testPointKey: string, text: string, version?: number): Promise<string | null> {
    const s = this.rowStates().get(testPointKey);
    const id = this.surveyId();
    if (!s?.record || id === null) return 'Only a reading the server has stored can be corrected; key a new one instead.';
    try {
      parseReadingText(text, this.view()?.survey.meter?.profile ?? null);
    } catch (e) {
      return e instanceof GridInputError ? e.message : String(e);
    }
    const edit: ReadingEdit = { version: version ?? s.record.version, text: text.trim() };
    try {
      const saved = await firstValueFrom(this.api.editReading(id, s.record.id, edit));
      this.stored.update((list) => list.map((r) => (r.id === saved.reading.id ? saved.reading : r)));
      const evals = new Map(this.serverEvals());
      evals.set(saved.reading.id, saved.evaluation);
      this.serverEvals.set(evals);
      this.setConflict(testPointKey, null);
      this.persistSoon();
      return null;
    } catch (err: unknown) {
      const conflict = conflictOf(err);
      if (conflict !== null) {
        this.setConflict(testPointKey, conflict);
        return 'Changed meanwhile: both values are shown beside the row.';
      }
      return isTransient(err) ? 'Not sent: the server cannot be reached. A correction needs the server; try again when it answers.' : apiErrorOf(err).message;
    }
  }

  /** Keeps the value stored on the server and forgets mine. */
  keepStored(testPointKey: string): void {
    const c = this.conflicts().get(testPointKey);
    if (!c) return;
    this.stored.update((list) => list.map((r) => (r.id === c.current.id ? c.current : r)));
    this.setConflict(testPointKey, null);
  }

  /** Saves my value over the stored one (against its current version). */
  async saveMine(testPointKey: string): Promise<string | null> {
    const c = this.conflicts().get(testPointKey);
    if (!c) return null;
    this.stored.update((list) => list.map((r) => (r.id === c.current.id ? c.current : r)));
    return this.correct(testPointKey, c.yours.text ?? c.yours.state ?? '', c.current.version);
  }

  private setConflict(key: string, conflict: ReadingConflict | null): void {
    const m = new Map(this.conflicts());
    if (conflict === null) m.delete(key);
    else m.set(key, conflict);
    this.conflicts.set(m);
  }

  async checkMeter(text: string): Promise<string | null> {
    const id = this.surveyId();
    if (id === null) return null;
    try {
      const check = await firstValueFrom(this.api.meterCheck(id, text));
      this.meterCheck.set(check);
      return null;
    } catch (err: unknown) {
      return isTransient(err) ? 'The server cannot be reached: the meter check needs it.' : apiErrorOf(err).message;
    }
  }

  async complete(): Promise<string | null> {
    const id = this.surveyId();
    if (id === null) return null;
    try {
      await firstValueFrom(this.api.complete(id));
    } catch (err: unknown) {
      return isTransient(err) ? 'The server cannot be reached: completing needs it.' : apiErrorOf(err).message;
    }
    await this.reload();
    return null;
  }

  /**
   * A class survey handed in (POST /api/surveys/:id/submit): the attempt is frozen on the server.
   * Never queued: it needs the server, and the readings waiting here go first.
   */
  async submit(): Promise<string | null> {
    const id = this.surveyId();
    if (id === null) return null;
    if (typeof navigator !== 'undefined' && navigator.onLine === false) return 'Submitting needs the server, and this device is offline. Your readings are kept in this browser; submit when it is back online.';
    if (this.waitingCount() > 0) return 'Some readings still wait to be sent: they go first, then submit.';
    let attempt: AttemptSummary;
    try {
      attempt = await firstValueFrom(this.api.submit(id));
    } catch (err: unknown) {
      if (isTransient(err)) {
        this.away.set(true);
        return 'Not submitted: the server cannot be reached. Submitting needs it; your readings are kept in this browser.';
      }
      return apiErrorOf(err).message;
    }
    this.away.set(false);
    this.latestAttempt.set(attempt);
    await this.reload();
    return null;
  }

  /** A class survey with submissions: its newest attempt (for the link to its review). */
  private async loadAttempt(): Promise<void> {
    const v = this.view();
    const cw = v?.classwork;
    if (!v || !cw || cw.attemptCount === 0) return;
    try {
      const detail: AssignmentDetail = await firstValueFrom(this.api.assignment(cw.assignmentId));
      if (this.view()?.survey.id !== v.survey.id) return;
      const mine = detail.myAttempts.find((a) => a.surveyId === v.survey.id) ?? null;
      const queued = detail.queue.find((q) => q.surveyId === v.survey.id)?.latestAttempt ?? null;
      const latest = mine ?? queued;
      const known = this.latestAttempt();
      // A submission answered meanwhile may be newer than what this answer says.
      if (latest !== null && (known === null || latest.number >= known.number)) this.latestAttempt.set(latest);
    } catch {
      // The link to the review waits for the next load; the grid works without it.
    }
  }

  async amend(body: AmendmentInput): Promise<string | null> {
    const id = this.surveyId();
    if (id === null) return null;
    try {
      await firstValueFrom(this.api.amend(id, body));
    } catch (err: unknown) {
      return isTransient(err) ? 'The server cannot be reached: an amendment needs it.' : apiErrorOf(err).message;
    }
    await this.reload();
    return null;
  }

  /** Fetches the view again (after complete or an amendment). */
  async reload(): Promise<void> {
    const id = this.surveyId();
    if (id === null) return;
    try {
      const view = await firstValueFrom(this.api.survey(id));
      this.applyView(view, 'ok');
      void this.db.putView(view, [...this.lifts()], [...this.predictions()]);
      if (this.latestAttempt() === null) void this.loadAttempt();
    } catch (err: unknown) {
      if (err instanceof HttpErrorResponse && isTransient(err)) this.away.set(true);
    }
  }

  // -------------------------------------------------------------------------------------------
  // Helpers

  private gridReadingOf(r: ReadingRecord): GridReading {
    let g = this.storedReadings.get(r);
    if (g === undefined) {
      g = { id: r.id, testPointKey: r.testPointKey, followsReadingId: r.followsReadingId, text: r.text, state: r.state, ohms: r.ohms, method: r.method, liftedEnd: r.liftedEnd, rangeIndex: r.rangeIndex };
      this.storedReadings.set(r, g);
    }
    return g;
  }

  private pendingReadingOf(op: Extract<OutboxOp, { kind: 'reading' }>): GridReading | null {
    const input = op.input;
    const cached = this.pendingReadings.get(input.clientKey);
    const follows = this.followsIdOf(op);
    if (cached !== undefined && cached.followsReadingId === follows) return cached;
    let state: ReadingState;
    let ohms: number | null = null;
    if (input.text !== undefined && input.text !== '') {
      try {
        const p = parseReadingText(input.text, this.view()?.survey.meter?.profile ?? null, input.rangeIndex ?? null);
        state = p.state;
        ohms = p.ohms;
      } catch {
        return null;
      }
    } else state = input.state ?? 'no-access';
    let id = this.pendingIds.get(input.clientKey);
    if (id === undefined) {
      id = PENDING_ID_BASE + ++this.pendingCounter;
      this.pendingIds.set(input.clientKey, id);
    }
    const g: GridReading = {
      id,
      testPointKey: input.testPointKey,
      followsReadingId: follows,
      text: input.text ?? '',
      state,
      ohms,
      method: (input.method ?? 'in-circuit') as Method,
      liftedEnd: input.liftedEnd ?? null,
      rangeIndex: input.rangeIndex ?? null,
    };
    this.pendingReadings.set(input.clientKey, g);
    return g;
  }

  private followsIdOf(op: Extract<OutboxOp, { kind: 'reading' }>): number | null {
    if (op.input.followsReadingId != null) return op.input.followsReadingId;
    if (op.followsClientKey === null) return null;
    const stored = this.stored().find((r) => r.clientKey === op.followsClientKey);
    if (stored) return stored.id;
    return this.pendingIds.get(op.followsClientKey) ?? null;
  }

  private clientKeyOfPending(id: number): string | null {
    for (const [key, pid] of this.pendingIds) if (pid === id) return key;
    return null;
  }

  private evaluationOf(grid: SurveyGrid, reading: GridReading, jointChecked: boolean, record: ReadingRecord | null): ReadingEvaluation {
    const cached = this.localEvals.get(reading);
    if (cached !== undefined && cached.joint === jointChecked) return cached.ev;
    let ev: ReadingEvaluation;
    try {
      ev = grid.evaluate(reading, { jointChecked });
    } catch (e) {
      const server = record === null ? undefined : this.serverEvals().get(record.id);
      if (server !== undefined) return server;
      ev = { readingId: reading.id, testPointKey: reading.testPointKey, verdict: 'not-read', reason: null, driftPct: null, uncertaintyOhms: null, result: null, implied: null, advice: [], error: e instanceof Error ? e.message : String(e) };
    }
    this.localEvals.set(reading, { joint: jointChecked, ev });
    return ev;
  }

  private persistSoon(): void {
    if (this.persistTimer !== null) return;
    this.persistTimer = setTimeout(() => {
      this.persistTimer = null;
      void this.persist();
    }, 250);
  }

  /** Keeps this browser's copy of the view up to date with what the API has stored. */
  private async persist(): Promise<void> {
    const v = this.view();
    if (v === null) return;
    const evaluations: Record<number, ReadingEvaluation> = {};
    for (const [id, e] of this.serverEvals()) evaluations[id] = e;
    const jointChecks: SurveyView['survey']['jointChecks'] = {};
    for (const k of this.jointChecks()) jointChecks[k] = v.survey.jointChecks[k] ?? { by: null, at: new Date().toISOString() };
    await this.db.putView({ ...v, readings: [...this.stored()], evaluations, survey: { ...v.survey, jointChecks, meterCheck: this.meterCheck() } }, [...this.lifts()], [...this.predictions()]);
  }
}

function sameRow(a: RowState, b: RowState): boolean {
  return (
    a.row === b.row &&
    a.reading === b.reading &&
    a.record === b.record &&
    a.evaluation === b.evaluation &&
    a.serverVerdict === b.serverVerdict &&
    a.status === b.status &&
    a.refusal?.seq === b.refusal?.seq &&
    a.jointChecked === b.jointChecked &&
    a.previous === b.previous &&
    sameLift(a.lift, b.lift) &&
    a.pair === b.pair &&
    a.conflict === b.conflict &&
    a.locked === b.locked &&
    a.predicting === b.predicting &&
    a.prediction === b.prediction &&
    a.predictionWaiting === b.predictionWaiting
  );
}

function sameLift(a: LiftMode | null, b: LiftMode | null): boolean {
  return a === b || (a !== null && b !== null && a.end === b.end && a.followsReadingId === b.followsReadingId && a.followsClientKey === b.followsClientKey);
}

function samePair<T extends { verdict: Verdict; ratio: number | null; driftPct: number | null }>(a: T | null, b: T): T {
  return a !== null && a.verdict === b.verdict && a.ratio === b.ratio && a.driftPct === b.driftPct ? a : b;
}

