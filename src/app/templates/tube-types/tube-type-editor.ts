import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable, toSignal } from '@angular/core/rxjs-interop';
import { FormArray, FormControl, FormGroup, NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Router, RouterLink } from '@angular/router';
import { BASE_GEOMETRIES, BASE_NAMES, baseGeometry } from '@domain/base-geometry';
import { ELECTRODES, HEATING_KINDS, type BaseName, type Electrode, type Heating, type TemplateProblem, type TubePin } from '@domain/template-format';
import { catchError, map, of, startWith, switchMap } from 'rxjs';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { FieldErrors } from '../../shared/field-errors/field-errors';
import { SocketView } from '../../shared/socket-view/socket-view';
import { ELECTRODE_LABELS, HEATING_LABELS } from '../template-words';
import { TemplatesApi, TubeType, TubeTypeInput, problemsOf } from '../templates-api';

type PinRow = FormGroup<{ pin: FormControl<number>; electrode: FormControl<Electrode | ''>; label: FormControl<string> }>;
type TieRow = FormGroup<{ a: FormControl<number | null>; b: FormControl<number | null> }>;

/** Default screen label of an electrode on a pin (the author may write "plate (section 2)"). */
export const ELECTRODE_SHORT: Readonly<Record<Electrode, string>> = {
  p: 'plate',
  g: 'grid',
  g1: 'grid 1',
  g2: 'screen grid',
  g3: 'grid 3',
  g4: 'grid 4',
  g5: 'grid 5',
  k: 'cathode',
  d: 'diode plate',
  h: 'heater',
  hct: 'heater centre tap',
  htap: 'heater tap',
  f: 'filament',
  fct: 'filament centre tap',
  s: 'shield',
  NC: 'NC',
  IC: 'IC',
};

/** The pins listed in the form, as the API takes them (unlisted pins left out). */
export function pinsFromRows(rows: readonly { pin: number; electrode: Electrode | ''; label: string }[]): TubePin[] {
  return rows
    .filter((r): r is { pin: number; electrode: Electrode; label: string } => r.electrode !== '')
    .map((r) => ({ pin: r.pin, electrode: r.electrode, label: r.label.trim() || ELECTRODE_SHORT[r.electrode] }));
}

/** `/templates/tube-types/new` and `/templates/tube-types/:designation`: view, add or change a tube type. */
@Component({
  selector: 'dm-tube-type-editor',
  imports: [ReactiveFormsModule, RouterLink, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatSelectModule, MatProgressBarModule, FieldErrors, SocketView],
  templateUrl: './tube-type-editor.html',
  styleUrl: './tube-type-editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TubeTypeEditor {
  private readonly api = inject(TemplatesApi);
  private readonly router = inject(Router);
  private readonly snackBar = inject(MatSnackBar);
  private readonly destroyRef = inject(DestroyRef);
  private readonly fb = inject(NonNullableFormBuilder);

  /** Route parameter; absent on `/new`. */
  readonly designation = input<string>();
  protected readonly isNew = computed(() => !this.designation());

  protected readonly bases = BASE_NAMES;
  protected readonly baseLabels = Object.fromEntries(BASE_NAMES.map((b) => [b, BASE_GEOMETRIES[b].label])) as Record<BaseName, string>;
  protected readonly heatings = HEATING_KINDS;
  protected readonly heatingLabels = HEATING_LABELS;
  protected readonly electrodes = ELECTRODES;
  protected readonly electrodeLabels = ELECTRODE_LABELS;

  protected readonly form = this.fb.group({
    designation: ['', [Validators.required, Validators.pattern(/^[A-Za-z0-9][A-Za-z0-9.-]{0,23}$/)]],
    base: this.fb.control<BaseName>('noval'),
    heating: this.fb.control<Heating>('indirect'),
    heaterVolts: this.fb.control<number | null>(6.3, [Validators.required, Validators.min(0.1), Validators.max(200)]),
    heaterAmps: this.fb.control<number | null>(0.3, [Validators.required, Validators.min(0.001), Validators.max(20)]),
    notes: ['', Validators.maxLength(2000)],
    pins: this.fb.array<PinRow>([]),
    ties: this.fb.array<TieRow>([]),
  });
  protected readonly messages = {
    designation: { required: 'Enter the type number, such as 12BE6.', pattern: 'Letters, digits, dots and hyphens, up to 24.' },
    heaterVolts: { required: 'Enter the heater voltage.', min: 'More than 0 V.', max: 'At most 200 V.' },
    heaterAmps: { required: 'Enter the heater current.', min: 'More than 0 A.', max: 'At most 20 A.' },
  };

  protected readonly loading = signal(false);
  protected readonly notFound = signal(false);
  protected readonly existing = signal<TubeType | null>(null);
  protected readonly readOnly = computed(() => !this.isNew() && this.existing()?.canEdit !== true);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly problems = signal<readonly TemplateProblem[]>([]);

  private readonly value = toSignal(this.form.valueChanges.pipe(startWith(null), map(() => this.form.getRawValue())), { initialValue: this.form.getRawValue() });
  /** The pins as drawn, live while editing. */
  protected readonly livePins = computed(() => pinsFromRows(this.value().pins));
  protected readonly liveBase = computed(() => this.value().base);
  protected readonly tiePins = computed(() => this.livePins().filter((p) => p.electrode !== 'IC'));

  constructor() {
    this.resizePins('noval');
    this.form.controls.base.valueChanges.pipe(takeUntilDestroyed()).subscribe((b) => this.resizePins(b));
    toObservable(this.designation)
      .pipe(
        switchMap((d) => {
          if (!d) return of(null);
          this.loading.set(true);
          return this.api.tubeType(d).pipe(catchError(() => of('missing' as const)));
        }),
        takeUntilDestroyed(),
      )
      .subscribe((t) => {
        this.loading.set(false);
        this.notFound.set(t === 'missing');
        if (t && t !== 'missing') this.fill(t);
      });
  }

  protected get pinRows(): PinRow[] {
    return this.form.controls.pins.controls;
  }
  protected get tieRows(): TieRow[] {
    return this.form.controls.ties.controls;
  }

  /** One row per pin of the base; rows of pins the base still has keep what was entered. */
  private resizePins(base: BaseName): void {
    const count = baseGeometry(base)?.pinCount ?? 9;
    const pins = this.form.controls.pins;
    while (pins.length > count) pins.removeAt(pins.length - 1);
    while (pins.length < count) pins.push(this.pinRow(pins.length + 1, '', ''));
  }

  private pinRow(pin: number, electrode: Electrode | '', label: string): PinRow {
    const row = this.fb.group({ pin: this.fb.control(pin), electrode: this.fb.control<Electrode | ''>(electrode), label: this.fb.control(label, Validators.maxLength(60)) });
    // A fresh electrode gives the label its default word unless the author wrote one.
    row.controls.electrode.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe((e) => {
      const label = row.controls.label.value.trim();
      const wasDefault = label === '' || Object.values(ELECTRODE_SHORT).includes(label);
      if (wasDefault) row.controls.label.setValue(e === '' ? '' : ELECTRODE_SHORT[e]);
    });
    return row;
  }

  private fill(t: TubeType): void {
    this.existing.set(t);
    this.form.controls.designation.setValue(t.designation);
    this.form.controls.base.setValue(t.base);
    this.form.patchValue({ heating: t.heating, heaterVolts: t.heaterVolts, heaterAmps: t.heaterAmps, notes: t.notes });
    this.form.controls.pins.controls.forEach((row) => {
      const p = t.pins.find((x) => x.pin === row.controls.pin.value);
      row.setValue({ pin: row.controls.pin.value, electrode: p?.electrode ?? '', label: p?.label ?? '' }, { emitEvent: false });
    });
    this.form.controls.ties.clear();
    for (const [a, b] of t.ties) this.form.controls.ties.push(this.fb.group({ a: this.fb.control<number | null>(a), b: this.fb.control<number | null>(b) }));
    this.form.updateValueAndValidity();
    if (!t.canEdit) this.form.disable();
  }

  protected addTie(): void {
    this.form.controls.ties.push(this.fb.group({ a: this.fb.control<number | null>(null), b: this.fb.control<number | null>(null) }));
  }

  protected removeTie(i: number): void {
    this.form.controls.ties.removeAt(i);
  }

  protected save(): void {
    if (this.busy() || this.readOnly()) return;
    this.error.set(null);
    this.problems.set([]);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const v = this.form.getRawValue();
    const pins = pinsFromRows(v.pins);
    if (!pins.length) return this.error.set('Give at least the heater pins their electrode.');
    const ties = v.ties.filter((t) => t.a !== null || t.b !== null);
    if (ties.some((t) => t.a === null || t.b === null)) return this.error.set('Each internal tie joins two pins: choose both or remove the tie.');
    const input: TubeTypeInput = {
      base: v.base,
      heating: v.heating,
      heaterVolts: Number(v.heaterVolts),
      heaterAmps: Number(v.heaterAmps),
      pins,
      ties: ties.map((t) => [t.a!, t.b!] as const),
      notes: v.notes.trim(),
    };
    const designation = v.designation.trim().toUpperCase();
    this.busy.set(true);
    const request = this.isNew() ? this.api.createTubeType(designation, input) : this.api.updateTubeType(this.existing()!.designation, input);
    request.pipe(takeUntilDestroyed(this.destroyRef)).subscribe({
      next: (saved) => {
        this.busy.set(false);
        this.snackBar.open(`Tube type ${saved.designation} saved.`, 'OK', { duration: 5000 });
        if (this.isNew()) void this.router.navigate(['/templates/tube-types', saved.designation]);
        else this.fill(saved);
      },
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        const problems = problemsOf(err).map((p) => ({ ...p, path: pinPath(p.path, pins) }));
        this.problems.set(problems);
        if (problems.length || !showServerError(this.form, e)) this.error.set(e.message);
      },
    });
  }
}

/** `pins[2].pin` names the third pin sent; say which pin number that is. */
export function pinPath(path: string, sent: readonly TubePin[]): string {
  const m = /^pins\[(\d+)\]/.exec(path);
  const pin = m ? sent[Number(m[1])] : undefined;
  return pin ? `pin ${pin.pin} (${path})` : path;
}
