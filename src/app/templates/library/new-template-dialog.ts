import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { AbstractControl, NonNullableFormBuilder, ReactiveFormsModule, ValidationErrors, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { CHASSIS_KINDS, POWER_ARRANGEMENTS, hotChassisFor, type ChassisKind, type PowerArrangement } from '@domain/template-format';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { ErrorMessages, FieldErrors } from '../../shared/field-errors/field-errors';
import { CHASSIS_KIND_LABELS, HOT_CHASSIS_CAUTION, POWER_LABELS } from '../template-words';
import { NewChassis, TemplateView, TemplatesApi } from '../templates-api';

const YEAR = [Validators.min(1880), Validators.max(2100), Validators.pattern(/^\d{4}$/)];

/** The year range reads forwards (cross-field rule). */
export function yearsInOrder(group: AbstractControl): ValidationErrors | null {
  const from = Number(group.get('yearFrom')?.value || NaN);
  const to = Number(group.get('yearTo')?.value || NaN);
  return from > to ? { yearsReversed: true } : null;
}

const MESSAGES = {
  maker: { required: 'Enter the maker (as on the set or its service data).' },
  model: { required: 'Enter the model.' },
  year: { min: 'A year from 1880.', max: 'A year up to 2100.', pattern: 'Four digits, such as 1951.' },
} satisfies Record<string, ErrorMessages>;

/** "New template": the chassis facts; the template and its first draft are created at once. */
@Component({
  selector: 'dm-new-template-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatButtonModule, MatIconModule, FieldErrors],
  templateUrl: './new-template-dialog.html',
  styles: `
    .pair { display: grid; grid-template-columns: 1fr 1fr; gap: 0 16px; }
    .hot { display: flex; gap: 8px; align-items: flex-start; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NewTemplateDialog {
  private readonly api = inject(TemplatesApi);
  private readonly dialogRef = inject<MatDialogRef<NewTemplateDialog, TemplateView>>(MatDialogRef);
  private readonly destroyRef = inject(DestroyRef);
  private readonly fb = inject(NonNullableFormBuilder);

  protected readonly form = this.fb.group(
    {
      maker: ['', [Validators.required, Validators.maxLength(120)]],
      model: ['', [Validators.required, Validators.maxLength(120)]],
      chassisNumber: ['', Validators.maxLength(60)],
      kind: this.fb.control<ChassisKind>('table-radio'),
      power: this.fb.control<PowerArrangement>('transformer'),
      yearFrom: ['', YEAR],
      yearTo: ['', YEAR],
    },
    { validators: yearsInOrder },
  );
  protected readonly kinds = CHASSIS_KINDS;
  protected readonly powers = POWER_ARRANGEMENTS;
  protected readonly kindLabels = CHASSIS_KIND_LABELS;
  protected readonly powerLabels = POWER_LABELS;
  protected readonly messages = MESSAGES;
  protected readonly caution = HOT_CHASSIS_CAUTION;
  private readonly power = toSignal(this.form.controls.power.valueChanges, { initialValue: this.form.controls.power.value });
  protected readonly hot = computed(() => hotChassisFor(this.power()));
  protected readonly busy = signal(false);
  protected readonly formError = signal<string | null>(null);

  protected create(): void {
    if (this.busy()) return;
    this.formError.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const v = this.form.getRawValue();
    const chassis: NewChassis = {
      maker: v.maker.trim(),
      model: v.model.trim(),
      kind: v.kind,
      power: v.power,
      ...(v.chassisNumber.trim() ? { chassisNumber: v.chassisNumber.trim() } : {}),
      ...(v.yearFrom ? { yearFrom: Number(v.yearFrom) } : {}),
      ...(v.yearTo ? { yearTo: Number(v.yearTo) } : {}),
    };
    this.busy.set(true);
    this.api
      .create(chassis)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (created) => this.dialogRef.close(created),
        error: (err: unknown) => {
          const e = apiErrorOf(err);
          const field = e.field?.replace(/^(document\.)?chassis\./, '');
          if (!showServerError(this.form, { ...e, field })) this.formError.set(e.message);
          this.busy.set(false);
        },
      });
  }
}
