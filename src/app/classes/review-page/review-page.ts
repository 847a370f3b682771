import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, ElementRef, Injector, afterNextRender, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { AbstractControl, FormControl, NonNullableFormBuilder, ReactiveFormsModule, ValidationErrors, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { ReadingComment, ReviewDecision, ReviewRow, ReviewView } from '@domain/class-format';
import { catchError, combineLatest, map, of, switchMap } from 'rxjs';
import { Auth } from '../../core/auth/auth';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { ErrorMessages, FieldErrors } from '../../shared/field-errors/field-errors';
import { VerdictBadge } from '../../shared/verdict-badge/verdict-badge';
import { ClassesApi } from '../classes-api';
import { HINT_LABELS, agreementNote, agreementText, enText, ohmsText, readingText, signedPct } from '../class-words';
import { StatusChip } from '../shared/status-chip';

type Loaded<T> = { state: 'loading' } | { state: 'ok'; value: T } | { state: 'failed'; status: number; message: string };

/** The score field: empty (no score) or a whole number from 0 to 100. */
export function scoreValidator(control: AbstractControl<string>): ValidationErrors | null {
  const v = (control.value ?? '').trim();
  if (v === '') return null;
  const n = Number(v);
  return Number.isInteger(n) && n >= 0 && n <= 100 ? null : { score: true };
}

const MESSAGES = {
  score: { score: 'A whole number from 0 to 100, or empty for no score.' },
  comment: { maxlength: 'At most 4000 characters.' },
} satisfies Record<string, ErrorMessages>;

/**
 * `/attempts/:id/review`. The instructor: each test point side by side with the reference
 * (values, E_n and agreement, verdicts, the prediction and its error, hints), comments per
 * reading, re-measure requests, and the decision (score prefilled from the suggestion; accept or
 * return). The student: the same page read-only, with the reference only once accepted.
 */
@Component({
  selector: 'dm-review-page',
  imports: [DatePipe, ReactiveFormsModule, RouterLink, MatButtonModule, MatButtonToggleModule, MatCheckboxModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule, FieldErrors, VerdictBadge, StatusChip],
  templateUrl: './review-page.html',
  styleUrl: './review-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ReviewPage {
  private readonly api = inject(ClassesApi);
  private readonly auth = inject(Auth);
  private readonly fb = inject(NonNullableFormBuilder);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  private readonly injector = inject(Injector);

  /** Route parameter: the attempt. */
  readonly id = input.required<string>();
  protected readonly attemptId = computed(() => Number(this.id()));

  protected readonly hintLabels = HINT_LABELS;
  protected readonly agreementText = agreementText;
  protected readonly agreementNote = agreementNote;
  protected readonly enText = enText;
  protected readonly readingText = readingText;
  protected readonly signedPct = signedPct;
  protected readonly ohmsText = ohmsText;
  protected readonly messages = MESSAGES;

  private readonly reloads = signal(0);
  protected readonly loaded = signal<Loaded<ReviewView>>({ state: 'loading' });
  protected readonly view = computed(() => {
    const l = this.loaded();
    return l.state === 'ok' ? l.value : null;
  });
  /** The signed-in user is the attempt's student. */
  protected readonly isStudent = computed(() => {
    const v = this.view();
    const me = this.auth.user();
    return !!v && !!me && String(me.id) === String(v.attempt.student.id);
  });
  protected readonly isLatest = computed(() => {
    const v = this.view();
    return !!v && (v.attempts.length === 0 || v.attempts[0].id === v.attempt.id);
  });
  /** The instructor may still comment and decide: the newest attempt of a submitted survey, not yet reviewed. */
  protected readonly canReview = computed(() => {
    const v = this.view();
    return !!v && !this.isStudent() && v.surveyState === 'submitted' && this.isLatest() && v.attempt.review === null;
  });
  protected readonly showReference = computed(() => {
    const v = this.view();
    return !!v && v.referenceShown;
  });
  protected readonly showPrediction = computed(() => {
    const v = this.view();
    return !!v && (v.assignment.predictFirst || v.rows.some((r) => r.prediction !== null));
  });
  /** Which rows the table shows: all, only those read, or those that need the reviewer's eye. */
  protected readonly filter = signal<'all' | 'read' | 'attention'>('all');
  protected readonly readRows = computed(() => (this.view()?.rows ?? []).filter((r) => r.student.reading !== null));
  protected readonly attentionRows = computed(() =>
    (this.view()?.rows ?? []).filter(
      (r) => r.comparison?.agreement === 'disagree' || r.comparison?.verdictAgreement === false || r.hints.length > 0 || r.comments.length > 0 || r.remeasureRequested || this.remeasure().has(r.testPointKey),
    ),
  );
  protected readonly shownRows = computed(() => {
    const f = this.filter();
    return f === 'read' ? this.readRows() : f === 'attention' ? this.attentionRows() : (this.view()?.rows ?? []);
  });
  protected readonly remeasureRows = computed(() => (this.view()?.rows ?? []).filter((r) => r.remeasureRequested));

  /** Test points chosen for re-measure (instructor, while deciding). */
  protected readonly remeasure = signal<ReadonlySet<string>>(new Set());
  /** The row whose comment box is open. */
  protected readonly commenting = signal<string | null>(null);
  protected readonly commentText = new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.maxLength(2000)] });
  protected readonly commentError = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly decided = signal<string | null>(null);
  protected readonly decision = this.fb.group({
    score: ['', [scoreValidator]],
    comment: ['', [Validators.maxLength(4000)]],
  });

  constructor() {
    combineLatest([toObservable(this.attemptId), toObservable(this.reloads)])
      .pipe(
        switchMap(([id]) =>
          this.api.review(id).pipe(
            map((value): Loaded<ReviewView> => ({ state: 'ok', value })),
            catchError((err: unknown) => {
              const e = apiErrorOf(err);
              return of<Loaded<ReviewView>>({ state: 'failed', status: e.status, message: e.message });
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((l) => {
        this.loaded.set(l);
        if (l.state === 'ok') this.prefill(l.value);
      });
  }

  private prefill(v: ReviewView): void {
    const r = v.attempt.review;
    const score = r ? r.score : v.suggestedScore;
    this.decision.reset({ score: score === null ? '' : String(Math.round(score)), comment: r?.comment ?? '' });
    this.remeasure.set(new Set(v.rows.filter((row) => row.remeasureRequested).map((row) => row.testPointKey)));
  }

  protected reload(): void {
    this.reloads.update((n) => n + 1);
  }

  protected toggleRemeasure(key: string, on: boolean): void {
    const next = new Set(this.remeasure());
    if (on) next.add(key);
    else next.delete(key);
    this.remeasure.set(next);
    this.error.set(null);
  }

  /** Marks every point that disagrees with the reference for re-measure. */
  protected markDisagreeing(): void {
    const rows = this.view()?.rows ?? [];
    this.remeasure.set(new Set([...this.remeasure(), ...rows.filter((r) => r.comparison?.agreement === 'disagree').map((r) => r.testPointKey)]));
  }

  protected openComment(row: ReviewRow): void {
    this.commentText.reset('');
    this.commentError.set(null);
    this.commenting.set(row.testPointKey);
    afterNextRender(() => this.host.nativeElement.querySelector<HTMLTextAreaElement>('textarea[data-comment]')?.focus(), { injector: this.injector });
  }

  protected addComment(row: ReviewRow): void {
    const v = this.view();
    if (!v || this.busy()) return;
    if (this.commentText.invalid) {
      this.commentText.markAsTouched();
      this.commentError.set(this.commentText.hasError('required') ? 'Write the comment first.' : 'At most 2000 characters.');
      return;
    }
    this.busy.set(true);
    this.api.addComment(v.attempt.id, { testPointKey: row.testPointKey, readingId: row.student.reading?.id ?? null, text: this.commentText.value.trim() }).subscribe({
      next: (c) => {
        this.busy.set(false);
        this.commenting.set(null);
        this.patchRow(row.testPointKey, (r) => ({ ...r, comments: [...r.comments, c] }));
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.commentError.set(apiErrorOf(err).message);
      },
    });
  }

  protected deleteComment(row: ReviewRow, c: ReadingComment): void {
    const v = this.view();
    if (!v || this.busy()) return;
    this.busy.set(true);
    this.api.deleteComment(v.attempt.id, c.id).subscribe({
      next: () => {
        this.busy.set(false);
        this.patchRow(row.testPointKey, (r) => ({ ...r, comments: r.comments.filter((x) => x.id !== c.id) }));
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.error.set(apiErrorOf(err).message);
      },
    });
  }

  private patchRow(key: string, change: (r: ReviewRow) => ReviewRow): void {
    const v = this.view();
    if (!v) return;
    this.loaded.set({ state: 'ok', value: { ...v, rows: v.rows.map((r) => (r.testPointKey === key ? change(r) : r)) } });
  }

  protected decide(decision: ReviewDecision): void {
    const v = this.view();
    if (!v || this.busy()) return;
    this.error.set(null);
    this.decision.markAllAsTouched();
    if (this.decision.invalid) return;
    const keys = v.rows.map((r) => r.testPointKey).filter((k) => this.remeasure().has(k));
    if (decision === 'returned' && keys.length === 0) {
      this.error.set('Choose at least one test point to re-measure before returning the survey.');
      return;
    }
    const raw = this.decision.getRawValue();
    const score = raw.score.trim() === '' ? null : Number(raw.score);
    this.busy.set(true);
    this.api.decide(v.attempt.id, { decision, score, comment: raw.comment.trim(), remeasureKeys: decision === 'returned' ? keys : [] }).subscribe({
      next: () => {
        this.busy.set(false);
        this.decided.set(decision === 'accepted' ? 'Accepted. The student is told.' : `Returned with ${keys.length} test point${keys.length === 1 ? '' : 's'} to re-measure. The student is told.`);
        this.reload();
      },
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        if (!showServerError(this.decision, e)) this.error.set(e.message);
      },
    });
  }

  protected print(): void {
    window.print();
  }
}
