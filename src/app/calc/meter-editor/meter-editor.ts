import { ChangeDetectionStrategy, Component, DestroyRef, OnInit, computed, inject, output, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { FormArray, FormGroup, FormControl, NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { ErrorStateMatcher, ShowOnDirtyErrorStateMatcher } from '@angular/material/core';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import type { MeterProfile } from '@domain/meter';
import { map, startWith } from 'rxjs';
import { FieldErrors } from '../../shared/field-errors/field-errors';
import { CALC_MESSAGES, numberTextValidator, ohmsTextValidator } from '../calc-validators';
import { MeterChoice, MeterFormValue, meterChoiceOf, meterFormValueOf, rangeLabel } from './meter-form';
import { METER_PRESETS, MeterPreset } from './meter-presets';

type DigitalRow = FormGroup<{ fullScale: FormControl<string>; resolution: FormControl<string>; pct: FormControl<string>; counts: FormControl<string> }>;
type AnalogueRow = FormGroup<{ centre: FormControl<string>; arcPct: FormControl<string> }>;

/**
 * The user's meter (DESIGN.md §2 "meter profile"): digital ranges with full scale, resolution and
 * ±(% of reading + counts), autorange, lead resistance; or analogue ranges with centre values and
 * arc error. Two presets to start from, every field editable. `choiceChange` emits the usable
 * profile (null when switched off or not usable) once at start and on every change.
 */
@Component({
  selector: 'dm-meter-editor',
  imports: [
    ReactiveFormsModule,
    MatButtonModule,
    MatButtonToggleModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    FieldErrors,
  ],
  templateUrl: './meter-editor.html',
  styleUrl: './meter-editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  providers: [{ provide: ErrorStateMatcher, useClass: ShowOnDirtyErrorStateMatcher }],
})
export class MeterEditor implements OnInit {
  private readonly fb = inject(NonNullableFormBuilder);
  private readonly destroyRef = inject(DestroyRef);
  readonly choiceChange = output<MeterChoice | null>();
  protected readonly choice = signal<MeterChoice | null>(null);

  protected readonly presets = METER_PRESETS;
  protected readonly messages = CALC_MESSAGES;
  protected readonly form = this.fb.group({
    use: [true],
    kind: this.fb.control<'digital' | 'analogue'>('digital'),
    autorange: [false],
    lead: ['', ohmsTextValidator({ allowZero: true })],
    digital: this.fb.array<DigitalRow>([]),
    analogue: this.fb.array<AnalogueRow>([]),
    rangeIndex: [-1],
  });

  private readonly value = toSignal(this.form.valueChanges.pipe(startWith(null), map(() => this.form.getRawValue() as MeterFormValue)), {
    initialValue: this.form.getRawValue() as MeterFormValue,
  });
  protected readonly use = computed(() => this.value().use);
  protected readonly kind = computed(() => this.value().kind);
  protected readonly autorange = computed(() => this.value().kind === 'digital' && this.value().autorange);
  /** The ranges as labels for the "range used" choice (from the usable profile only). */
  protected readonly rangeLabels = computed(() => {
    const c = this.choice();
    return c ? c.meter.ranges.map((_, i) => rangeLabel(c.meter, i)) : [];
  });
  protected readonly unusable = computed(() => this.value().use && this.choice() === null);

  constructor() {
    this.load(METER_PRESETS[0].profile);
  }

  ngOnInit(): void {
    this.form.valueChanges.pipe(startWith(null), takeUntilDestroyed(this.destroyRef)).subscribe(() => {
      const choice = meterChoiceOf(this.form.getRawValue() as MeterFormValue);
      this.choice.set(choice);
      this.choiceChange.emit(choice);
    });
  }

  protected get digitalRows(): FormArray<DigitalRow> {
    return this.form.controls.digital;
  }
  protected get analogueRows(): FormArray<AnalogueRow> {
    return this.form.controls.analogue;
  }

  /** Replaces the form with a preset's values (the user edits from there). */
  applyPreset(preset: MeterPreset): void {
    this.load(preset.profile);
  }

  /** Switching kind starts the other kind's ranges from its preset when there are none. */
  protected switchKind(kind: 'digital' | 'analogue'): void {
    const rows = kind === 'digital' ? this.digitalRows : this.analogueRows;
    if (rows.length === 0) this.load(METER_PRESETS.find((p) => p.profile.kind === kind)!.profile);
  }

  protected addDigitalRange(): void {
    const last = this.digitalRows.at(this.digitalRows.length - 1)?.getRawValue();
    this.digitalRows.push(this.digitalRow(last ?? { fullScale: '', resolution: '', pct: '1', counts: '2' }));
  }
  protected addAnalogueRange(): void {
    this.analogueRows.push(this.analogueRow({ centre: '', arcPct: '3' }));
  }
  protected removeRange(kind: 'digital' | 'analogue', index: number): void {
    (kind === 'digital' ? this.digitalRows : this.analogueRows).removeAt(index);
    this.form.controls.rangeIndex.setValue(-1);
  }

  private load(profile: MeterProfile): void {
    const v = meterFormValueOf(profile);
    this.form.setControl('digital', this.fb.array(v.digital.map((r) => this.digitalRow(r))), { emitEvent: false });
    this.form.setControl('analogue', this.fb.array(v.analogue.map((r) => this.analogueRow(r))), { emitEvent: false });
    this.form.patchValue({ kind: v.kind, autorange: v.autorange, lead: v.lead, rangeIndex: -1 });
  }

  private digitalRow(r: { fullScale: string; resolution: string; pct: string; counts: string }): DigitalRow {
    return this.fb.group({
      fullScale: [r.fullScale, [Validators.required, ohmsTextValidator()]],
      resolution: [r.resolution, [Validators.required, ohmsTextValidator()]],
      pct: [r.pct, [Validators.required, numberTextValidator(0, 100, '% of reading')]],
      counts: [r.counts, [Validators.required, numberTextValidator(0, 100000, 'counts')]],
    });
  }
  private analogueRow(r: { centre: string; arcPct: string }): AnalogueRow {
    return this.fb.group({
      centre: [r.centre, [Validators.required, ohmsTextValidator()]],
      arcPct: [r.arcPct, [Validators.required, numberTextValidator(0.01, 49.9, 'arc error %')]],
    });
  }
}
