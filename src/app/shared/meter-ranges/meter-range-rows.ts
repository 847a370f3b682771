import { AbstractControl, FormArray, FormControl, FormGroup, ValidatorFn, Validators } from '@angular/forms';
import type { MeterProfile } from '@domain/meter';
import { numberTextValidator, ohmsTextValidator } from '../../calc/calc-validators';
import { meterFormValueOf } from '../../calc/meter-editor/meter-form';
import { METER_PRESETS } from '../../calc/meter-editor/meter-presets';

/** One digital range as typed: ohms in the notation, percentages and counts as plain numbers. */
export interface DigitalRangeText {
  fullScale: string;
  resolution: string;
  pct: string;
  counts: string;
}
/** One analogue range as typed: the centre-scale value in the notation, the arc error in %. */
export interface AnalogueRangeText {
  centre: string;
  arcPct: string;
}
export type DigitalRangeRow = FormGroup<{ [K in keyof DigitalRangeText]: FormControl<string> }>;
export type AnalogueRangeRow = FormGroup<{ [K in keyof AnalogueRangeText]: FormControl<string> }>;
export type MeterKind = 'digital' | 'analogue';

/** The controls of a meter's ranges that a form holding them (the quick check's, a profile's) has by these names. */
export interface MeterRangeControls {
  kind: FormControl<MeterKind>;
  autorange: FormControl<boolean>;
  lead: FormControl<string>;
  digital: FormArray<DigitalRangeRow>;
  analogue: FormArray<AnalogueRangeRow>;
}

/**
 * A caller's form seen as its ranges part, for `MeterRanges` and the functions here (the same
 * object: its other controls are left alone). Typed forms do not take a group with more controls
 * where one with fewer is asked for, hence the one cast, checked by the constraint.
 */
export function rangesPart<C extends MeterRangeControls & { [K in keyof C]: AbstractControl }>(form: FormGroup<C>): FormGroup<MeterRangeControls> {
  return form as unknown as FormGroup<MeterRangeControls>;
}

const text = (value: string, validators: ValidatorFn[]) => new FormControl(value, { nonNullable: true, validators });

/** The controls of one digital range; `countsMax` is the caller's limit on counts (the API it talks to). */
export function digitalRangeRow(r: DigitalRangeText, countsMax: number): DigitalRangeRow {
  return new FormGroup({
    fullScale: text(r.fullScale, [Validators.required, ohmsTextValidator()]),
    resolution: text(r.resolution, [Validators.required, ohmsTextValidator()]),
    pct: text(r.pct, [Validators.required, numberTextValidator(0, 100, '% of reading')]),
    counts: text(r.counts, [Validators.required, numberTextValidator(0, countsMax, 'counts')]),
  });
}

/** The controls of one analogue range. */
export function analogueRangeRow(r: AnalogueRangeText): AnalogueRangeRow {
  return new FormGroup({
    centre: text(r.centre, [Validators.required, ohmsTextValidator()]),
    arcPct: text(r.arcPct, [Validators.required, numberTextValidator(0.01, 49.9, 'arc error %')]),
  });
}

/** A new digital range: a copy of the last one, or an empty one at ±(1 % + 2 counts). */
export function nextDigitalRange(rows: FormArray<DigitalRangeRow>): DigitalRangeText {
  return rows.at(rows.length - 1)?.getRawValue() ?? { fullScale: '', resolution: '', pct: '1', counts: '2' };
}
/** A new analogue range: no centre value yet, 3 % of arc. */
export const NEW_ANALOGUE_RANGE: AnalogueRangeText = { centre: '', arcPct: '3' };

/**
 * Puts a profile's ranges, kind, autorange and lead resistance into the form (a preset, or a
 * profile being edited): the new row arrays go in silently, then one value change for the load.
 */
export function loadMeterRanges(group: FormGroup<MeterRangeControls>, profile: MeterProfile, countsMax: number): void {
  const v = meterFormValueOf(profile);
  group.setControl('digital', new FormArray(v.digital.map((r) => digitalRangeRow(r, countsMax))), { emitEvent: false });
  group.setControl('analogue', new FormArray(v.analogue.map((r) => analogueRangeRow(r))), { emitEvent: false });
  group.patchValue({ kind: v.kind, autorange: v.autorange, lead: v.lead });
}

/** Switching kind: the preset of that kind to start from when the form has no ranges of it, else null (the rows stay). */
export function presetOnSwitch(group: FormGroup<MeterRangeControls>, kind: MeterKind): MeterProfile | null {
  const rows = kind === 'digital' ? group.controls.digital : group.controls.analogue;
  return rows.length === 0 ? METER_PRESETS.find((p) => p.profile.kind === kind)!.profile : null;
}
