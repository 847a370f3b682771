import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import type { ClassSummary } from '@domain/class-format';
import { catchError, map, of, switchMap, tap } from 'rxjs';
import { Auth } from '../../core/auth/auth';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { ErrorMessages, FieldErrors } from '../../shared/field-errors/field-errors';
import { ClassesApi } from '../classes-api';

export const CLASS_MESSAGES = {
  name: { required: 'Name the class, such as "Bench practice, evening group".', maxlength: 'At most 120 characters.' },
  term: { maxlength: 'At most 60 characters.' },
} satisfies Record<string, ErrorMessages>;

/** `/classes`: the caller's classes (an instructor's own, a student's, every class for an admin); an instructor creates one here. */
@Component({
  selector: 'dm-class-list',
  imports: [DatePipe, ReactiveFormsModule, RouterLink, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule, FieldErrors],
  templateUrl: './class-list.html',
  styleUrl: './class-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ClassList {
  private readonly api = inject(ClassesApi);
  private readonly auth = inject(Auth);
  private readonly router = inject(Router);

  protected readonly canCreate = computed(() => this.auth.hasRole('instructor'));
  protected readonly isStudent = computed(() => this.auth.hasRole('student'));
  protected readonly messages = CLASS_MESSAGES;

  private readonly reloads = signal(0);
  protected readonly loading = signal(true);
  protected readonly loadError = signal<string | null>(null);
  protected readonly classes = signal<ClassSummary[]>([]);
  protected readonly showArchived = signal(false);
  protected readonly shown = computed(() => this.classes().filter((c) => this.showArchived() || !c.archived));
  protected readonly archivedCount = computed(() => this.classes().filter((c) => c.archived).length);

  protected readonly creating = signal(false);
  protected readonly busy = signal(false);
  protected readonly formError = signal<string | null>(null);
  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', [Validators.required, Validators.maxLength(120)]],
    term: ['', [Validators.maxLength(60)]],
  });

  constructor() {
    toObservable(this.reloads)
      .pipe(
        tap(() => this.loading.set(true)),
        switchMap(() =>
          this.api.list().pipe(
            map((items) => ({ ok: true as const, items })),
            catchError((err: unknown) => of({ ok: false as const, message: apiErrorOf(err).message })),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((a) => {
        this.loading.set(false);
        this.loadError.set(a.ok ? null : a.message);
        if (a.ok) this.classes.set(a.items);
      });
  }

  protected reload(): void {
    this.reloads.update((n) => n + 1);
  }

  protected openCreate(): void {
    this.creating.set(true);
    this.formError.set(null);
  }

  protected createClass(): void {
    if (this.busy()) return;
    this.formError.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const v = this.form.getRawValue();
    this.busy.set(true);
    this.api.create({ name: v.name.trim(), term: v.term.trim() }).subscribe({
      next: (created) => void this.router.navigate(['/classes', created.id]),
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        if (!showServerError(this.form, e)) this.formError.set(e.message);
      },
    });
  }

  protected roleText(c: ClassSummary): string {
    return c.myRole === 'instructor' ? 'you teach' : c.myRole === 'student' ? `taught by ${c.instructor.name}` : `${c.instructor.name} teaches (admin view)`;
  }
}
