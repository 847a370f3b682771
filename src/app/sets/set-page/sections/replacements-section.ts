import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, OnInit, computed, inject, input, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import type { SetDetail } from '@domain/set-format';
import { apiErrorOf } from '../../../core/errors/api-error';
import { VerdictBadge } from '../../../shared/verdict-badge/verdict-badge';
import { NEXT_STEP_LABELS, PURPOSE_LABELS, pctText } from '../../set-words';
import { ReplacementsView, SetsApi, downloadText } from '../../sets-api';

/**
 * The replacement list of a survey: what to order (parts out on conclusive evidence, and the
 * capacitor list by policy) with ordered/received marks and a CSV, and apart from it the parts to
 * confirm first, each with its next step. Nothing on the to-confirm list goes to the order.
 */
@Component({
  selector: 'dm-replacements-section',
  imports: [DatePipe, MatButtonModule, MatCheckboxModule, MatFormFieldModule, MatIconModule, MatProgressBarModule, MatSelectModule, VerdictBadge],
  template: `
    <p class="intro">Qty counts the parts of the same value, wattage and type across the set; the CSV has one line per purchase.</p>
    <div class="inline">
      @if (surveys().length) {
        <mat-form-field subscriptSizing="dynamic">
          <mat-label>From the survey</mat-label>
          <mat-select [value]="surveyId()" (valueChange)="choose($event)">
            @for (sv of surveys(); track sv.id) {
              <mat-option [value]="sv.id">{{ purposes[sv.purpose] }}, {{ sv.startedAt | date: 'mediumDate' }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
      }
      <button mat-stroked-button type="button" class="dm-touch" [disabled]="busy() || !list()" (click)="downloadCsv()">
        <mat-icon aria-hidden="true">download</mat-icon>
        Download CSV
      </button>
    </div>
    @if (loading()) {
      <mat-progress-bar mode="indeterminate" aria-label="Loading the replacement list" />
    }
    @if (error(); as text) {
      <p class="dm-form-message" role="alert">{{ text }}</p>
    }
    @if (list(); as l) {
      <h3>To order ({{ l.order.length }})</h3>
      @if (l.order.length) {
        <div class="table-wrap">
          <table class="plain" aria-label="Parts to order">
            <thead>
              <tr>
                <th scope="col" class="num">Qty</th>
                <th scope="col">Part</th>
                <th scope="col">Nominal</th>
                <th scope="col">Suggested value</th>
                <th scope="col">Rating and type</th>
                <th scope="col">Ordered</th>
                <th scope="col">Received</th>
              </tr>
            </thead>
            <tbody>
              @for (o of l.order; track o.componentKey + '/' + o.evidence.readingId) {
                <tr>
                  <td class="num">{{ o.quantity }}</td>
                  <th scope="row">{{ o.ref }}<div class="sub">{{ kindWords(o.kind) }}{{ o.valueFrom === 'factory-change' ? ' · value from a factory change' : '' }}</div></th>
                  <td>{{ o.nominalText }}</td>
                  <td>
                    @if (o.suggested; as v) {
                      {{ v.text }} <span class="sub">({{ pct(v.deviationPct) }}, {{ v.series }}{{ v.inBand ? '' : ', outside the band' }})</span>
                    } @else {
                      <span class="sub">{{ o.noSuggestion ?? 'no suggestion for this kind' }}</span>
                    }
                  </td>
                  <td>
                    {{ o.watts !== null ? o.watts + ' W' : '' }} {{ kindWords(o.type) }}
                    @if (o.voltageWarning) {
                      <div class="warn"><mat-icon aria-hidden="true" class="small">warning</mat-icon> {{ o.voltageWarning }}</div>
                    }
                    @for (n of o.warnings; track $index) {
                      <div class="sub">{{ n }}</div>
                    }
                  </td>
                  <td><mat-checkbox [checked]="o.ordered" [disabled]="busy()" (change)="mark(o.componentKey, $event.checked, o.received)">Ordered<span class="cdk-visually-hidden"> {{ o.ref }}</span></mat-checkbox></td>
                  <td><mat-checkbox [checked]="o.received" [disabled]="busy()" (change)="mark(o.componentKey, o.ordered, $event.checked)">Received<span class="cdk-visually-hidden"> {{ o.ref }}</span></mat-checkbox></td>
                </tr>
              }
            </tbody>
          </table>
        </div>
      } @else {
        <p class="empty">Nothing is out on conclusive evidence.</p>
      }

      <h3>Capacitors by policy ({{ l.capacitors.length }})</h3>
      @if (l.capacitors.length) {
        <div class="table-wrap">
          <table class="plain" aria-label="Capacitors to replace by policy">
            <thead>
              <tr><th scope="col">Part</th><th scope="col">Value and type</th><th scope="col" class="num">Qty</th><th scope="col">Ordered</th><th scope="col">Received</th></tr>
            </thead>
            <tbody>
              @for (c of l.capacitors; track c.componentKey) {
                <tr>
                  <th scope="row">{{ c.ref }}</th>
                  <td>
                    {{ c.text }} · {{ kindWords(c.type) }}{{ c.can ? ' · ' + c.can : '' }}
                    @if (c.reason === 'reading') {
                      <div class="sub">found out by a reading</div>
                    }
                    @for (w of c.warnings; track $index) {
                      <div class="warn"><mat-icon aria-hidden="true" class="small">warning</mat-icon> {{ w }}</div>
                    }
                  </td>
                  <td class="num">{{ c.quantity }}</td>
                  <td><mat-checkbox [checked]="c.ordered" [disabled]="busy()" (change)="mark(c.componentKey, $event.checked, c.received)">Ordered<span class="cdk-visually-hidden"> {{ c.ref }}</span></mat-checkbox></td>
                  <td><mat-checkbox [checked]="c.received" [disabled]="busy()" (change)="mark(c.componentKey, c.ordered, $event.checked)">Received<span class="cdk-visually-hidden"> {{ c.ref }}</span></mat-checkbox></td>
                </tr>
              }
            </tbody>
          </table>
        </div>
      } @else {
        <p class="empty">No capacitor list in this template.</p>
      }

      <h3>To confirm before ordering ({{ l.confirm.length }})</h3>
      <p class="intro">Out, but not on conclusive evidence yet: these are not on the order.</p>
      @if (l.confirm.length) {
        <ul class="list" aria-label="Parts to confirm">
          @for (c of l.confirm; track c.testPointKey) {
            <li>
              <strong>{{ c.ref }}</strong>
              <dm-verdict-badge [verdict]="c.verdict" />
              {{ c.readingText ? 'read ' + c.readingText : '' }}{{ c.nominalText ? ', nominal ' + c.nominalText : '' }}
              <div class="next"><mat-icon aria-hidden="true" class="small">arrow_forward</mat-icon> Next step: {{ nextSteps[c.nextStep] }}</div>
              @if (c.advice) {
                <div class="sub">{{ c.advice }}</div>
              }
            </li>
          }
        </ul>
      } @else {
        <p class="empty">Nothing to confirm.</p>
      }
    }
  `,
  styleUrl: './section.scss',
  styles: `
    .warn { display: flex; gap: 4px; align-items: center; font-weight: 600; }
    .next { display: flex; gap: 4px; align-items: center; margin-top: 4px; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ReplacementsSection implements OnInit {
  private readonly api = inject(SetsApi);
  readonly set = input.required<SetDetail>();

  protected readonly purposes = PURPOSE_LABELS;
  protected readonly nextSteps = NEXT_STEP_LABELS;
  protected readonly pct = pctText;
  protected readonly kindWords = (k: string) => k.replace(/-/g, ' ');
  protected readonly surveys = computed(() => [...this.set().surveys].sort((a, b) => b.startedAt.localeCompare(a.startedAt)));
  protected readonly surveyId = signal<number | null>(null);
  protected readonly list = signal<ReplacementsView | null>(null);
  protected readonly loading = signal(true);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);

  ngOnInit(): void {
    this.surveyId.set(this.surveys()[0]?.id ?? null);
    this.load();
  }

  protected choose(id: number): void {
    this.surveyId.set(id);
    this.load();
  }

  private load(): void {
    this.loading.set(true);
    this.error.set(null);
    this.api.replacements(this.set().id, this.surveyId()).subscribe({
      next: (l) => {
        this.loading.set(false);
        this.list.set(l);
      },
      error: (err: unknown) => {
        this.loading.set(false);
        this.error.set(apiErrorOf(err).message);
      },
    });
  }

  protected mark(componentKey: string, ordered: boolean, received: boolean): void {
    this.busy.set(true);
    this.api.markReplacement(this.set().id, componentKey, { ordered, received }).subscribe({
      next: () => {
        this.busy.set(false);
        this.list.update((l) =>
          l && {
            ...l,
            order: l.order.map((o) => (o.componentKey === componentKey ? { ...o, ordered, received } : o)),
            capacitors: l.capacitors.map((c) => (c.componentKey === componentKey ? { ...c, ordered, received } : c)),
          },
        );
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.error.set(apiErrorOf(err).message);
        this.load();
      },
    });
  }

  protected downloadCsv(): void {
    this.busy.set(true);
    this.api.replacementsCsv(this.set().id, this.surveyId()).subscribe({
      next: (file) => {
        this.busy.set(false);
        downloadText(file.filename, file.text, 'text/csv');
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.error.set(apiErrorOf(err).message);
      },
    });
  }
}
