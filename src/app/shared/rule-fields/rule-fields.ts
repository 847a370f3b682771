import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { toObservable, toSignal } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { startWith, switchMap } from 'rxjs';
import { FieldErrors } from '../field-errors/field-errors';

/** Where an acceptance rule's band comes from: the template's tolerance or a flat allowance. */
export type BandFrom = 'template' | 'allowance';

/** The controls these fields edit. */
export interface RuleFieldControls {
  bandFrom: FormControl<BandFrom>;
  allowanceLow: FormControl<string>;
  allowanceHigh: FormControl<string>;
}

/** A form group holding those controls and maybe more (a `FormGroup<…>` with more controls is not a `FormGroup<RuleFieldControls>`). */
export type RuleFieldGroup = Pick<FormGroup<RuleFieldControls>, 'controls'>;

/**
 * The band part of an acceptance rule: the template's tolerance or a restoration allowance, and
 * for an allowance its two sides (−low %, +high %). The form around it owns the controls, checks
 * the values when it submits and sets a `server` error on the side it refuses; the fieldset and
 * its legend stay in that form, which may add its own fields to the same fieldset.
 */
@Component({
  selector: 'dm-rule-fields',
  imports: [ReactiveFormsModule, MatButtonToggleModule, MatFormFieldModule, MatInputModule, FieldErrors],
  template: `
    <mat-button-toggle-group [formControl]="group().controls.bandFrom" aria-label="Where the band comes from">
      <mat-button-toggle value="template">The template's tolerance</mat-button-toggle>
      <mat-button-toggle value="allowance">A restoration allowance</mat-button-toggle>
    </mat-button-toggle-group>
    @if (bandFrom() === 'allowance') {
      <div class="pair">
        <mat-form-field>
          <mat-label>Allowance below, %</mat-label>
          <input matInput [formControl]="group().controls.allowanceLow" data-test="allowanceLow" inputmode="decimal" autocomplete="off" />
          <mat-error><dm-field-errors [control]="group().controls.allowanceLow" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Allowance above, %</mat-label>
          <input matInput [formControl]="group().controls.allowanceHigh" data-test="allowanceHigh" inputmode="decimal" autocomplete="off" />
          <mat-error><dm-field-errors [control]="group().controls.allowanceHigh" /></mat-error>
        </mat-form-field>
      </div>
    }
  `,
  styleUrl: './rule-fields.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RuleFields {
  /** The group holding `bandFrom`, `allowanceLow` and `allowanceHigh` (the whole form or a part of it). */
  readonly group = input.required<RuleFieldGroup>();

  protected readonly bandFrom = toSignal(
    toObservable(this.group).pipe(switchMap((g) => g.controls.bandFrom.valueChanges.pipe(startWith(g.controls.bandFrom.value)))),
    { initialValue: 'template' as BandFrom },
  );
}
