import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, OnInit, computed, inject, input, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { parseResistance } from '@domain/notation';
import { PARTS_ACTIONS, type NewPart, type PartsAction, type PartsRecordLine, type SetDetail } from '@domain/set-format';
import type { TemplateDocument } from '@domain/template-format';
import { startWith } from 'rxjs';
import { apiErrorOf } from '../../../core/errors/api-error';
import { showServerError } from '../../../core/errors/server-errors';
import { FieldErrors } from '../../../shared/field-errors/field-errors';
import { nominalText } from '../../../templates/template-words';
import { PARTS_ACTION_LABELS } from '../../set-words';
import { NewPartInput, PartsLineInput, SetsApi } from '../../sets-api';

/** A number typed in a field, or null when empty; NaN when it is not a number. */
export function optionalNumber(text: string): number | null {
  const t = text.trim().replace(',', '.');
  if (t === '') return null;
  const n = Number(t);
  return Number.isFinite(n) ? n : Number.NaN;
}

/** The new part as the API takes it: value text parsed by the core for resistors, plain numbers otherwise. */
export function newPartOf(v: { text: string; watts: string; volts: string; uF: string; kind: string; measuredText: string }): NewPart | { error: string; field: string } {
  const watts = optionalNumber(v.watts);
  const volts = optionalNumber(v.volts);
  const uF = optionalNumber(v.uF);
  if (Number.isNaN(watts)) return { error: 'Watts is a number such as 0.5.', field: 'newPart.watts' };
  if (Number.isNaN(volts)) return { error: 'Volts is a number such as 630.', field: 'newPart.volts' };
  if (Number.isNaN(uF)) return { error: 'µF is a number such as 0.047.', field: 'newPart.uF' };
  let ohms: number | null = null;
  if (uF === null && v.text.trim() !== '') {
    const p = parseResistance(v.text);
    if (!p.ok) return { error: p.message, field: 'newPart.text' };
    ohms = p.ohms;
  }
  let measuredOhms: number | null = null;
  if (v.measuredText.trim() !== '') {
    const p = parseResistance(v.measuredText);
    if (!p.ok) return { error: p.message, field: 'newPart.measuredText' };
    measuredOhms = p.ohms;
  }
  return { text: v.text.trim(), ohms, uF, watts, volts, kind: v.kind.trim(), measuredText: v.measuredText.trim(), measuredOhms };
}

/**
 * The parts record: per component kept, replaced (the new part's value, rating and its own
 * measured value) or left with a note; linked to the reading that prompted it, or with a reason.
 */
@Component({
  selector: 'dm-parts-section',
  imports: [DatePipe, ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule, MatSelectModule, FieldErrors],
  template: `
    @if (loading()) {
      <mat-progress-bar mode="indeterminate" aria-label="Loading the parts record" />
    }
    @if (error(); as text) {
      <p class="dm-form-message" role="alert">{{ text }}</p>
    }
    @if (warnings().length) {
      <div class="dm-form-message dm-info" role="status">
        <p>Recorded, with these findings of the capacitor checks:</p>
        <ul>
          @for (w of warnings(); track $index) {
            <li>{{ w }}</li>
          }
        </ul>
      </div>
    }
    @if (lines().length) {
      <div class="table-wrap">
        <table class="plain" aria-label="Parts record">
          <thead>
            <tr>
              <th scope="col">Component</th>
              <th scope="col">Action</th>
              <th scope="col">New part</th>
              <th scope="col">Why</th>
              <th scope="col">Recorded</th>
            </tr>
          </thead>
          <tbody>
            @for (l of lines(); track l.id) {
              <tr>
                <th scope="row">{{ l.componentRef }}</th>
                <td>{{ actionLabels[l.action] }}</td>
                <td>
                  @if (l.newPart; as p) {
                    {{ p.text }}{{ p.watts !== null ? ' · ' + p.watts + ' W' : '' }}{{ p.volts !== null ? ' · ' + p.volts + ' V' : '' }}{{ p.kind ? ' · ' + p.kind : '' }}
                    @if (p.measuredText) {
                      <div class="sub">measured {{ p.measuredText }}</div>
                    }
                  } @else {
                    —
                  }
                </td>
                <td>
                  {{ l.readingId !== null ? 'prompted by a reading' : l.reason }}
                  @if (l.note) {
                    <div class="sub">{{ l.note }}</div>
                  }
                </td>
                <td>{{ l.recordedBy?.name ?? '' }} <div class="sub">{{ l.createdAt | date: 'mediumDate' }}</div></td>
              </tr>
            }
          </tbody>
        </table>
      </div>
    } @else if (!loading()) {
      <p class="empty">Nothing recorded yet.</p>
    }

    <form class="block" [formGroup]="form" (ngSubmit)="add()" aria-labelledby="parts-add-title">
      <h3 id="parts-add-title">Record a part</h3>
      <div class="row-form">
        <mat-form-field>
          <mat-label>Component</mat-label>
          <mat-select formControlName="componentKey">
            @for (c of components(); track c.key) {
              <mat-option [value]="c.key">{{ c.ref }} · {{ nominal(c.nominal) }}</mat-option>
            }
          </mat-select>
          <mat-error><dm-field-errors [control]="form.controls.componentKey" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Action</mat-label>
          <mat-select formControlName="action">
            @for (a of actions; track a) {
              <mat-option [value]="a">{{ actionLabels[a] }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Prompting reading id</mat-label>
          <input matInput formControlName="readingId" inputmode="numeric" autocomplete="off" />
          <mat-hint>or give a reason below</mat-hint>
          <mat-error><dm-field-errors [control]="form.controls.readingId" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Reason</mat-label>
          <input matInput formControlName="reason" autocomplete="off" />
          <mat-hint>e.g. capacitors replaced by policy</mat-hint>
          <mat-error><dm-field-errors [control]="form.controls.reason" /></mat-error>
        </mat-form-field>
      </div>
      @if (action() === 'replaced') {
        <fieldset class="row-form" formGroupName="newPart">
          <legend>New part</legend>
          <mat-form-field>
            <mat-label>Value</mat-label>
            <input matInput formControlName="text" autocomplete="off" />
            <mat-hint>4k7, 470R; for a capacitor give µF</mat-hint>
            <mat-error><dm-field-errors [control]="form.controls.newPart.controls.text" /></mat-error>
          </mat-form-field>
          <mat-form-field>
            <mat-label>µF (capacitor)</mat-label>
            <input matInput formControlName="uF" inputmode="decimal" autocomplete="off" />
            <mat-error><dm-field-errors [control]="form.controls.newPart.controls.uF" /></mat-error>
          </mat-form-field>
          <mat-form-field>
            <mat-label>Watts</mat-label>
            <input matInput formControlName="watts" inputmode="decimal" autocomplete="off" />
            <mat-error><dm-field-errors [control]="form.controls.newPart.controls.watts" /></mat-error>
          </mat-form-field>
          <mat-form-field>
            <mat-label>Volts rating</mat-label>
            <input matInput formControlName="volts" inputmode="decimal" autocomplete="off" />
            <mat-error><dm-field-errors [control]="form.controls.newPart.controls.volts" /></mat-error>
          </mat-form-field>
          <mat-form-field>
            <mat-label>Kind</mat-label>
            <input matInput formControlName="kind" autocomplete="off" />
            <mat-hint>metal film, flameproof, film X2…</mat-hint>
          </mat-form-field>
          <mat-form-field>
            <mat-label>Measured value of the new part</mat-label>
            <input matInput formControlName="measuredText" autocomplete="off" />
            <mat-error><dm-field-errors [control]="form.controls.newPart.controls.measuredText" /></mat-error>
          </mat-form-field>
        </fieldset>
      }
      <mat-form-field class="wide">
        <mat-label>Note</mat-label>
        <input matInput formControlName="note" autocomplete="off" />
        <mat-hint>e.g. scarce original kept under "conserve"</mat-hint>
      </mat-form-field>
      <div class="inline">
        <button mat-flat-button type="submit" class="dm-touch" [disabled]="busy()">Record</button>
      </div>
    </form>
  `,
  styleUrl: './section.scss',
  styles: `fieldset { border: 0; padding: 0; margin: 0; } legend { font: var(--mat-sys-title-small); margin-bottom: 8px; } .wide { width: 100%; }`,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PartsSection implements OnInit {
  private readonly api = inject(SetsApi);
  private readonly fb = inject(NonNullableFormBuilder);
  readonly set = input.required<SetDetail>();
  readonly doc = input<TemplateDocument | null>(null);

  protected readonly actions = PARTS_ACTIONS;
  protected readonly actionLabels = PARTS_ACTION_LABELS;
  protected readonly nominal = nominalText;
  protected readonly lines = signal<readonly PartsRecordLine[]>([]);
  protected readonly loading = signal(true);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly warnings = signal<readonly string[]>([]);
  protected readonly form = this.fb.group({
    componentKey: ['', Validators.required],
    action: this.fb.control<PartsAction>('replaced'),
    readingId: [''],
    reason: [''],
    note: [''],
    newPart: this.fb.group({ text: [''], uF: [''], watts: [''], volts: [''], kind: [''], measuredText: [''] }),
  });
  protected readonly action = toSignal(this.form.controls.action.valueChanges.pipe(startWith(this.form.controls.action.value)), { initialValue: 'replaced' as PartsAction });
  protected readonly components = computed(() => (this.doc()?.components ?? []).filter((c) => c.kind !== 'wire'));

  ngOnInit(): void {
    this.load();
  }

  private load(): void {
    this.loading.set(true);
    this.api.partsRecord(this.set().id).subscribe({
      next: (list) => {
        this.loading.set(false);
        this.lines.set(list);
      },
      error: (err: unknown) => {
        this.loading.set(false);
        this.error.set(apiErrorOf(err).message);
      },
    });
  }

  protected add(): void {
    // The reason/reading rule is checked here, across two fields: start each attempt from their own validators.
    this.form.controls.reason.updateValueAndValidity();
    this.form.controls.readingId.updateValueAndValidity();
    this.form.markAllAsTouched();
    if (this.form.invalid || this.busy()) return;
    const v = this.form.getRawValue();
    const readingId = optionalNumber(v.readingId);
    if (readingId !== null && (!Number.isInteger(readingId) || readingId < 1)) {
      this.form.controls.readingId.setErrors({ server: 'A reading id is a whole number.' });
      return;
    }
    if (readingId === null && v.reason.trim() === '') {
      this.form.controls.reason.setErrors({ server: 'Without a prompting reading, give the reason.' });
      return;
    }
    let newPart: NewPartInput | null = null;
    if (v.action === 'replaced') {
      const p = newPartOf(v.newPart);
      if ('error' in p) {
        this.form.get(p.field)?.setErrors({ server: p.error });
        return;
      }
      if (p.text === '') {
        this.form.controls.newPart.controls.text.setErrors({ server: 'What was fitted: its value, such as 47k or 0.047 µF.' });
        return;
      }
      newPart = { text: p.text, uF: p.uF, watts: p.watts, volts: p.volts, kind: p.kind, measuredText: p.measuredText };
    }
    const line: PartsLineInput = { componentKey: v.componentKey, action: v.action, newPart, readingId, reason: v.reason.trim(), note: v.note.trim() };
    this.busy.set(true);
    this.error.set(null);
    this.warnings.set([]);
    this.api.addPartsLine(this.set().id, line).subscribe({
      next: (saved) => {
        this.busy.set(false);
        this.warnings.set((saved.warnings ?? []).map((w) => w.message));
        this.form.reset();
        this.load();
      },
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        if (!showServerError(this.form, e)) this.error.set(e.message);
      },
    });
  }
}
