import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, OnInit, inject, input, output, signal } from '@angular/core';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { GATE_NOTICE } from '@domain/gates';
import type { SetDetail } from '@domain/set-format';
import { Observable } from 'rxjs';
import { apiErrorOf } from '../../../core/errors/api-error';
import { SafetyCaution } from '../../../shared/safety-caution/safety-caution';
import { GateItem, GatesView, SetsApi, firstPowerReasons } from '../../sets-api';

/**
 * Safety gates: checklist items drawn from the set's kind, each with its caution, signed and
 * reopened as append-only records. "Ready for first power" is refused while an item or a lifted
 * lead is open; the refusal's reasons are shown. A gate records; it certifies nothing.
 */
@Component({
  selector: 'dm-gates-section',
  imports: [DatePipe, ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule, SafetyCaution],
  template: `
    <dm-safety-caution />
    <p class="notice"><mat-icon aria-hidden="true" class="small">info</mat-icon> {{ view()?.notice || notice }}</p>
    @if (loading()) {
      <mat-progress-bar mode="indeterminate" aria-label="Loading the gates" />
    }
    @if (error(); as text) {
      <p class="dm-form-message" role="alert">{{ text }}</p>
    }
    @if (view(); as v) {
      <ul class="list" aria-label="Gate items">
        @for (item of v.items; track item.key) {
          <li class="gate">
            <div class="gate-head">
              <span class="state" [class.open]="item.open">
                <mat-icon aria-hidden="true" class="small">{{ item.open ? 'radio_button_unchecked' : 'task_alt' }}</mat-icon>
                {{ item.open ? 'Open' : 'Signed' }}
              </span>
              <strong>{{ item.title }}</strong>
            </div>
            <p class="gate-caution"><mat-icon aria-hidden="true" class="small">warning</mat-icon> {{ item.caution }}</p>
            @if (item.latest; as r) {
              <p class="sub">
                {{ r.action === 'signed' ? 'Signed' : 'Reopened' }} by {{ r.by?.name ?? 'someone' }}, {{ r.at | date: 'medium' }}{{ r.note ? ': ' + r.note : '' }}
              </p>
            }
            <div class="inline">
              <mat-form-field subscriptSizing="dynamic" class="note">
                <mat-label>Note for {{ item.title }}</mat-label>
                <input matInput [formControl]="noteFor(item.key)" autocomplete="off" />
              </mat-form-field>
              @if (item.open) {
                <button mat-flat-button type="button" class="dm-touch" [disabled]="busy()" (click)="sign(item)">Sign<span class="cdk-visually-hidden"> {{ item.title }}</span></button>
              } @else {
                <button mat-stroked-button type="button" class="dm-touch" [disabled]="busy()" (click)="reopen(item)">Reopen<span class="cdk-visually-hidden"> {{ item.title }}</span></button>
              }
            </div>
          </li>
        }
      </ul>

      <section class="block" aria-labelledby="first-power-title">
        <h3 id="first-power-title">First power</h3>
        @if (v.firstPower; as fp) {
          <p>
            <span class="state"><mat-icon aria-hidden="true" class="small">power</mat-icon> Recorded</span>
            by {{ fp.by?.name ?? 'someone' }}, {{ fp.at | date: 'medium' }}{{ fp.note ? ': ' + fp.note : '' }}. Keep the bring-up log as you go.
          </p>
        } @else {
          <p class="intro">
            Records that every gate item is signed and every lifted lead re-soldered. It does not say the set is fit to power:
            bring it up slowly through a limiter, and stay with it.
          </p>
          @if (v.blockers.length && !refusal()) {
            <p>Still open: {{ v.blockers.length }} ({{ blockerNames(v) }}).</p>
          }
          <button mat-flat-button type="button" class="dm-touch" [disabled]="busy()" (click)="firstPower()">
            <mat-icon aria-hidden="true">power_settings_new</mat-icon>
            Ready for first power
          </button>
          @if (refusal(); as r) {
            <div class="dm-form-message" role="alert">
              <p>{{ r.message }}</p>
              @if (r.reasons.length) {
                <ul>
                  @for (reason of r.reasons; track $index) {
                    <li>{{ reason }}</li>
                  }
                </ul>
              }
            </div>
          }
        }
      </section>
    }
  `,
  styleUrl: './section.scss',
  styles: `
    .notice { display: flex; gap: 8px; align-items: flex-start; font: var(--mat-sys-body-medium); }
    .gate-head { display: flex; flex-wrap: wrap; align-items: center; gap: 8px 16px; }
    .gate-caution { display: flex; gap: 8px; align-items: flex-start; margin: 8px 0; font: var(--mat-sys-body-medium); }
    .note { flex: 1 1 260px; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class GatesSection implements OnInit {
  private readonly api = inject(SetsApi);
  readonly set = input.required<SetDetail>();
  /** After first power is recorded: the set page reloads (first-power date). */
  readonly changed = output<void>();

  protected readonly notice = GATE_NOTICE;
  protected readonly view = signal<GatesView | null>(null);
  protected readonly loading = signal(true);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly refusal = signal<{ message: string; reasons: string[] } | null>(null);
  private readonly notes = new Map<string, FormControl<string>>();

  ngOnInit(): void {
    this.load();
  }

  protected blockerNames(v: GatesView): string {
    return v.blockers.map((b) => (b.kind === 'gate-item' ? b.title : `lifted lead ${b.componentRef} at ${b.node}`)).join('; ');
  }

  protected noteFor(key: string): FormControl<string> {
    let c = this.notes.get(key);
    if (!c) {
      c = new FormControl('', { nonNullable: true });
      this.notes.set(key, c);
    }
    return c;
  }

  private load(): void {
    this.loading.set(true);
    this.api.gates(this.set().id).subscribe({
      next: (v) => {
        this.loading.set(false);
        this.view.set(v);
      },
      error: (err: unknown) => {
        this.loading.set(false);
        this.error.set(apiErrorOf(err).message);
      },
    });
  }

  protected sign(item: GateItem): void {
    this.act(this.api.signGate(this.set().id, item.key, this.noteFor(item.key).value.trim()), item.key);
  }

  protected reopen(item: GateItem): void {
    if (this.noteFor(item.key).value.trim() === '') {
      this.error.set(`Say why you reopen "${item.title}" (in its note).`);
      return;
    }
    this.act(this.api.reopenGate(this.set().id, item.key, this.noteFor(item.key).value.trim()), item.key);
  }

  private act(call: Observable<unknown>, key: string): void {
    if (this.busy()) return;
    this.busy.set(true);
    this.error.set(null);
    this.refusal.set(null);
    call.subscribe({
      next: () => {
        this.busy.set(false);
        this.noteFor(key).setValue('');
        this.load();
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.error.set(apiErrorOf(err).message);
      },
    });
  }

  protected firstPower(): void {
    if (this.busy()) return;
    this.busy.set(true);
    this.refusal.set(null);
    this.error.set(null);
    this.api.firstPower(this.set().id).subscribe({
      next: () => {
        this.busy.set(false);
        this.load();
        this.changed.emit();
      },
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        if (e.status === 409) this.refusal.set({ message: e.message, reasons: firstPowerReasons(err) });
        else this.error.set(e.message);
      },
    });
  }
}
