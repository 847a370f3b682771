import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import { meterProblems, type MeterProfile } from '@domain/meter';
import { parseResistance } from '@domain/notation';
import { METER_CHECK_KINDS, type MeterCheckKind, type MeterProfileRecord } from '@domain/set-format';
import { EMPTY, catchError, map, of, switchMap } from 'rxjs';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { FieldErrors } from '../../shared/field-errors/field-errors';
import { MeterRanges } from '../../shared/meter-ranges/meter-ranges';
import { AnalogueRangeRow, DigitalRangeRow, loadMeterRanges, presetOnSwitch, rangesPart } from '../../shared/meter-ranges/meter-range-rows';
import { CALC_MESSAGES, numberTextValidator, ohmsTextValidator } from '../../calc/calc-validators';
import { MeterFormValue, meterChoiceOf } from '../../calc/meter-editor/meter-form';
import { METER_PRESETS, MeterPreset } from '../../calc/meter-editor/meter-presets';
import { MeterProfileInput, MetersApi } from '../meters-api';

/** A saved profile's limit on counts (the API's schema). */
const COUNTS_MAX = 1000;

/** The profile the ranges part of the form describes, or the domain's problems with it. */
export function profileOf(v: Omit<MeterFormValue, 'use' | 'rangeIndex'>): { profile: MeterProfile } | { problems: string[] } {
  const choice = meterChoiceOf({ ...v, use: true, rangeIndex: -1 });
  if (choice) return { profile: choice.meter };
  // Say what is wrong: the same conversion without the usability filter, then the domain's checks.
  const ohms = (t: string) => {
    const p = parseResistance(t);
    return p.ok && p.state === 'value' && p.ohms !== null ? p.ohms : Number.NaN;
  };
  const num = (t: string) => Number(t.trim().replace(',', '.'));
  const lead = v.lead.trim() === '' ? 0 : ohms(v.lead);
  const profile: MeterProfile =
    v.kind === 'digital'
      ? { kind: 'digital', autorange: v.autorange, leadOhms: lead, ranges: v.digital.map((r) => ({ fullScaleOhms: ohms(r.fullScale), resolutionOhms: ohms(r.resolution), pctOfReading: num(r.pct), counts: num(r.counts) })) }
      : { kind: 'analogue', leadOhms: lead, ranges: v.analogue.map((r) => ({ centreOhms: ohms(r.centre), arcFraction: num(r.arcPct) / 100 })) };
  const problems = meterProblems(profile).map((p) => p.message);
  return { problems: problems.length ? problems : ['Check the ranges: every field needs a value.'] };
}

/**
 * `/meters/new` and `/meters/:id`: a meter profile — digital ranges (full scale = the largest
 * displayable value, resolution, ±(% of reading + counts), autorange) or analogue ranges (centre
 * value, arc error); lead resistance; calibration or check date; the check resistor read at the
 * start of each survey.
 */
@Component({
  selector: 'dm-meter-form',
  imports: [
    ReactiveFormsModule,
    RouterLink,
    MatButtonModule,
    MatButtonToggleModule,
    MatFormFieldModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    FieldErrors,
    MeterRanges,
  ],
  templateUrl: './meter-form.html',
  styleUrl: './meter-form.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MeterForm {
  private readonly api = inject(MetersApi);
  private readonly router = inject(Router);
  private readonly fb = inject(NonNullableFormBuilder);

  /** Route parameter (absent on `/meters/new`). */
  readonly id = input<string>();
  protected readonly editing = computed(() => this.id() !== undefined && this.id() !== 'new');

  protected readonly presets = METER_PRESETS;
  protected readonly checkKinds = METER_CHECK_KINDS;
  protected readonly messages = CALC_MESSAGES;
  protected readonly countsMax = COUNTS_MAX;
  protected readonly record = signal<MeterProfileRecord | null>(null);
  protected readonly loadError = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly problems = signal<readonly string[]>([]);

  protected readonly form = this.fb.group({
    name: ['', [Validators.required, Validators.maxLength(80)]],
    kind: this.fb.control<'digital' | 'analogue'>('digital'),
    autorange: [false],
    lead: ['', ohmsTextValidator({ allowZero: true })],
    digital: this.fb.array<DigitalRangeRow>([]),
    analogue: this.fb.array<AnalogueRangeRow>([]),
    checkKind: this.fb.control<MeterCheckKind>('check'),
    checkDate: [''],
    checkResistor: ['', ohmsTextValidator()],
    checkTolerance: ['', numberTextValidator(0.001, 50, 'tolerance %')],
  });
  /** The same form, as the shared ranges part sees it. */
  protected readonly ranges = rangesPart(this.form);

  constructor() {
    this.load(METER_PRESETS[0].profile);
    toObservable(this.id)
      .pipe(
        switchMap((id) => {
          if (id === undefined || id === 'new') return EMPTY;
          return this.api.get(Number(id)).pipe(
            map((r) => ({ ok: true as const, r })),
            catchError((err: unknown) => of({ ok: false as const, status: apiErrorOf(err).status, message: apiErrorOf(err).message })),
          );
        }),
        takeUntilDestroyed(),
      )
      .subscribe((a) => {
        if (!a.ok) {
          this.loadError.set(a.status === 404 ? 'No such meter profile (profiles are personal).' : a.message);
          return;
        }
        this.record.set(a.r);
        this.load(a.r.profile);
        this.form.patchValue({
          name: a.r.name,
          checkKind: a.r.checkKind,
          checkDate: a.r.checkDate ?? '',
          checkResistor: a.r.checkResistorOhms !== null ? String(a.r.checkResistorOhms) : '',
          checkTolerance: a.r.checkResistorTolerancePct !== null ? String(a.r.checkResistorTolerancePct) : '',
        });
      });
  }

  protected applyPreset(preset: MeterPreset): void {
    this.load(preset.profile);
  }

  protected switchKind(kind: 'digital' | 'analogue'): void {
    const preset = presetOnSwitch(this.ranges, kind);
    if (preset) this.load(preset);
  }

  protected save(): void {
    this.form.markAllAsTouched();
    this.problems.set([]);
    if (this.form.invalid || this.busy()) return;
    const v = this.form.getRawValue();
    const p = profileOf({ kind: v.kind, autorange: v.autorange, lead: v.lead, digital: v.kind === 'digital' ? v.digital : [], analogue: v.kind === 'analogue' ? v.analogue : [] });
    if ('problems' in p) {
      this.problems.set(p.problems);
      return;
    }
    const resistor = v.checkResistor.trim() === '' ? null : parseResistance(v.checkResistor);
    const input: MeterProfileInput = {
      name: v.name.trim(),
      profile: p.profile,
      checkKind: v.checkKind,
      checkDate: v.checkDate.trim() === '' ? null : v.checkDate.trim(),
      checkResistorOhms: resistor && resistor.ok ? resistor.ohms : null,
      checkResistorTolerancePct: v.checkTolerance.trim() === '' ? null : Number(v.checkTolerance.trim().replace(',', '.')),
    };
    if (input.checkResistorOhms !== null && input.checkResistorTolerancePct === null) {
      this.form.controls.checkTolerance.setErrors({ server: 'Give the check resistor\'s tolerance (e.g. 0.1 for a ±0.1 % part).' });
      return;
    }
    const r = this.record();
    this.busy.set(true);
    this.error.set(null);
    const call = r ? this.api.update(r.id, { ...input, version: r.version }) : this.api.create(input);
    call.subscribe({
      next: () => void this.router.navigate(['/meters']),
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        if (e.status === 409) this.error.set('This profile was changed meanwhile (another tab?). Reload the page and edit it again.');
        else if (!showServerError(this.form, e)) this.error.set(e.message);
      },
    });
  }

  private load(profile: MeterProfile): void {
    loadMeterRanges(this.ranges, profile, COUNTS_MAX);
  }
}
