import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { CompetencyRecord } from '@domain/class-format';
import { Auth } from '../../core/auth/auth';
import { apiErrorOf } from '../../core/errors/api-error';
import { ClassesApi } from '../classes-api';
import { CompetencyList } from '../shared/competency-list';

/** `/competencies`: the signed-in student's own competency record (read-only). */
@Component({
  selector: 'dm-competencies-page',
  imports: [RouterLink, MatProgressBarModule, CompetencyList],
  template: `
    <div class="dm-page">
      <nav class="crumbs" aria-label="Breadcrumb"><a routerLink="/classes">Classes</a></nav>
      <h1>My competencies</h1>
      <p class="intro">
        What your instructors have seen you do, signed off one by one. It is your record across classes;
        it is not a licence and says nothing about any set being safe.
      </p>
      @if (error(); as text) {
        <p class="dm-form-message" role="alert">{{ text }}</p>
      } @else if (record(); as r) {
        <p class="count" role="status">{{ signed(r) }} of {{ r.items.length }} signed off.</p>
        <dm-competency-list [record]="r" />
      } @else {
        <mat-progress-bar mode="indeterminate" aria-label="Loading your record" />
      }
    </div>
  `,
  styles: `
    .crumbs {
      margin-bottom: 8px;
    }
    .intro,
    .count {
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CompetenciesPage {
  private readonly api = inject(ClassesApi);
  protected readonly record = signal<CompetencyRecord | null>(null);
  protected readonly error = signal<string | null>(null);

  constructor() {
    const me = inject(Auth).user();
    if (!me) return;
    this.api
      .competencies(me.id)
      .pipe(takeUntilDestroyed())
      .subscribe({
        next: (r) => this.record.set(r),
        error: (err: unknown) => this.error.set(`Your record could not be loaded: ${apiErrorOf(err).message}`),
      });
  }

  protected signed(r: CompetencyRecord): number {
    return r.items.filter((i) => i.current !== null).length;
  }
}
