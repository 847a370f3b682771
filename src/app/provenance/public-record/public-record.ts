import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { catchError, map, of, switchMap } from 'rxjs';
import { apiErrorOf } from '../../core/errors/api-error';
import { PURPOSE_LABELS, countsText } from '../../sets/set-words';
import type { PublicRecord } from '../../sets/sets-api';
import { ProvenanceApi } from '../provenance-api';

type Loaded = { state: 'loading' } | { state: 'ok'; value: PublicRecord } | { state: 'failed'; status: number; message: string };

/**
 * `/p/:token`: the public provenance page a label's QR code opens. No sign-in and no owner
 * identity: chassis, serial, survey dates with verdict counts, parts replaced, first power.
 */
@Component({
  selector: 'dm-public-record',
  imports: [DatePipe, MatProgressBarModule],
  template: `
    <div class="dm-page">
      @switch (loaded().state) {
        @case ('loading') {
          <mat-progress-bar mode="indeterminate" aria-label="Loading the record" />
        }
        @case ('failed') {
          <h1>Record not available</h1>
          <p class="dm-form-message" role="alert">{{ failure() }}</p>
        }
      }
      @if (record(); as r) {
        <h1>{{ r.chassis.maker }} {{ r.chassis.model }}</h1>
        <p class="byline">
          {{ r.chassis.chassisNumber ? 'Chassis ' + r.chassis.chassisNumber + ' · ' : '' }}serial {{ r.serial || 'not recorded' }}
          {{ years(r) }}
        </p>
        @if (r.notice) {
          <p class="sub">{{ r.notice }}</p>
        }
        <p class="notice">
          A read-only record of what was measured and replaced on this set. It certifies nothing: no reading or verdict here means the set
          is safe to use. Have it checked by someone qualified before you plug it in.
        </p>
        <h2>Surveys</h2>
        @if (r.surveys.length) {
          <ul>
            @for (s of r.surveys; track $index) {
              <li><strong>{{ purposeLabel(s.purpose) }}, {{ s.date | date: 'mediumDate' }}</strong>: {{ counts(s.counts) }}</li>
            }
          </ul>
        } @else {
          <p>No survey recorded.</p>
        }
        <h2>Parts replaced</h2>
        @if (r.partsReplaced.length) {
          <ul>
            @for (p of r.partsReplaced; track $index) {
              <li>{{ p.ref }}{{ p.text ? ': ' + p.text : '' }} ({{ p.date | date: 'mediumDate' }})</li>
            }
          </ul>
        } @else {
          <p>None recorded.</p>
        }
        @if (r.gatesSigned?.length) {
          <h2>Checks signed before first power</h2>
          <ul>
            @for (g of r.gatesSigned; track $index) {
              <li>{{ g.title }} ({{ g.at | date: 'mediumDate' }})</li>
            }
          </ul>
        }
        <h2>First power</h2>
        <p>{{ r.firstPowerAt ? (r.firstPowerAt | date: 'mediumDate') : 'Not recorded.' }}</p>
      }
    </div>
  `,
  styles: `
    .byline { color: var(--mat-sys-on-surface-variant); }
    .notice { font-weight: 600; border: 1px solid var(--mat-sys-outline); padding: 8px 12px; border-radius: var(--mat-sys-corner-small); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PublicRecordPage {
  private readonly api = inject(ProvenanceApi);

  /** Route parameter. */
  readonly token = input.required<string>();
  protected readonly counts = countsText;
  protected readonly loaded = signal<Loaded>({ state: 'loading' });
  protected readonly record = computed(() => {
    const l = this.loaded();
    return l.state === 'ok' ? l.value : null;
  });
  protected readonly failure = computed(() => {
    const l = this.loaded();
    if (l.state !== 'failed') return '';
    return l.status === 404 ? 'This link is unknown or has been revoked by the set\'s keeper.' : l.message;
  });

  constructor() {
    toObservable(this.token)
      .pipe(
        switchMap((token) =>
          this.api.publicRecord(token).pipe(
            map((value): Loaded => ({ state: 'ok', value })),
            catchError((err: unknown) => {
              const e = apiErrorOf(err);
              return of<Loaded>({ state: 'failed', status: e.status, message: e.message });
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((l) => this.loaded.set(l));
  }

  protected purposeLabel(purpose: string): string {
    return (PURPOSE_LABELS as Readonly<Record<string, string | undefined>>)[purpose] ?? purpose;
  }

  protected years(r: PublicRecord): string {
    const { yearFrom, yearTo } = r.chassis;
    if (!yearFrom && !yearTo) return '';
    return ` · made ${yearFrom ?? ''}${yearTo && yearTo !== yearFrom ? '–' + yearTo : ''}`;
  }
}
