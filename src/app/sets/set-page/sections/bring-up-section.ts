import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, OnInit, inject, input, signal } from '@angular/core';
import { FormArray, FormControl, FormGroup, NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { BRING_UP_OBSERVATIONS, BRING_UP_STEPS, type BringUpEntry, type BringUpStep, type SetDetail } from '@domain/set-format';
import { apiErrorOf } from '../../../core/errors/api-error';
import { FieldErrors } from '../../../shared/field-errors/field-errors';
import { BRING_UP_STEP_LABELS, OBSERVATION_LABELS } from '../../set-words';
import { BringUpInput, SetsApi } from '../../sets-api';
import { optionalNumber } from './parts-section';

type BPlusRow = FormGroup<{ node: FormControl<string>; volts: FormControl<string> }>;

/** The bring-up log: limiter or variac steps, mains volts and current, first B+ readings, what was seen. */
@Component({
  selector: 'dm-bring-up-section',
  imports: [DatePipe, ReactiveFormsModule, MatButtonModule, MatCheckboxModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule, MatSelectModule, FieldErrors],
  template: `
    <p class="caution-line" role="note">
      <mat-icon aria-hidden="true" class="small">warning</mat-icon>
      Power is on from here: B+ and mains voltages can kill. Keep one hand away, measure with insulated probes, and stay with the set.
      A variac isolates nothing. Follow your local codes and licensed practice.
    </p>
    @if (loading()) {
      <mat-progress-bar mode="indeterminate" aria-label="Loading the bring-up log" />
    }
    @if (error(); as text) {
      <p class="dm-form-message" role="alert">{{ text }}</p>
    }
    @if (entries().length) {
      <ol class="list" aria-label="Bring-up log">
        @for (e of entries(); track e.id) {
          <li>
            <strong>{{ stepLabels[e.step] }}</strong>{{ e.setting ? ' · ' + e.setting : '' }}
            <span class="sub">{{ e.createdAt | date: 'medium' }}{{ e.recordedBy ? ', ' + e.recordedBy.name : '' }}</span>
            <div>
              {{ e.mainsVolts !== null ? e.mainsVolts + ' V mains' : '' }}{{ e.currentAmps !== null ? ' · ' + e.currentAmps + ' A drawn' : '' }}
              @for (b of e.bPlus; track $index) {
                · {{ b.node }}: {{ b.volts }} V
              }
            </div>
            @if (e.observations.length) {
              <div>Seen: {{ observationsText(e.observations) }}</div>
            }
            @if (e.note) {
              <div class="pre">{{ e.note }}</div>
            }
          </li>
        }
      </ol>
    } @else if (!loading() && !refused()) {
      <p class="empty">No entry yet.</p>
    }

    @if (!refused()) {
      <form class="block" [formGroup]="form" (ngSubmit)="add()" aria-labelledby="bring-up-add-title">
        <h3 id="bring-up-add-title">Add a step</h3>
        <div class="row-form">
          <mat-form-field>
            <mat-label>Step</mat-label>
            <mat-select formControlName="step">
              @for (s of steps; track s) {
                <mat-option [value]="s">{{ stepLabels[s] }}</mat-option>
              }
            </mat-select>
          </mat-form-field>
          <mat-form-field>
            <mat-label>Setting</mat-label>
            <input matInput formControlName="setting" autocomplete="off" />
            <mat-hint>60 W lamp; variac at 80 V…</mat-hint>
          </mat-form-field>
          <mat-form-field>
            <mat-label>Mains volts</mat-label>
            <input matInput formControlName="mainsVolts" inputmode="decimal" autocomplete="off" />
            <mat-error><dm-field-errors [control]="form.controls.mainsVolts" /></mat-error>
          </mat-form-field>
          <mat-form-field>
            <mat-label>Current drawn (A)</mat-label>
            <input matInput formControlName="currentAmps" inputmode="decimal" autocomplete="off" />
            <mat-error><dm-field-errors [control]="form.controls.currentAmps" /></mat-error>
          </mat-form-field>
        </div>
        <fieldset formArrayName="bPlus">
          <legend>B+ readings</legend>
          @for (row of bPlusRows.controls; track row; let i = $index) {
            <div class="row-form" [formGroupName]="i">
              <mat-form-field>
                <mat-label>Node {{ i + 1 }}</mat-label>
                <input matInput formControlName="node" autocomplete="off" />
              </mat-form-field>
              <mat-form-field>
                <mat-label>Volts {{ i + 1 }}</mat-label>
                <input matInput formControlName="volts" inputmode="decimal" autocomplete="off" />
                <mat-error><dm-field-errors [control]="row.controls.volts" /></mat-error>
              </mat-form-field>
              <button mat-icon-button type="button" (click)="bPlusRows.removeAt(i)" [attr.aria-label]="'Remove B+ reading ' + (i + 1)"><mat-icon aria-hidden="true">delete</mat-icon></button>
            </div>
          }
          <button mat-stroked-button type="button" class="dm-touch" (click)="addBPlus()"><mat-icon aria-hidden="true">add</mat-icon>Add a B+ reading</button>
        </fieldset>
        <fieldset>
          <legend>Seen, heard, smelt</legend>
          <div class="inline">
            @for (o of observations; track o) {
              <mat-checkbox [checked]="chosen().includes(o)" (change)="toggle(o, $event.checked)">{{ observationLabels[o] }}</mat-checkbox>
            }
          </div>
        </fieldset>
        <mat-form-field class="wide">
          <mat-label>Note</mat-label>
          <textarea matInput formControlName="note" rows="2"></textarea>
        </mat-form-field>
        <button mat-flat-button type="submit" class="dm-touch" [disabled]="busy()">Add to the log</button>
      </form>
    }
  `,
  styleUrl: './section.scss',
  styles: `
    fieldset { border: 0; padding: 0; margin: 8px 0; } legend { font: var(--mat-sys-title-small); margin-bottom: 8px; } .wide { width: 100%; margin-top: 8px; }
    .caution-line { display: flex; gap: 8px; align-items: flex-start; font-weight: 500; padding: 8px 12px; border: 2px solid var(--mat-sys-error); border-radius: var(--mat-sys-corner-small); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BringUpSection implements OnInit {
  private readonly api = inject(SetsApi);
  private readonly fb = inject(NonNullableFormBuilder);
  readonly set = input.required<SetDetail>();

  protected readonly steps = BRING_UP_STEPS;
  protected readonly stepLabels = BRING_UP_STEP_LABELS;
  protected readonly observations = BRING_UP_OBSERVATIONS;
  protected readonly observationLabels = OBSERVATION_LABELS;
  protected readonly entries = signal<readonly BringUpEntry[]>([]);
  protected readonly chosen = signal<readonly string[]>([]);
  protected readonly loading = signal(true);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  /** The API refuses the log before first power is recorded (409). */
  protected readonly refused = signal(false);
  protected readonly form = this.fb.group({
    step: this.fb.control<BringUpStep>('limiter-lamp'),
    setting: [''],
    mainsVolts: [''],
    currentAmps: [''],
    bPlus: this.fb.array<BPlusRow>([]),
    note: [''],
  });

  protected get bPlusRows(): FormArray<BPlusRow> {
    return this.form.controls.bPlus;
  }

  ngOnInit(): void {
    this.load();
  }

  protected observationsText(list: readonly string[]): string {
    return list.map((o) => OBSERVATION_LABELS[o] ?? o).join(', ');
  }

  protected addBPlus(): void {
    this.bPlusRows.push(this.fb.group({ node: ['B+'], volts: [''] }));
  }

  protected toggle(o: string, on: boolean): void {
    this.chosen.update((list) => (on ? [...list.filter((x) => x !== o), o] : list.filter((x) => x !== o)));
  }

  private load(): void {
    this.loading.set(true);
    this.api.bringUp(this.set().id).subscribe({
      next: (entries) => {
        this.loading.set(false);
        this.entries.set(entries);
        if (this.set().firstPowerAt === null) {
          this.refused.set(true);
          this.error.set('The bring-up log starts once "ready for first power" is recorded under Safety gates.');
        }
      },
      error: (err: unknown) => this.fail(err),
    });
  }

  private fail(err: unknown): void {
    this.loading.set(false);
    this.busy.set(false);
    const e = apiErrorOf(err);
    if (e.status === 409) this.refused.set(true);
    this.error.set(e.status === 409 ? `${e.message} Record it under Safety gates first.` : e.message);
  }

  protected add(): void {
    if (this.busy()) return;
    const v = this.form.getRawValue();
    const mainsVolts = optionalNumber(v.mainsVolts);
    const currentAmps = optionalNumber(v.currentAmps);
    let bad = false;
    if (Number.isNaN(mainsVolts) || (mainsVolts !== null && (mainsVolts < 0 || mainsVolts > 300))) {
      this.form.controls.mainsVolts.setErrors({ server: 'A number of volts from 0 to 300, such as 117.' });
      bad = true;
    }
    if (Number.isNaN(currentAmps) || (currentAmps !== null && (currentAmps < 0 || currentAmps > 20))) {
      this.form.controls.currentAmps.setErrors({ server: 'A number of amperes from 0 to 20, such as 0.35.' });
      bad = true;
    }
    const bPlus: { node: string; volts: number }[] = [];
    this.bPlusRows.controls.forEach((row) => {
      const volts = optionalNumber(row.controls.volts.value);
      if (volts === null || Number.isNaN(volts)) {
        row.controls.volts.setErrors({ server: 'A number of volts.' });
        row.controls.volts.markAsTouched();
        bad = true;
      } else bPlus.push({ node: row.controls.node.value.trim() || 'B+', volts });
    });
    if (bad) {
      this.form.markAllAsTouched();
      return;
    }
    const entry: BringUpInput = { step: v.step, setting: v.setting.trim(), mainsVolts, currentAmps, bPlus, observations: [...this.chosen()], note: v.note.trim() };
    this.busy.set(true);
    this.error.set(null);
    this.api.addBringUp(this.set().id, entry).subscribe({
      next: (saved) => {
        this.busy.set(false);
        this.entries.update((list) => [...list, saved]);
        this.form.reset({ step: v.step, setting: '', mainsVolts: '', currentAmps: '', note: '' });
        this.bPlusRows.clear();
        this.chosen.set([]);
      },
      error: (err: unknown) => this.fail(err),
    });
  }
}
