import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, ElementRef, Injector, afterNextRender, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTabsModule } from '@angular/material/tabs';
import { RouterLink } from '@angular/router';
import { SafetyCaution } from '../../shared/safety-caution/safety-caution';
import { GridRow } from '../grid-row/grid-row';
import { RowDetail } from '../row-detail/row-detail';
import { SubmitDialog, type SubmitData } from '../submit-dialog/submit-dialog';
import { SurveySession } from '../survey-session';
import { LEGEND, PURPOSE_WORDS, STATE_KEYS, SURVEY_STATE_WORDS, countsText, pointLabel } from '../survey-words';

/**
 * `/surveys/:id`: the keyboard-first bench grid (issue #5 item 2, DESIGN.md §5). Type `470k`
 * Enter: the reading is kept (IndexedDB outbox), its verdict shows at once from the browser's
 * `SurveyGrid`, and the focus moves to the next row; the API's answer confirms the verdict and
 * never moves the focus. Single keys for states, always shown in the legend; arrows move; no
 * dialog interrupts keying.
 */
@Component({
  selector: 'dm-survey-page',
  imports: [DatePipe, RouterLink, MatButtonModule, MatIconModule, MatProgressBarModule, MatTabsModule, SafetyCaution, GridRow, RowDetail],
  templateUrl: './survey-page.html',
  styleUrl: './survey-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  providers: [SurveySession],
})
export class SurveyPage {
  protected readonly session = inject(SurveySession);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  private readonly injector = inject(Injector);
  private readonly dialog = inject(MatDialog);

  /** Route parameter. */
  readonly id = input.required<string>();

  protected readonly legend = LEGEND;
  protected readonly purposeWords = PURPOSE_WORDS;
  protected readonly stateWords = SURVEY_STATE_WORDS;
  protected readonly countsText = countsText;
  protected readonly pointLabel = pointLabel;

  protected readonly stageIndex = signal(0);
  protected readonly focusedKey = signal<string | null>(null);
  /** The row whose lifted end is being chosen (keys 1 and 2). */
  protected readonly choosingEnd = signal<string | null>(null);
  /** The row whose stored reading is being corrected (F2). */
  protected readonly correcting = signal<string | null>(null);
  protected readonly errors = signal<ReadonlyMap<string, string>>(new Map());
  protected readonly meterMessage = signal('');
  protected readonly completeMessage = signal('');
  protected readonly confirmingComplete = signal(false);
  protected readonly busy = signal(false);
  protected readonly submitMessage = signal('');

  // Class surveys (issue #6): the assignment's header, predict first, hidden verdicts, re-measuring, submit.
  protected readonly classwork = this.session.classwork;
  protected readonly verdictsHidden = this.session.verdictsHidden;
  /** The student doing the survey (not the instructor or an admin reading it). */
  protected readonly isStudent = computed(() => this.classwork()?.viewer === 'student');
  /** Submitted after the due date, or still open with the due date past. */
  protected readonly late = computed(() => {
    const cw = this.classwork();
    const v = this.view();
    if (!cw || !v) return false;
    if (cw.late) return true;
    return (v.survey.state === 'draft' || v.survey.state === 'returned') && Date.parse(cw.dueAt) < Date.now();
  });
  /** The requested test points of a returned survey, in bench order. */
  protected readonly requestedRows = computed(() => {
    const keys = this.session.remeasureKeys();
    return keys === null ? [] : this.session.rows().filter((r) => keys.has(r.testPointKey));
  });
  /** How many test points have a reading (shown instead of the verdict counts while verdicts are hidden). */
  protected readonly readCount = computed(() => {
    let read = 0;
    let all = 0;
    for (const s of this.states().values()) {
      if (s.row.pair !== null) continue;
      all++;
      if (s.reading !== null) read++;
    }
    return { read, all };
  });

  protected readonly view = this.session.view;
  protected readonly stages = this.session.stages;
  protected readonly activeStage = computed(() => {
    const stages = this.stages();
    return stages.length === 0 ? null : stages[Math.min(this.stageIndex(), stages.length - 1)];
  });
  protected readonly states = this.session.rowStates;
  protected readonly focusedState = computed(() => {
    const k = this.focusedKey();
    return (k !== null && this.states().get(k)) || null;
  });
  protected readonly editable = this.session.editable;
  protected readonly amendable = computed(() => this.view()?.survey.state === 'complete');
  /** Test point keys that take a reading, in bench order across stages. */
  private readonly entryKeys = computed(() => this.stages().flatMap((s) => s.rows.filter((r) => r.pair === null).map((r) => r.testPointKey)));
  /** A returned class survey: Enter after a reading goes on to the next requested test point. */
  private readonly openKeys = computed(() => {
    const keys = this.session.remeasureKeys();
    return keys === null ? this.entryKeys() : this.entryKeys().filter((k) => keys.has(k));
  });
  protected readonly needsMeterCheck = computed(() => {
    const v = this.view();
    return v !== null && this.editable() && v.survey.meter !== null && this.session.meterCheck() === null;
  });

  constructor() {
    effect(() => {
      const id = Number(this.id());
      untracked(() => void this.session.load(id));
    });
  }

  protected selectStage(i: number): void {
    this.stageIndex.set(i);
    this.focusAfterRender(this.stages()[i]?.rows.find((r) => r.pair === null)?.testPointKey ?? null);
  }

  protected focusIn(event: FocusEvent): void {
    const key = (event.target as HTMLElement).dataset?.['key'];
    if (key && key !== this.focusedKey()) {
      this.focusedKey.set(key);
      if (this.choosingEnd() !== key) this.choosingEnd.set(null);
    }
  }

  /** One listener for the whole grid. */
  protected gridKey(event: KeyboardEvent): void {
    const input = event.target as HTMLInputElement;
    const key = input.dataset?.['key'];
    if (!key || input.tagName !== 'INPUT') return;
    if (this.applyKey(key, input, event.key, event.ctrlKey || event.metaKey || event.altKey)) event.preventDefault();
  }

  /** What a key does on a row's entry field; true when the grid handled it. */
  private applyKey(key: string, input: HTMLInputElement, code: string, modified: boolean): boolean {
    const empty = input.value === '';
    switch (code) {
      case 'Enter':
        if (this.correcting() === key) void this.saveCorrection(key, input);
        else if (!empty && this.states().get(key)?.predicting) this.predict(key, input);
        else if (!empty) this.save(key, { text: input.value }, input);
        else this.move(key, 1);
        return true;
      case 'ArrowDown':
        this.move(key, 1);
        return true;
      case 'ArrowUp':
        this.move(key, -1);
        return true;
      case 'PageDown':
        this.moveStage(1);
        return true;
      case 'PageUp':
        this.moveStage(-1);
        return true;
      case 'Escape':
        // Esc on an empty field takes a typed prediction back: the row asks for one again.
        if (empty && this.states().get(key)?.predictionWaiting) this.session.setPrediction(key, null);
        input.value = '';
        this.setError(key, null);
        this.correcting.set(null);
        this.choosingEnd.set(null);
        return true;
      case 'F2':
        this.startCorrection(key);
        return true;
    }
    if (!empty || modified || !this.rowEditable(key)) return false;
    // Predict first: letters are typed into the prediction, not taken as state keys.
    if (this.states().get(key)?.predicting) return false;
    if (this.choosingEnd() === key && (code === '1' || code === '2')) {
      this.chooseEnd(key, code === '1' ? 0 : 1);
      return true;
    }
    const state = STATE_KEYS[code];
    if (state !== undefined) {
      this.save(key, { state }, input);
      return true;
    }
    if (code === 'l') {
      this.askLift(key);
      return true;
    }
    if (code === 'j') {
      const s = this.states().get(key);
      if (s?.row.component) this.session.setJointChecked(key, !s.jointChecked);
      return true;
    }
    return false;
  }

  /** A legend key tapped (tablet): acts on the focused row as the key would; the focus stays in the row. */
  protected legendKey(action: string): void {
    const key = this.focusedKey() ?? this.entryKeys()[0] ?? null;
    if (key === null || !action) return;
    const input = this.inputOf(key);
    if (input === null) return;
    if (action === 'OL' || action === 'k' || action === 'M') {
      input.value += action;
      input.focus();
      return;
    }
    const code = action === 'enter' ? 'Enter' : action;
    if (code.length === 1) input.value = '';
    input.focus();
    this.applyKey(key, input, code, false);
  }

  private save(key: string, entry: { text: string } | { state: 'open' | 'short' | 'climbing' | 'unstable' | 'no-access' }, input: HTMLInputElement): void {
    performance.mark('reading-keyed');
    const error = this.session.keyReading(key, entry);
    if (error !== null) {
      this.setError(key, error);
      return;
    }
    input.value = '';
    this.setError(key, null);
    afterNextRender(() => performance.mark('verdict-shown'), { injector: this.injector });
    this.move(key, 1, this.openKeys());
  }

  /** Predict first: the prediction is kept and the same field now asks for the measured value. */
  private predict(key: string, input: HTMLInputElement): void {
    const error = this.session.predict(key, input.value);
    this.setError(key, error);
    if (error === null) input.value = '';
  }

  /** The row takes readings: the survey does, and a returned survey asked for this test point. */
  protected rowEditable(key: string): boolean {
    return this.editable() && this.states().get(key)?.locked !== true;
  }

  /** A requested test point chosen from the banner: its stage and its field. */
  protected goTo(key: string): void {
    const stage = this.stages().findIndex((s) => s.rows.some((r) => r.testPointKey === key));
    if (stage < 0) return;
    if (stage !== this.stageIndex()) {
      this.stageIndex.set(stage);
      this.focusAfterRender(key);
    } else this.inputOf(key)?.focus();
  }

  private async saveCorrection(key: string, input: HTMLInputElement): Promise<void> {
    const error = await this.session.correct(key, input.value);
    this.setError(key, error);
    if (error === null) {
      input.value = '';
      this.correcting.set(null);
    }
  }

  protected startCorrection(key: string): void {
    const s = this.states().get(key);
    // A returned class survey takes new readings (which follow the submitted ones), not corrections.
    if (!this.rowEditable(key) || !s?.record || this.view()?.survey.state === 'returned') return;
    this.correcting.set(key);
    const input = this.inputOf(key);
    if (input) {
      input.value = s.record.text || s.record.state;
      input.focus();
      input.select();
    }
  }

  protected askLift(key: string): void {
    const s = this.states().get(key);
    if (!s?.row.component || !this.rowEditable(key)) return;
    if (s.lift !== null) {
      this.session.cancelLift(key);
      return;
    }
    this.choosingEnd.set(this.choosingEnd() === key ? null : key);
    this.inputOf(key)?.focus();
  }

  protected chooseEnd(key: string, end: 0 | 1): void {
    const error = this.session.liftLead(key, end);
    this.choosingEnd.set(null);
    this.setError(key, error);
    this.inputOf(key)?.focus();
  }

  protected cancelLift(key: string): void {
    this.choosingEnd.set(null);
    this.session.cancelLift(key);
    this.inputOf(key)?.focus();
  }

  private move(key: string, delta: number, among: readonly string[] = this.entryKeys()): void {
    const keys = this.entryKeys();
    const i = keys.indexOf(key);
    // The next key after this one (in bench order) that is among the keys asked for.
    const allowed = new Set(among);
    let next: string | undefined;
    for (let j = i + delta; j >= 0 && j < keys.length; j += delta) {
      if (allowed.has(keys[j])) {
        next = keys[j];
        break;
      }
    }
    if (next === undefined) return;
    const stage = this.stages().findIndex((s) => s.rows.some((r) => r.testPointKey === next));
    if (stage !== this.stageIndex()) {
      this.stageIndex.set(stage);
      this.focusAfterRender(next);
    } else this.inputOf(next)?.focus();
  }

  private moveStage(delta: number): void {
    const i = this.stageIndex() + delta;
    if (i >= 0 && i < this.stages().length) this.selectStage(i);
  }

  private focusAfterRender(key: string | null): void {
    if (key === null) return;
    afterNextRender(() => this.inputOf(key)?.focus(), { injector: this.injector });
  }

  private inputOf(key: string): HTMLInputElement | null {
    return this.host.nativeElement.querySelector<HTMLInputElement>(`input[data-key="${CSS.escape(key)}"]`);
  }

  private setError(key: string, message: string | null): void {
    const m = new Map(this.errors());
    if (message === null) {
      if (!m.has(key)) return;
      m.delete(key);
    } else m.set(key, message);
    this.errors.set(m);
  }

  protected async checkMeter(text: string): Promise<void> {
    if (!text.trim()) return;
    this.busy.set(true);
    this.meterMessage.set((await this.session.checkMeter(text)) ?? '');
    this.busy.set(false);
  }

  protected async complete(): Promise<void> {
    if (!this.confirmingComplete()) {
      this.confirmingComplete.set(true);
      return;
    }
    this.busy.set(true);
    const error = await this.session.complete();
    this.busy.set(false);
    this.confirmingComplete.set(false);
    this.completeMessage.set(error ?? '');
  }

  /** Submit (class surveys): a dialog names what is unread; the submission itself needs the server. */
  protected openSubmit(): void {
    const v = this.view();
    const cw = this.classwork();
    if (!v || !cw || this.busy()) return;
    this.submitMessage.set('');
    if (typeof navigator !== 'undefined' && navigator.onLine === false) {
      this.submitMessage.set('Submitting needs the server, and this device is offline. Your readings are kept in this browser; submit when it is back online.');
      return;
    }
    const data: SubmitData = {
      title: cw.title,
      unread: this.session.unreadRows().map(pointLabel),
      remeasureLeft: this.session.remeasureLeft().map(pointLabel),
      attemptNumber: cw.attemptCount + 1,
      late: Date.parse(cw.dueAt) < Date.now(),
    };
    this.dialog
      .open<SubmitDialog, SubmitData, boolean>(SubmitDialog, { data, width: '560px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((ok) => {
        if (ok === true) void this.submit();
      });
  }

  private async submit(): Promise<void> {
    this.busy.set(true);
    const error = await this.session.submit();
    this.busy.set(false);
    this.submitMessage.set(error ?? '');
  }

  protected valueOf(el: HTMLInputElement): string {
    return el.value;
  }
}
