import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable, toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import type { MeterProfileRecord, SetDetail, SurveyStart } from '@domain/set-format';
import { DEFAULT_ALLOWANCE, NEAR_LIMIT_FRACTION, type AcceptanceRule } from '@domain/verdict';
import type { SurveyPurpose } from '@domain/words';
import { catchError, forkJoin, map, of, startWith, switchMap } from 'rxjs';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { FieldErrors } from '../../shared/field-errors/field-errors';
import { RuleFields } from '../../shared/rule-fields/rule-fields';
import { SafetyCaution } from '../../shared/safety-caution/safety-caution';
import { MetersApi } from '../../meters/meters-api';
import { TemplatesApi, VersionSummary } from '../../templates/templates-api';
import { PURPOSE_LABELS } from '../set-words';
import { SetsApi } from '../sets-api';
import { optionalNumber } from '../set-page/sections/parts-section';

/** The purposes a technician starts from a set (`assignment` surveys come from a class). */
export const START_PURPOSES: readonly SurveyPurpose[] = ['intake', 'after-repair', 'periodic'];

export interface RuleFormValue {
  bandFrom: 'template' | 'allowance';
  allowanceLow: string;
  allowanceHigh: string;
  decision: 'simple' | 'guarded';
  nearLimit: string;
}

/** The acceptance rule from the form, or the field and message of its first problem. */
export function ruleOf(v: RuleFormValue): { rule: AcceptanceRule } | { field: keyof RuleFormValue; message: string } {
  const near = optionalNumber(v.nearLimit);
  if (near === null || Number.isNaN(near) || near <= 0 || near >= 1) return { field: 'nearLimit', message: 'A fraction between 0 and 1, such as 0.75.' };
  const rule: AcceptanceRule = { decision: v.decision, nearLimitFraction: near, bandFrom: v.bandFrom };
  if (v.bandFrom === 'allowance') {
    const low = optionalNumber(v.allowanceLow);
    const high = optionalNumber(v.allowanceHigh);
    if (low === null || Number.isNaN(low) || low >= 0 || low <= -100) return { field: 'allowanceLow', message: 'A negative percentage, such as −20.' };
    if (high === null || Number.isNaN(high) || high <= 0) return { field: 'allowanceHigh', message: 'A positive percentage, such as 20.' };
    return { rule: { ...rule, allowance: { lowPct: low, highPct: high } } };
  }
  return { rule };
}

/**
 * `/sets/:id/surveys/new`: purpose, template version, meter profile, acceptance rule and
 * conditions; the API carries over points, order and conditions of the set's newest survey (never
 * values). Then on to the grid at `/surveys/:id`.
 */
@Component({
  selector: 'dm-new-survey',
  imports: [
    ReactiveFormsModule,
    RouterLink,
    MatButtonModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    FieldErrors,
    RuleFields,
    SafetyCaution,
  ],
  templateUrl: './new-survey.html',
  styleUrl: './new-survey.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NewSurvey {
  private readonly api = inject(SetsApi);
  private readonly meters = inject(MetersApi);
  private readonly templates = inject(TemplatesApi);
  private readonly router = inject(Router);
  private readonly fb = inject(NonNullableFormBuilder);

  /** Route parameter. */
  readonly id = input.required<string>();
  protected readonly setId = computed(() => Number(this.id()));

  protected readonly purposes = START_PURPOSES;
  protected readonly purposeLabels = PURPOSE_LABELS;
  protected readonly set = signal<SetDetail | null>(null);
  protected readonly versions = signal<readonly VersionSummary[]>([]);
  protected readonly profiles = signal<readonly MeterProfileRecord[]>([]);
  protected readonly loadError = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);

  protected readonly form = this.fb.group({
    purpose: this.fb.control<SurveyPurpose>('intake'),
    versionNumber: this.fb.control<number | null>(null, Validators.required),
    meterProfileId: this.fb.control<number | null>(null),
    rule: this.fb.group({
      bandFrom: this.fb.control<'template' | 'allowance'>('template'),
      allowanceLow: [String(DEFAULT_ALLOWANCE.lowPct)],
      allowanceHigh: [String(DEFAULT_ALLOWANCE.highPct)],
      decision: this.fb.control<'simple' | 'guarded'>('simple'),
      nearLimit: [String(NEAR_LIMIT_FRACTION)],
    }),
    conditions: this.fb.group({
      tubesIn: [false],
      speakerConnected: [true],
      controls: [''],
      ambientC: [''],
      note: [''],
    }),
  });
  protected readonly decision = toSignal(this.form.controls.rule.controls.decision.valueChanges.pipe(startWith('simple' as const)), { initialValue: 'simple' as const });
  protected readonly meterChosen = toSignal(this.form.controls.meterProfileId.valueChanges.pipe(startWith(null), map(() => this.form.controls.meterProfileId.value !== null)), { initialValue: false });

  constructor() {
    toObservable(this.setId)
      .pipe(
        switchMap((id) =>
          this.api.get(id).pipe(
            switchMap((set) =>
              forkJoin({
                set: of(set),
                template: this.templates.template(set.template.id),
                profiles: this.meters.list().pipe(catchError(() => of([] as MeterProfileRecord[]))),
              }),
            ),
            map((value) => ({ ok: true as const, value })),
            catchError((err: unknown) => of({ ok: false as const, message: apiErrorOf(err).status === 404 ? 'No such set, or it is not shared with you.' : apiErrorOf(err).message })),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((answer) => {
        if (!answer.ok) {
          this.loadError.set(answer.message);
          return;
        }
        const { set, template, profiles } = answer.value;
        this.set.set(set);
        const published = template.versions.filter((v) => v.state === 'published').sort((a, b) => b.number - a.number);
        this.versions.set(published);
        this.profiles.set(profiles.filter((p) => !p.archived));
        this.form.patchValue({
          versionNumber: set.latestPublishedVersion ?? published[0]?.number ?? null,
          purpose: set.surveys.length === 0 ? 'intake' : 'after-repair',
        });
      });
  }

  protected start(): void {
    this.form.markAllAsTouched();
    if (this.form.invalid || this.busy() || !this.set()) return;
    const v = this.form.getRawValue();
    const r = ruleOf(v.rule);
    if ('field' in r) {
      this.form.controls.rule.controls[r.field].setErrors({ server: r.message });
      return;
    }
    const ambientC = optionalNumber(v.conditions.ambientC);
    if (Number.isNaN(ambientC)) {
      this.form.controls.conditions.controls.ambientC.setErrors({ server: 'Degrees Celsius, such as 21.' });
      return;
    }
    const start: SurveyStart = {
      purpose: v.purpose,
      versionNumber: v.versionNumber ?? undefined,
      meterProfileId: v.meterProfileId,
      rule: r.rule,
      conditions: {
        tubesIn: v.conditions.tubesIn,
        speakerConnected: v.conditions.speakerConnected,
        controls: v.conditions.controls.trim(),
        ambientC,
        note: v.conditions.note.trim(),
      },
    };
    this.busy.set(true);
    this.error.set(null);
    this.api.startSurvey(this.setId(), start).subscribe({
      next: (view) => void this.router.navigate(['/surveys', view.survey.id]),
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        if (!showServerError(this.form, e)) this.error.set(e.message);
      },
    });
  }
}
