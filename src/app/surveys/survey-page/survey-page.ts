import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, ElementRef, Injector, afterNextRender, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTabsModule } from '@angular/material/tabs';
import { RouterLink } from '@angular/router';
import { SafetyCaution } from '../../shared/safety-caution/safety-caution';
import { GridRow } from '../grid-row/grid-row';
import { RowDetail } from '../row-detail/row-detail';
import { SurveySession } from '../survey-session';
import { LEGEND, PURPOSE_WORDS, STATE_KEYS, SURVEY_STATE_WORDS, countsText } from '../survey-words';

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

  /** Route parameter. */
  readonly id = input.required<string>();

  protected readonly legend = LEGEND;
  protected readonly purposeWords = PURPOSE_WORDS;
  protected readonly stateWords = SURVEY_STATE_WORDS;
  protected readonly countsText = countsText;

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
        input.value = '';
        this.setError(key, null);
        this.correcting.set(null);
        this.choosingEnd.set(null);
        return true;
      case 'F2':
        this.startCorrection(key);
        return true;
    }
    if (!empty || modified || !this.editable()) return false;
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
    this.move(key, 1);
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
    if (!this.editable() || !s?.record) return;
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
    if (!s?.row.component || !this.editable()) return;
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

  private move(key: string, delta: number): void {
    const keys = this.entryKeys();
    const i = keys.indexOf(key);
    const next = keys[i + delta];
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

  protected valueOf(el: HTMLInputElement): string {
    return el.value;
  }
}
