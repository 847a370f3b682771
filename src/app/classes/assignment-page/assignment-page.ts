import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import type { AssignmentDetail, QueueEntry, StudentStatus } from '@domain/class-format';
import type { MeterProfileRecord } from '@domain/set-format';
import { catchError, combineLatest, map, of, switchMap } from 'rxjs';
import { apiErrorOf } from '../../core/errors/api-error';
import { MetersApi } from '../../meters/meters-api';
import { HOT_CHASSIS_CAUTION } from '../../templates/template-words';
import { ClassesApi } from '../classes-api';
import { StatusChip } from '../shared/status-chip';
import { AssignmentEdit } from './assignment-edit';

type Loaded<T> = { state: 'loading' } | { state: 'ok'; value: T } | { state: 'failed'; status: number; message: string };

/** The order of the queue: waiting for review first (oldest submission first), then returned, accepted, in progress, not started. */
const QUEUE_ORDER: Readonly<Record<StudentStatus, number>> = { submitted: 0, returned: 1, accepted: 2, draft: 3, 'not-started': 4 };

export function queueOrder(queue: readonly QueueEntry[]): QueueEntry[] {
  return [...queue].sort((a, b) => {
    const d = QUEUE_ORDER[a.status] - QUEUE_ORDER[b.status];
    if (d !== 0) return d;
    const at = a.latestAttempt?.submittedAt ?? '';
    const bt = b.latestAttempt?.submittedAt ?? '';
    return at !== bt ? at.localeCompare(bt) : a.student.name.localeCompare(b.student.name);
  });
}

/**
 * `/assignments/:id`. The instructor: what was assigned and the submission queue (status, late,
 * attempts, score, a link to the review). A student: the due date, the training set's card with
 * the hot-chassis caution, start or continue their survey, and their attempts with the reviews.
 */
@Component({
  selector: 'dm-assignment-page',
  imports: [DatePipe, ReactiveFormsModule, RouterLink, MatButtonModule, MatFormFieldModule, MatIconModule, MatProgressBarModule, MatSelectModule, StatusChip, AssignmentEdit],
  templateUrl: './assignment-page.html',
  styleUrl: './assignment-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AssignmentPage {
  private readonly api = inject(ClassesApi);
  private readonly meters = inject(MetersApi);
  private readonly router = inject(Router);

  /** Route parameter. */
  readonly id = input.required<string>();
  protected readonly assignmentId = computed(() => Number(this.id()));
  protected readonly caution = HOT_CHASSIS_CAUTION;

  private readonly reloads = signal(0);
  protected readonly loaded = signal<Loaded<AssignmentDetail>>({ state: 'loading' });
  protected readonly a = computed(() => {
    const l = this.loaded();
    return l.state === 'ok' ? l.value : null;
  });
  /** The caller is a student of the class (the API answers their own view). */
  protected readonly asStudent = computed(() => {
    const a = this.a();
    return a !== null && a.myStatus !== null;
  });
  protected readonly queue = computed(() => queueOrder(this.a()?.queue ?? []));
  protected readonly waiting = computed(() => this.queue().filter((q) => q.status === 'submitted').length);
  protected readonly overdue = computed(() => {
    const a = this.a();
    return a !== null && Date.parse(a.dueAt) < this.now() && (a.myStatus === 'not-started' || a.myStatus === 'draft');
  });
  private readonly now = signal(Date.now());

  protected readonly profiles = signal<readonly MeterProfileRecord[]>([]);
  protected readonly meter = new FormControl<number | null>(null);
  protected readonly editing = signal(false);
  protected readonly saved = signal(false);
  protected readonly starting = signal(false);
  protected readonly startError = signal<string | null>(null);

  constructor() {
    combineLatest([toObservable(this.assignmentId), toObservable(this.reloads)])
      .pipe(
        switchMap(([id]) =>
          this.api.assignment(id).pipe(
            map((value): Loaded<AssignmentDetail> => ({ state: 'ok', value })),
            catchError((err: unknown) => {
              const e = apiErrorOf(err);
              return of<Loaded<AssignmentDetail>>({ state: 'failed', status: e.status, message: e.message });
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((l) => {
        this.now.set(Date.now());
        this.loaded.set(l);
        if (l.state === 'ok' && l.value.myStatus === 'not-started' && this.profiles().length === 0) this.loadProfiles();
      });
  }

  private loadProfiles(): void {
    this.meters
      .list()
      .pipe(catchError(() => of([] as MeterProfileRecord[])))
      .subscribe((list) => this.profiles.set(list.filter((p) => !p.archived)));
  }

  /** Late: submitted after the due date, or not handed in and the due date has passed. */
  protected lateEntry(q: QueueEntry): boolean {
    const a = this.a();
    if (q.latestAttempt?.late) return true;
    return a !== null && (q.status === 'not-started' || q.status === 'draft') && Date.parse(a.dueAt) < this.now();
  }

  protected reload(): void {
    this.reloads.update((n) => n + 1);
  }

  protected applyEdit(updated: AssignmentDetail): void {
    this.editing.set(false);
    this.saved.set(true);
    this.loaded.set({ state: 'ok', value: updated });
  }

  /** Makes (or finds) the student's class survey and opens the grid. */
  protected startSurvey(): void {
    const a = this.a();
    if (!a || this.starting()) return;
    if (a.mySurveyId !== null) {
      void this.router.navigate(['/surveys', a.mySurveyId]);
      return;
    }
    this.starting.set(true);
    this.startError.set(null);
    this.api.startAssignmentSurvey(a.id, this.meter.value).subscribe({
      next: ({ surveyId }) => void this.router.navigate(['/surveys', surveyId]),
      error: (err: unknown) => {
        this.starting.set(false);
        this.startError.set(apiErrorOf(err).message);
      },
    });
  }

  protected ruleText(a: AssignmentDetail): string {
    const r = a.rule;
    if (!r) return 'the template’s tolerance';
    if (r.bandFrom === 'allowance' && r.allowance) return `a restoration allowance of ${r.allowance.lowPct} % / +${r.allowance.highPct} %`;
    return 'the template’s tolerance';
  }
}
