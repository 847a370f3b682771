import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import type { ClassDetail, CompetencyRecord, CompetencySignoff } from '@domain/class-format';
import { catchError, map, of, switchMap, tap } from 'rxjs';
import { Auth } from '../../../core/auth/auth';
import { apiErrorOf } from '../../../core/errors/api-error';
import { ClassesApi } from '../../classes-api';
import { CompetencyList, SignOffRequest, WithdrawRequest } from '../../shared/competency-list';

/** Competency sign-offs per student of the class (a student's record, separate from any set's safety gate). */
@Component({
  selector: 'dm-competencies-section',
  imports: [MatFormFieldModule, MatProgressBarModule, MatSelectModule, CompetencyList],
  template: `
    <p class="intro">A sign-off records that you saw the student do it. It is the student's record, kept across classes; it certifies nothing about any set.</p>
    @if (students().length === 0) {
      <p class="empty">No students in the class yet.</p>
    } @else {
      <mat-form-field subscriptSizing="dynamic">
        <mat-label>Student</mat-label>
        <mat-select [value]="chosenId()" (valueChange)="studentId.set($event)">
          @for (s of students(); track s.student.id) {
            <mat-option [value]="s.student.id">{{ s.student.name }}</mat-option>
          }
        </mat-select>
      </mat-form-field>
    }
    @if (loading()) {
      <mat-progress-bar mode="indeterminate" aria-label="Loading the record" />
    }
    @if (error(); as text) {
      <p class="dm-form-message" role="alert">{{ text }}</p>
    }
    @if (notice(); as text) {
      <p class="dm-form-message dm-info" role="status">{{ text }}</p>
    }
    @if (record(); as r) {
      <dm-competency-list [record]="r" [editable]="true" [busy]="busy()" [mayWithdraw]="mayWithdraw" (signOff)="signOff($event)" (withdraw)="withdraw($event)" />
    }
  `,
  styleUrl: './section.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CompetenciesSection {
  private readonly api = inject(ClassesApi);
  private readonly auth = inject(Auth);
  readonly cls = input.required<ClassDetail>();

  protected readonly students = computed(() => this.cls().students.filter((s) => s.removedAt === null));
  protected readonly studentId = signal<number | null>(null);
  /** The student shown: the one chosen, else the first of the class. */
  protected readonly chosenId = computed(() => this.studentId() ?? this.students()[0]?.student.id ?? null);
  private readonly reloads = signal(0);
  protected readonly record = signal<CompetencyRecord | null>(null);
  protected readonly loading = signal(false);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly notice = signal<string | null>(null);

  protected readonly mayWithdraw = (s: CompetencySignoff): boolean => this.auth.hasRole('admin') || (s.signedBy !== null && String(s.signedBy.id) === String(this.auth.user()?.id));

  constructor() {
    toObservable(computed(() => ({ id: this.chosenId(), n: this.reloads() })))
      .pipe(
        tap(() => this.error.set(null)),
        switchMap(({ id }) => {
          if (id === null) return of(null);
          this.loading.set(true);
          return this.api.competencies(id).pipe(
            map((r) => r as CompetencyRecord | null),
            catchError((err: unknown) => {
              this.error.set(`The record could not be loaded: ${apiErrorOf(err).message}`);
              return of(null);
            }),
          );
        }),
        takeUntilDestroyed(),
      )
      .subscribe((r) => {
        this.loading.set(false);
        this.record.set(r);
      });
  }

  protected signOff(req: SignOffRequest): void {
    const r = this.record();
    if (!r || this.busy()) return;
    this.act(this.api.signOff(r.student.id, { competencyKey: req.key, classId: this.cls().id, note: req.note }), `Signed off for ${r.student.name}.`);
  }

  protected withdraw(req: WithdrawRequest): void {
    if (this.busy()) return;
    this.act(this.api.withdraw(req.signoff.id, req.note), 'Sign-off withdrawn.');
  }

  private act(call: ReturnType<ClassesApi['withdraw']>, done: string): void {
    this.busy.set(true);
    this.notice.set(null);
    this.error.set(null);
    call.subscribe({
      next: () => {
        this.busy.set(false);
        this.notice.set(done);
        this.reloads.update((n) => n + 1);
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.error.set(apiErrorOf(err).message);
      },
    });
  }
}
