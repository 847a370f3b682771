import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { parseResistance } from '@domain/notation';
import { DEVIATION_KINDS, type DeviationKind, type SetDeviation, type SetDetail } from '@domain/set-format';
import type { Nominal, TemplateDocument } from '@domain/template-format';
import { apiErrorOf } from '../../../core/errors/api-error';
import { FieldErrors } from '../../../shared/field-errors/field-errors';
import { nominalText, toleranceText } from '../../../templates/template-words';
import { DEVIATION_KIND_LABELS } from '../../set-words';
import { SetsApi } from '../../sets-api';

/** The value typed for a deviation as a nominal (`4k7`, `open`, `short`), or the core's message. */
export function deviationNominal(text: string): { nominal: Nominal } | { error: string } {
  const p = parseResistance(text);
  if (!p.ok) return { error: p.message };
  if (p.state === 'value' && p.ohms !== null) return { nominal: { ohms: p.ohms, text: text.trim() } };
  if (p.state === 'open' || p.state === 'short') return { nominal: { state: p.state } };
  return { error: 'A deviation is a value (such as 4k7) or open or short.' };
}

/** A key for a new deviation, made with crypto.getRandomValues (works outside a secure context). */
export function deviationKey(): string {
  const bytes = crypto.getRandomValues(new Uint8Array(8));
  return 'dv-' + Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}

/**
 * Deviations from the template recorded on this set (a non-original part, a factory change in this
 * serial range): the survey expects the deviation's value for that component, the template stays as it is.
 */
@Component({
  selector: 'dm-deviations-section',
  imports: [ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatSelectModule, FieldErrors],
  template: `
    <p class="intro">A survey of this set expects the deviation's value instead of the template's for that component.</p>
    @if (error(); as text) {
      <p class="dm-form-message" role="alert">{{ text }}</p>
    }
    @if (set().deviations.length) {
      <div class="table-wrap">
        <table class="plain" aria-label="Deviations from the template">
          <thead>
            <tr>
              <th scope="col">Component</th>
              <th scope="col">Kind</th>
              <th scope="col">Template value</th>
              <th scope="col">This set</th>
              <th scope="col">Note</th>
              <th scope="col"><span class="cdk-visually-hidden">Remove</span></th>
            </tr>
          </thead>
          <tbody>
            @for (d of set().deviations; track d.key) {
              <tr>
                <th scope="row">{{ refOf(d.componentKey) }}</th>
                <td>{{ kindLabels[d.kind] }}</td>
                <td>{{ templateValue(d.componentKey) }}</td>
                <td>{{ nominal(d.nominal) }}{{ d.tolerancePct !== null ? ' ' + tolerance(d.tolerancePct) : '' }}</td>
                <td>{{ d.note }}</td>
                <td>
                  <button mat-button type="button" class="dm-touch" [disabled]="busy()" (click)="remove(d)">
                    Remove<span class="cdk-visually-hidden"> the deviation of {{ refOf(d.componentKey) }}</span>
                  </button>
                </td>
              </tr>
            }
          </tbody>
        </table>
      </div>
    } @else {
      <p class="empty">No deviation recorded: surveys expect the template's values.</p>
    }

    <form class="block" [formGroup]="form" (ngSubmit)="add()" aria-labelledby="dev-add-title">
      <h3 id="dev-add-title">Add a deviation</h3>
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
          <mat-label>Kind</mat-label>
          <mat-select formControlName="kind">
            @for (k of kinds; track k) {
              <mat-option [value]="k">{{ kindLabels[k] }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Value on this set</mat-label>
          <input matInput formControlName="value" autocomplete="off" />
          <mat-hint>4k7, 470R, 1M2, open, short</mat-hint>
          <mat-error><dm-field-errors [control]="form.controls.value" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Tolerance ±%</mat-label>
          <input matInput formControlName="tolerance" inputmode="decimal" autocomplete="off" />
          <mat-hint>empty: the template's</mat-hint>
          <mat-error><dm-field-errors [control]="form.controls.tolerance" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Note</mat-label>
          <input matInput formControlName="note" autocomplete="off" />
        </mat-form-field>
      </div>
      <button mat-flat-button type="submit" class="dm-touch" [disabled]="busy()">Add the deviation</button>
    </form>
  `,
  styleUrl: './section.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DeviationsSection {
  private readonly api = inject(SetsApi);
  private readonly fb = inject(NonNullableFormBuilder);
  readonly set = input.required<SetDetail>();
  readonly doc = input<TemplateDocument | null>(null);
  readonly changed = output<SetDetail | void>();

  protected readonly kinds = DEVIATION_KINDS;
  protected readonly kindLabels = DEVIATION_KIND_LABELS;
  protected readonly nominal = nominalText;
  protected readonly tolerance = toleranceText;
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly form = this.fb.group({
    componentKey: ['', Validators.required],
    kind: this.fb.control<DeviationKind>('non-original'),
    value: ['', Validators.required],
    tolerance: [''],
    note: [''],
  });
  protected readonly components = computed(() => (this.doc()?.components ?? []).filter((c) => c.kind !== 'wire'));

  protected refOf(key: string): string {
    return this.doc()?.components.find((c) => c.key === key)?.ref ?? key;
  }
  protected templateValue(key: string): string {
    const c = this.doc()?.components.find((x) => x.key === key);
    return c ? `${nominalText(c.nominal)}${c.tolerancePct !== null ? ' ' + toleranceText(c.tolerancePct) : ''}` : '—';
  }

  protected add(): void {
    this.form.markAllAsTouched();
    if (this.form.invalid || this.busy()) return;
    const v = this.form.getRawValue();
    const parsed = deviationNominal(v.value);
    if ('error' in parsed) {
      this.form.controls.value.setErrors({ server: parsed.error });
      return;
    }
    let tolerancePct: number | null = null;
    if (v.tolerance.trim() !== '') {
      tolerancePct = Number(v.tolerance.trim().replace(',', '.').replace(/^±/, ''));
      if (!Number.isFinite(tolerancePct) || tolerancePct <= 0 || tolerancePct >= 100) {
        this.form.controls.tolerance.setErrors({ server: 'A tolerance between 0 and 100 %, or empty.' });
        return;
      }
    }
    const deviation: SetDeviation = { key: deviationKey(), kind: v.kind, componentKey: v.componentKey, nominal: parsed.nominal, tolerancePct, note: v.note.trim() };
    this.saveAll([...this.set().deviations, deviation], () => this.form.reset({ componentKey: '', kind: 'non-original', value: '', tolerance: '', note: '' }));
  }

  protected remove(d: SetDeviation): void {
    this.saveAll(this.set().deviations.filter((x) => x.key !== d.key));
  }

  private saveAll(deviations: SetDeviation[], done?: () => void): void {
    if (this.busy()) return;
    this.busy.set(true);
    this.error.set(null);
    const s = this.set();
    this.api.update(s.id, { deviations, version: s.version }).subscribe({
      next: (updated) => {
        this.busy.set(false);
        done?.();
        this.changed.emit(updated);
      },
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        this.error.set(e.status === 409 ? 'The set was changed meanwhile (another tab or person). Reload the page and add it again.' : e.message);
      },
    });
  }
}
