import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, OnInit, computed, inject, input, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import type { SetDetail } from '@domain/set-format';
import { apiErrorOf } from '../../../core/errors/api-error';
import { VerdictBadge } from '../../../shared/verdict-badge/verdict-badge';
import { PURPOSE_LABELS, pctText } from '../../set-words';
import { formatOhms } from '@domain/notation';
import type { HistoryPoint, PartInstance } from '@domain/part-history';
import { SetHistory, SetsApi, SurveyCompare } from '../../sets-api';
import { HistoryChart } from './history-chart';
import { bandOf } from './history-data';

/** The drift rate in words: `+1.20 %/year (95 % interval +0.40 to +2.00 %/year, 4 surveys)`, or why there is none. */
export function rateText(part: PartInstance): string {
  const r = part.rate;
  if (r.slopePctPerYear === null) return `No rate: ${r.reason.replace(/\.$/, '')}.`;
  const f = (x: number) => `${x > 0 ? '+' : x < 0 ? '−' : ''}${Math.abs(x).toFixed(2)}`;
  return `Drift rate ${f(r.slopePctPerYear)} %/year (95 % interval ${f(r.interval.low)} to ${f(r.interval.high)} %/year, ${r.n} surveys).`;
}

/** The projection to the band edge in words, always labelled as an extrapolation. */
export function projectionText(part: PartInstance): string | null {
  const p = part.projection;
  if (!p) return null;
  if (p.edge === null) return `Extrapolation: ${p.reason}. ${p.note}.`;
  const latest = p.range.latestYearsAhead === null ? 'never, within the interval' : `${p.range.latestYearsAhead.toFixed(1)} years`;
  return `Extrapolation: the fitted line meets the ${p.edge} band edge in about ${p.yearsAhead.toFixed(1)} years (soonest ${p.range.soonestYearsAhead.toFixed(1)} years, latest ${latest}). ${p.note}.`;
}

/** A point's value as read: `5.6 kΩ`, or its state. */
export function pointText(p: HistoryPoint): string {
  if (p.state !== 'value' || p.ohms === null) return p.state.replace(/-/g, ' ');
  return formatOhms(p.ohms) + (p.valueFrom === 'implied' ? ' (implied)' : '');
}

/**
 * History: each part instance across the set's complete surveys (a replacement starts a new
 * instance), as a chart (loaded lazily) and as a table; the rate only where there is enough data;
 * and a before/after comparison of two surveys.
 */
@Component({
  selector: 'dm-history-section',
  imports: [DatePipe, MatButtonModule, MatFormFieldModule, MatIconModule, MatProgressBarModule, MatSelectModule, VerdictBadge, HistoryChart],
  template: `
    @if (loading()) {
      <mat-progress-bar mode="indeterminate" aria-label="Loading the history" />
    }
    @if (error(); as text) {
      <p class="dm-form-message" role="alert">{{ text }}</p>
    }
    @if (history(); as h) {
      @if (h.parts.length === 0) {
        <p class="empty">No history yet: complete surveys build it.</p>
      }
      @for (part of byDrift(h.parts); track part.componentKey + '/' + part.instance) {
        <section class="part" [attr.aria-labelledby]="'part-' + part.componentKey + '-' + part.instance">
          <h3 [id]="'part-' + part.componentKey + '-' + part.instance">
            {{ part.ref }}
            <span class="sub">
              {{ part.original ? 'original part' : 'replacement ' + (part.instance - 1) + (part.startedBy ? ' (' + part.startedBy.text + '), fitted ' + (part.startedBy.at | date: 'mediumDate') : '') }}
              {{ part.endedBy ? '· replaced ' + (part.endedBy.at | date: 'mediumDate') : '' }}
              {{ band(part) ? '· band ' + band(part)!.lowPct + ' % to +' + band(part)!.highPct + ' %' : '' }}
            </span>
          </h3>
          @defer (on idle) {
            <dm-history-chart [part]="part" />
          } @placeholder {
            <p class="sub">Chart loading…</p>
          }
          <p class="rate">{{ rate(part) }}</p>
          @if (projection(part); as text) {
            <p class="sub">{{ text }}</p>
          }
          <div class="table-wrap">
            <table class="plain" [attr.aria-label]="'Readings of ' + part.ref + ' over time'">
              <thead>
                <tr>
                  <th scope="col">Survey</th>
                  <th scope="col">Reading</th>
                  <th scope="col" class="num">Drift</th>
                  <th scope="col" class="num">U (k = 2)</th>
                  <th scope="col">Verdict</th>
                  <th scope="col">Meter and method</th>
                </tr>
              </thead>
              <tbody>
                @for (p of part.points; track p.readingId) {
                  <tr>
                    <td>{{ p.at | date: 'mediumDate' }}</td>
                    <td>{{ reading(p) }}</td>
                    <td class="num">{{ pct(p.driftPct) }}</td>
                    <td class="num">{{ p.uncertaintyPct !== null ? '±' + p.uncertaintyPct.toFixed(1) + ' %' : '—' }}</td>
                    <td>
                      <dm-verdict-badge [verdict]="p.verdict" />
                    </td>
                    <td>
                      {{ p.meter ?? 'no meter profile' }}, {{ p.method.replace('-', ' ') }}
                      @if (p.marks.includes('meter-changed') || p.marks.includes('method-changed')) {
                        <div class="sub">
                          <mat-icon aria-hidden="true" class="small">change_history</mat-icon>
                          {{ p.marks.includes('meter-changed') ? 'meter changed' : 'method changed' }} (triangle in the chart)
                        </div>
                      }
                    </td>
                  </tr>
                }
              </tbody>
            </table>
          </div>
        </section>
      }
    }

    <section class="block" aria-labelledby="compare-title">
      <h3 id="compare-title">Compare two surveys</h3>
      @if (surveys().length < 2) {
        <p class="empty">Two surveys of this set are needed.</p>
      } @else {
        <div class="inline">
          <mat-form-field subscriptSizing="dynamic">
            <mat-label>Before</mat-label>
            <mat-select [value]="a()" (valueChange)="a.set($event)">
              @for (sv of surveys(); track sv.id) {
                <mat-option [value]="sv.id">{{ purposes[sv.purpose] }}, {{ sv.startedAt | date: 'mediumDate' }}</mat-option>
              }
            </mat-select>
          </mat-form-field>
          <mat-form-field subscriptSizing="dynamic">
            <mat-label>After</mat-label>
            <mat-select [value]="b()" (valueChange)="b.set($event)">
              @for (sv of surveys(); track sv.id) {
                <mat-option [value]="sv.id">{{ purposes[sv.purpose] }}, {{ sv.startedAt | date: 'mediumDate' }}</mat-option>
              }
            </mat-select>
          </mat-form-field>
          <button mat-stroked-button type="button" class="dm-touch" [disabled]="a() === null || b() === null || a() === b()" (click)="compare()">Compare</button>
        </div>
        @if (compareError(); as text) {
          <p class="dm-form-message" role="alert">{{ text }}</p>
        }
        @if (comparison(); as c) {
          <div class="table-wrap">
            <table class="plain" aria-label="Before and after">
              <thead>
                <tr>
                  <th scope="col">Test point</th>
                  <th scope="col">Before{{ c.a ? ' (' + (c.a.startedAt | date: 'mediumDate') + ')' : '' }}</th>
                  <th scope="col">After{{ c.b ? ' (' + (c.b.startedAt | date: 'mediumDate') + ')' : '' }}</th>
                  <th scope="col" class="num">Change</th>
                </tr>
              </thead>
              <tbody>
                @for (r of c.rows; track r.testPointKey) {
                  <tr>
                    <th scope="row">{{ r.label }}<div class="sub">{{ r.stageName }}</div></th>
                    <td>
                      @if (r.a; as x) {
                        {{ x.text }} <dm-verdict-badge [verdict]="x.verdict" />
                      } @else {
                        <span class="sub">not read</span>
                      }
                    </td>
                    <td>
                      @if (r.b; as x) {
                        {{ x.text }} <dm-verdict-badge [verdict]="x.verdict" />
                      } @else {
                        <span class="sub">not read</span>
                      }
                    </td>
                    <td class="num">
                      {{ pct(r.changePct) }}
                      @if (r.methodChanged) {
                        <div class="sub">method changed</div>
                      }
                    </td>
                  </tr>
                }
              </tbody>
            </table>
          </div>
        }
      }
    </section>
  `,
  styleUrl: './section.scss',
  styles: `.part { margin-bottom: 24px; } .rate { font-weight: 500; } @media print { .part { break-inside: avoid; } }`,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class HistorySection implements OnInit {
  private readonly api = inject(SetsApi);
  readonly set = input.required<SetDetail>();

  protected readonly purposes = PURPOSE_LABELS;
  protected readonly pct = pctText;
  protected readonly rate = rateText;
  protected readonly projection = projectionText;
  protected readonly reading = pointText;
  protected readonly band = bandOf;
  protected readonly history = signal<SetHistory | null>(null);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  /** Oldest first: "before" defaults to the oldest, "after" to the newest. */
  protected readonly surveys = computed(() => [...this.set().surveys].sort((x, y) => x.startedAt.localeCompare(y.startedAt)));

  /** The parts that drifted most come first (largest |drift| of any point), then the template's order. */
  protected byDrift(parts: readonly PartInstance[]): PartInstance[] {
    const most = (p: PartInstance) => Math.max(0, ...p.points.map((x) => (x.driftPct === null ? 0 : Math.abs(x.driftPct))));
    return parts.map((p, i) => ({ p, i, m: most(p) })).sort((a, b) => b.m - a.m || a.i - b.i).map((x) => x.p);
  }
  protected readonly a = signal<number | null>(null);
  protected readonly b = signal<number | null>(null);
  protected readonly comparison = signal<SurveyCompare | null>(null);
  protected readonly compareError = signal<string | null>(null);

  ngOnInit(): void {
    const list = this.surveys();
    if (list.length >= 2) {
      this.a.set(list[0].id);
      this.b.set(list[list.length - 1].id);
    }
    this.api.history(this.set().id).subscribe({
      next: (h) => {
        this.loading.set(false);
        this.history.set(h);
      },
      error: (err: unknown) => {
        this.loading.set(false);
        this.error.set(apiErrorOf(err).message);
      },
    });
  }

  protected compare(): void {
    const a = this.a();
    const b = this.b();
    if (a === null || b === null || a === b) return;
    this.compareError.set(null);
    this.api.compare(this.set().id, a, b).subscribe({
      next: (c) => this.comparison.set(c),
      error: (err: unknown) => this.compareError.set(apiErrorOf(err).message),
    });
  }
}
