import { ChangeDetectionStrategy, Component, inject, input, output } from '@angular/core';
import { ControlContainer, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { CALC_MESSAGES } from '../../calc/calc-validators';
import { FieldErrors } from '../field-errors/field-errors';
import { analogueRangeRow, digitalRangeRow, MeterRangeControls, NEW_ANALOGUE_RANGE, nextDigitalRange } from './meter-range-rows';

/**
 * The ranges of a meter profile inside a form that holds them (the quick check's meter editor,
 * the meter profile page): lead resistance and autorange on one line (what the caller projects
 * joins that line), then the digital ranges (full scale, resolution, % of reading, counts) or the
 * analogue ones (centre value, arc error %) by the form's kind, with rows to add and remove.
 *
 * The fields bind by name (`formControlName`) into the caller's own `[formGroup]`, which must be
 * the `group` given here. Checked with its caller, not OnPush: what it shows follows the caller's
 * form (the kind toggle, a preset loaded, fields marked touched on save), which changes while no
 * input here does.
 */
@Component({
  selector: 'dm-meter-ranges',
  imports: [ReactiveFormsModule, MatButtonModule, MatCheckboxModule, MatFormFieldModule, MatIconModule, MatInputModule, FieldErrors],
  templateUrl: './meter-ranges.html',
  styleUrl: './meter-ranges.scss',
  changeDetection: ChangeDetectionStrategy.Default,
  viewProviders: [{ provide: ControlContainer, useFactory: () => inject(ControlContainer, { skipSelf: true }) }],
})
export class MeterRanges {
  /** The caller's form (bound by the caller with `[formGroup]`). */
  readonly group = input.required<FormGroup<MeterRangeControls>>();
  /** The caller's limit on counts, for added rows (as in `digitalRangeRow`). */
  readonly countsMax = input.required<number>();
  readonly leadHint = input.required<string>();
  readonly digitalCaption = input.required<string>();
  readonly fullScaleHeading = input.required<string>();
  /** Hide the add and remove buttons on paper. */
  readonly hideButtonsInPrint = input(false);
  /** A row was removed (its index): a choice of range may now point elsewhere. */
  readonly rangeRemoved = output<number>();

  protected readonly messages = CALC_MESSAGES;

  protected addDigitalRange(): void {
    const rows = this.group().controls.digital;
    rows.push(digitalRangeRow(nextDigitalRange(rows), this.countsMax()));
  }
  protected addAnalogueRange(): void {
    this.group().controls.analogue.push(analogueRangeRow(NEW_ANALOGUE_RANGE));
  }
  protected removeRange(kind: 'digital' | 'analogue', index: number): void {
    (kind === 'digital' ? this.group().controls.digital : this.group().controls.analogue).removeAt(index);
    this.rangeRemoved.emit(index);
  }
}
