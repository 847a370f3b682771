import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, OnInit, computed, inject, input, output, signal } from '@angular/core';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { LiftedLeadRecord, SetDetail } from '@domain/set-format';
import { apiErrorOf } from '../../../core/errors/api-error';
import { SetsApi } from '../../sets-api';

/** The lifted-lead list: each physical lead lifted for a reading, open until marked re-soldered. */
@Component({
  selector: 'dm-lifted-leads-section',
  imports: [DatePipe, ReactiveFormsModule, RouterLink, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule],
  template: `
    <p class="intro">"Ready for first power" is refused while a lead here is open. Leads are lifted from the survey grid.</p>
    @if (loading()) {
      <mat-progress-bar mode="indeterminate" aria-label="Loading the lifted leads" />
    }
    @if (error(); as text) {
      <p class="dm-form-message" role="alert">{{ text }}</p>
    }
    <h3>Open ({{ open().length }})</h3>
    @if (open().length) {
      <ul class="list" aria-label="Open lifted leads">
        @for (l of open(); track l.id) {
          <li>
            <span class="state open"><mat-icon aria-hidden="true" class="small">link_off</mat-icon> Open</span>
            <strong>{{ l.componentRef }}</strong>, end {{ l.end + 1 }} at {{ l.node }}
            <div class="sub">
              Lifted by {{ l.liftedBy?.name ?? 'someone' }}, {{ l.liftedAt | date: 'medium' }}
              @if (l.surveyId) {
                · <a [routerLink]="['/surveys', l.surveyId]">survey</a>
              }
              {{ l.note ? '· ' + l.note : '' }}
            </div>
            <div class="inline">
              <mat-form-field subscriptSizing="dynamic" class="note">
                <mat-label>Note on re-soldering {{ l.componentRef }}</mat-label>
                <input matInput [formControl]="noteFor(l.id)" autocomplete="off" />
              </mat-form-field>
              <button mat-flat-button type="button" class="dm-touch" [disabled]="busy()" (click)="resolder(l)">
                Re-soldered<span class="cdk-visually-hidden"> {{ l.componentRef }} at {{ l.node }}</span>
              </button>
            </div>
          </li>
        }
      </ul>
    } @else if (!loading()) {
      <p class="empty">No open lifted lead.</p>
    }
    <h3>Re-soldered ({{ closed().length }})</h3>
    @if (closed().length) {
      <ul class="list" aria-label="Re-soldered leads">
        @for (l of closed(); track l.id) {
          <li>
            <span class="state"><mat-icon aria-hidden="true" class="small">link</mat-icon> Re-soldered</span>
            <strong>{{ l.componentRef }}</strong>, end {{ l.end + 1 }} at {{ l.node }}
            <div class="sub">
              Lifted by {{ l.liftedBy?.name ?? 'someone' }}, {{ l.liftedAt | date: 'medium' }} · re-soldered by
              {{ l.resolderedBy?.name ?? 'someone' }}, {{ l.resolderedAt | date: 'medium' }}{{ l.note ? ' · ' + l.note : '' }}
              {{ l.recheckReadingId ? '· re-check reading recorded' : '' }}
            </div>
          </li>
        }
      </ul>
    }
  `,
  styleUrl: './section.scss',
  styles: `.note { flex: 1 1 260px; }`,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LiftedLeadsSection implements OnInit {
  private readonly api = inject(SetsApi);
  readonly set = input.required<SetDetail>();
  /** After a re-solder: the set page reloads (open-lead count). */
  readonly changed = output<void>();

  protected readonly leads = signal<readonly LiftedLeadRecord[]>([]);
  protected readonly open = computed(() => this.leads().filter((l) => l.resolderedAt === null));
  protected readonly closed = computed(() => this.leads().filter((l) => l.resolderedAt !== null));
  protected readonly loading = signal(true);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  private readonly notes = new Map<number, FormControl<string>>();

  ngOnInit(): void {
    this.load();
  }

  protected noteFor(id: number): FormControl<string> {
    let c = this.notes.get(id);
    if (!c) {
      c = new FormControl('', { nonNullable: true });
      this.notes.set(id, c);
    }
    return c;
  }

  private load(): void {
    this.loading.set(true);
    this.api.liftedLeads(this.set().id).subscribe({
      next: (list) => {
        this.loading.set(false);
        this.leads.set(list);
      },
      error: (err: unknown) => {
        this.loading.set(false);
        this.error.set(apiErrorOf(err).message);
      },
    });
  }

  protected resolder(l: LiftedLeadRecord): void {
    if (this.busy()) return;
    this.busy.set(true);
    this.error.set(null);
    this.api.resolder(this.set().id, l.id, this.noteFor(l.id).value.trim()).subscribe({
      next: (updated) => {
        this.busy.set(false);
        this.leads.update((list) => list.map((x) => (x.id === updated.id ? updated : x)));
        this.changed.emit();
      },
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        this.error.set(e.status === 409 ? 'That lead is already marked re-soldered.' : e.message);
        this.load();
      },
    });
  }
}
