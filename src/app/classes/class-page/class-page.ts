import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTabsModule } from '@angular/material/tabs';
import { RouterLink } from '@angular/router';
import type { ClassDetail } from '@domain/class-format';
import { catchError, combineLatest, map, of, switchMap } from 'rxjs';
import { apiErrorOf } from '../../core/errors/api-error';
import { StatusChip } from '../shared/status-chip';
import { ClassesApi } from '../classes-api';
import { AssignmentsSection } from './sections/assignments-section';
import { CompetenciesSection } from './sections/competencies-section';
import { ResultsSection } from './sections/results-section';
import { StudentsSection } from './sections/students-section';

type Loaded<T> = { state: 'loading' } | { state: 'ok'; value: T } | { state: 'failed'; status: number; message: string };

/**
 * `/classes/:id`. The instructor (and an admin): tabs for students and invitations, assignments,
 * results and competencies. A student: the class's assignments with due dates and their own status.
 */
@Component({
  selector: 'dm-class-page',
  imports: [DatePipe, RouterLink, MatButtonModule, MatIconModule, MatProgressBarModule, MatTabsModule, StatusChip, StudentsSection, AssignmentsSection, ResultsSection, CompetenciesSection],
  templateUrl: './class-page.html',
  styleUrl: './class-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ClassPage {
  private readonly api = inject(ClassesApi);

  /** Route parameter. */
  readonly id = input.required<string>();
  protected readonly classId = computed(() => Number(this.id()));

  private readonly reloads = signal(0);
  protected readonly loaded = signal<Loaded<ClassDetail>>({ state: 'loading' });
  protected readonly cls = computed(() => {
    const l = this.loaded();
    return l.state === 'ok' ? l.value : null;
  });
  protected readonly teaching = computed(() => {
    const c = this.cls();
    return c !== null && c.myRole !== 'student';
  });
  protected readonly now = signal(Date.now());

  constructor() {
    combineLatest([toObservable(this.classId), toObservable(this.reloads)])
      .pipe(
        switchMap(([id]) =>
          this.api.get(id).pipe(
            map((value): Loaded<ClassDetail> => ({ state: 'ok', value })),
            catchError((err: unknown) => {
              const e = apiErrorOf(err);
              return of<Loaded<ClassDetail>>({ state: 'failed', status: e.status, message: e.message });
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((l) => {
        this.now.set(Date.now());
        this.loaded.set(l);
      });
  }

  protected readonly archiveError = signal<string | null>(null);

  /** Archives the class (it leaves the list; nothing is deleted) or brings it back. */
  protected setArchived(archived: boolean): void {
    const c = this.cls();
    if (!c) return;
    this.archiveError.set(null);
    this.api.update(c.id, { archived }).subscribe({
      next: (updated) => this.loaded.set({ state: 'ok', value: updated }),
      error: (err: unknown) => this.archiveError.set(apiErrorOf(err).message),
    });
  }

  protected reload(): void {
    this.reloads.update((n) => n + 1);
  }

  /** A student's assignment is overdue: past the due date and not yet handed in. */
  protected overdue(dueAt: string, status: string | null): boolean {
    return (status === 'not-started' || status === 'draft' || status === null) && Date.parse(dueAt) < this.now();
  }
}
