import { ChangeDetectionStrategy, Component, DestroyRef, OnInit, computed, inject, output, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { ErrorStateMatcher, ShowOnDirtyErrorStateMatcher } from '@angular/material/core';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatSelectModule } from '@angular/material/select';
import type { MeterProfile } from '@domain/meter';
import { map, startWith } from 'rxjs';
import { MeterRanges } from '../../shared/meter-ranges/meter-ranges';
import { AnalogueRangeRow, DigitalRangeRow, loadMeterRanges, presetOnSwitch, rangesPart } from '../../shared/meter-ranges/meter-range-rows';
import { ohmsTextValidator } from '../calc-validators';
import { MeterChoice, MeterFormValue, meterChoiceOf, rangeLabel } from './meter-form';
import { METER_PRESETS, MeterPreset } from './meter-presets';

/** The quick check's limit on counts (its API takes more than a saved profile does). */
const COUNTS_MAX = 100000;

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
    MatButtonToggleModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatSelectModule,
    MeterRanges,
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
  protected readonly countsMax = COUNTS_MAX;
  protected readonly form = this.fb.group({
    use: [true],
    kind: this.fb.control<'digital' | 'analogue'>('digital'),
    autorange: [false],
    lead: ['', ohmsTextValidator({ allowZero: true })],
    digital: this.fb.array<DigitalRangeRow>([]),
    analogue: this.fb.array<AnalogueRangeRow>([]),
    rangeIndex: [-1],
  });
  /** The same form, as the shared ranges part sees it. */
  protected readonly ranges = rangesPart(this.form);

  private readonly value = toSignal(this.form.valueChanges.pipe(startWith(null), map(() => this.form.getRawValue() as MeterFormValue)), {
    initialValue: this.form.getRawValue() as MeterFormValue,
  });
  protected readonly use = computed(() => this.value().use);
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

  /** Replaces the form with a preset's values (the user edits from there). */
  applyPreset(preset: MeterPreset): void {
    this.load(preset.profile);
  }

  /** Switching kind starts the other kind's ranges from its preset when there are none. */
  protected switchKind(kind: 'digital' | 'analogue'): void {
    const preset = presetOnSwitch(this.ranges, kind);
    if (preset) this.load(preset);
  }

  /** A removed range: the range used goes back to inferred. */
  protected forgetRangeUsed(): void {
    this.form.controls.rangeIndex.setValue(-1);
  }

  private load(profile: MeterProfile): void {
    // Silently first, so that the load makes one change (its value emitted once).
    this.form.controls.rangeIndex.setValue(-1, { emitEvent: false });
    loadMeterRanges(this.ranges, profile, COUNTS_MAX);
  }
}
