import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import type { ClassDetail, ClassResults } from '@domain/class-format';
import { catchError, map, of, switchMap } from 'rxjs';
import { apiErrorOf } from '../../../core/errors/api-error';
import { downloadText } from '../../../sets/sets-api';
import { ClassesApi } from '../../classes-api';
import { StatusChip } from '../../shared/status-chip';
import { ResultsChart } from './results-chart';

/** A share as a percentage in words: `75 % (3 of 4)`, or why there is none. */
export function shareText(p: { compared: number; agreed: number; share: number | null }): string {
  if (p.compared === 0) return 'none compared';
  return `${Math.round((p.agreed / p.compared) * 100)} % (${p.agreed} of ${p.compared})`;
}

/** Students × assignments (status, score, attempts), per test point the share that agreed with the reference, and the CSV. */
@Component({
  selector: 'dm-results-section',
  imports: [MatButtonModule, MatFormFieldModule, MatIconModule, MatProgressBarModule, MatSelectModule, StatusChip, ResultsChart],
  template: `
    @if (loading()) {
      <mat-progress-bar mode="indeterminate" aria-label="Loading the results" />
    }
    @if (error(); as text) {
      <p class="dm-form-message" role="alert">{{ text }}</p>
    }
    <div class="inline">
      <button mat-stroked-button type="button" class="dm-touch" [disabled]="downloading()" (click)="downloadCsv()">
        <mat-icon aria-hidden="true">download</mat-icon>
        Download CSV
      </button>
      <button mat-button type="button" class="dm-touch" (click)="print()">
        <mat-icon aria-hidden="true">print</mat-icon>
        Print
      </button>
    </div>
    @if (results(); as r) {
      @if (r.students.length === 0 || r.assignments.length === 0) {
        <p class="empty">Results appear once the class has students and assignments.</p>
      } @else {
        <div class="table-wrap">
          <table class="plain results" aria-label="Results: students by assignments">
            <thead>
              <tr>
                <th scope="col">Student</th>
                @for (a of r.assignments; track a.id) {
                  <th scope="col">{{ a.title }}</th>
                }
              </tr>
            </thead>
            <tbody>
              @for (s of r.students; track s.id; let si = $index) {
                <tr>
                  <th scope="row">{{ s.name }}</th>
                  @for (a of r.assignments; track a.id; let ai = $index) {
                    @if (r.cells[si]?.[ai]; as cell) {
                      <td>
                        <dm-status-chip [status]="cell.status" [late]="cell.late" />
                        <div class="sub">
                          {{ cell.score !== null ? 'score ' + cell.score : 'no score' }}{{ cell.attempts ? ' · ' + (cell.attempts === 1 ? '1 attempt' : cell.attempts + ' attempts') : '' }}
                        </div>
                      </td>
                    } @else {
                      <td>—</td>
                    }
                  }
                </tr>
              }
            </tbody>
          </table>
        </div>

        <h3>Where students go wrong</h3>
        <p class="sub">Per test point, the share of students whose latest attempt agreed with the reference (E<sub>n</sub> ≤ 1), lowest first.</p>
        <mat-form-field subscriptSizing="dynamic">
          <mat-label>Assignment</mat-label>
          <mat-select [value]="chosen()" (valueChange)="chosen.set($event)">
            @for (a of r.assignments; track a.id) {
              <mat-option [value]="a.id">{{ a.title }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
        @if (points().length === 0) {
          <p class="empty">No test point compared yet (a reference survey and submissions are needed).</p>
        } @else {
          @defer (on idle) {
            <dm-results-chart [points]="points()" />
          } @placeholder {
            <p class="sub">Chart loading…</p>
          }
          <div class="table-wrap">
            <table class="plain" aria-label="Agreement with the reference per test point">
              <thead>
                <tr><th scope="col">Test point</th><th scope="col" class="num">Agreed with the reference</th></tr>
              </thead>
              <tbody>
                @for (p of points(); track p.testPointKey) {
                  <tr [class.weak]="p.compared > 0 && p.agreed * 2 < p.compared">
                    <td>{{ p.label }}</td>
                    <td class="num">{{ share(p) }}</td>
                  </tr>
                }
              </tbody>
            </table>
          </div>
        }
        @if (uncompared().length) {
          <p class="sub" data-test="uncompared">Not compared at {{ uncompared().length }} test point{{ uncompared().length === 1 ? '' : 's' }}: {{ labels(uncompared()) }}.</p>
        }
      }
    }
  `,
  styleUrl: './section.scss',
  styles: `
    .results td,
    .results th {
      min-width: 120px;
    }
    tr.weak td {
      font-weight: 600;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ResultsSection {
  private readonly api = inject(ClassesApi);
  readonly cls = input.required<ClassDetail>();

  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  protected readonly results = signal<ClassResults | null>(null);
  protected readonly chosen = signal<number | null>(null);
  protected readonly downloading = signal(false);
  private readonly ofAssignment = computed(() => {
    const r = this.results();
    const id = this.chosen();
    return r && id !== null ? r.points.filter((p) => p.assignmentId === id) : [];
  });
  /** The compared points, where students went wrong most first (lowest share of agreement). */
  protected readonly points = computed(() =>
    this.ofAssignment()
      .filter((p) => p.compared > 0)
      .sort((a, b) => a.agreed / a.compared - b.agreed / b.compared || a.label.localeCompare(b.label)),
  );
  /** Points no student's reading could be compared at (no reference reading, not read, other method). */
  protected readonly uncompared = computed(() => this.ofAssignment().filter((p) => p.compared === 0));
  protected readonly share = shareText;
  protected labels(points: readonly { label: string }[]): string {
    return points.map((p) => p.label).join(', ');
  }

  constructor() {
    toObservable(computed(() => this.cls().id))
      .pipe(
        switchMap((id) =>
          this.api.results(id).pipe(
            map((r) => ({ ok: true as const, r })),
            catchError((err: unknown) => of({ ok: false as const, message: apiErrorOf(err).message })),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((a) => {
        this.loading.set(false);
        if (!a.ok) {
          this.error.set(`The results could not be loaded: ${a.message}`);
          return;
        }
        this.results.set(a.r);
        if (this.chosen() === null && a.r.assignments.length) this.chosen.set(a.r.assignments[0].id);
      });
  }

  protected downloadCsv(): void {
    if (this.downloading()) return;
    this.downloading.set(true);
    this.error.set(null);
    this.api.resultsCsv(this.cls().id).subscribe({
      next: (file) => {
        this.downloading.set(false);
        downloadText(file.filename, file.text, 'text/csv');
      },
      error: (err: unknown) => {
        this.downloading.set(false);
        this.error.set(`The CSV could not be made: ${apiErrorOf(err).message}`);
      },
    });
  }

  protected print(): void {
    window.print();
  }
}
