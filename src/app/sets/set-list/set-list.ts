import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginatorModule, PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { JOB_STATUSES, type JobStatus } from '@domain/set-format';
import type { SurveyPurpose, SurveyState } from '@domain/words';
import { catchError, debounceTime, map, of, switchMap, tap } from 'rxjs';
import { Auth } from '../../core/auth/auth';
import { apiErrorOf } from '../../core/errors/api-error';
import { JOB_STATUS_LABELS, PURPOSE_LABELS, SURVEY_STATE_LABELS } from '../set-words';
import { SetPage, SetsApi, downloadText } from '../sets-api';

/** `/sets`: the caller's sets and those shared with them — search, job status, pages, export. */
@Component({
  selector: 'dm-set-list',
  imports: [
    DatePipe,
    ReactiveFormsModule,
    RouterLink,
    MatTableModule,
    MatPaginatorModule,
    MatButtonModule,
    MatIconModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatProgressBarModule,
  ],
  templateUrl: './set-list.html',
  styleUrl: './set-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SetList {
  private readonly api = inject(SetsApi);
  private readonly auth = inject(Auth);
  private readonly fb = inject(NonNullableFormBuilder);

  protected readonly statuses = JOB_STATUSES;
  protected readonly statusLabels = JOB_STATUS_LABELS;
  protected readonly columns = ['label', 'chassis', 'serial', 'status', 'lastSurvey', 'leads', 'updated'];
  protected readonly canCreate = computed(() => this.auth.hasRole('technician', 'instructor', 'admin'));

  protected readonly filters = this.fb.group({ q: [''], status: this.fb.control<JobStatus | ''>('') });
  private readonly filterValues = signal(this.filters.getRawValue());
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(25);
  private readonly reloads = signal(0);
  protected readonly loading = signal(true);
  protected readonly loadFailed = signal(false);
  protected readonly page = signal<SetPage>({ items: [], total: 0, page: 1, pageSize: 25 });
  protected readonly exporting = signal(false);
  protected readonly exportError = signal<string | null>(null);

  private readonly query = computed(() => ({ ...this.filterValues(), page: this.pageIndex() + 1, pageSize: this.pageSize(), reload: this.reloads() }));

  constructor() {
    this.filters.valueChanges.pipe(debounceTime(300), takeUntilDestroyed()).subscribe(() => {
      const next = this.filters.getRawValue();
      if (JSON.stringify(next) === JSON.stringify(this.filterValues())) return;
      this.pageIndex.set(0);
      this.filterValues.set(next);
    });
    toObservable(this.query)
      .pipe(
        tap(() => this.loading.set(true)),
        switchMap(({ reload: _, ...q }) =>
          this.api.list(q).pipe(
            map((result) => ({ ok: true as const, result })),
            catchError(() => of({ ok: false as const })),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((answer) => {
        this.loading.set(false);
        this.loadFailed.set(!answer.ok);
        if (answer.ok) this.page.set(answer.result);
      });
  }

  protected statusLabel(status: JobStatus): string {
    return JOB_STATUS_LABELS[status] ?? status;
  }
  protected purposeLabel(purpose: SurveyPurpose): string {
    return PURPOSE_LABELS[purpose] ?? purpose;
  }
  protected stateLabel(state: SurveyState): string {
    return SURVEY_STATE_LABELS[state] ?? state;
  }

  protected changePage(event: PageEvent): void {
    this.pageSize.set(event.pageSize);
    this.pageIndex.set(event.pageIndex);
  }

  protected reload(): void {
    this.reloads.update((n) => n + 1);
  }

  /** Downloads the caller's own sets with their surveys and readings (so records outlive the account). */
  protected exportSets(format: 'json' | 'csv'): void {
    if (this.exporting()) return;
    this.exporting.set(true);
    this.exportError.set(null);
    this.api.exportSets(format).subscribe({
      next: (file) => {
        this.exporting.set(false);
        downloadText(file.filename, file.text, format === 'json' ? 'application/json' : 'text/csv');
      },
      error: (err: unknown) => {
        this.exporting.set(false);
        this.exportError.set(apiErrorOf(err).message);
      },
    });
  }
}
