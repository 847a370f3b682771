import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable, toSignal } from '@angular/core/rxjs-interop';
import { AbstractControl, NonNullableFormBuilder, ReactiveFormsModule, ValidationErrors, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import type { AssignmentDetail, AssignmentInput, ClassDetail } from '@domain/class-format';
import type { SetSummary, SurveySummary } from '@domain/set-format';
import { DEFAULT_ALLOWANCE, NEAR_LIMIT_FRACTION, type AcceptanceRule } from '@domain/verdict';
import { catchError, map, of, switchMap } from 'rxjs';
import { apiErrorOf } from '../../../core/errors/api-error';
import { showServerError } from '../../../core/errors/server-errors';
import { ErrorMessages, FieldErrors } from '../../../shared/field-errors/field-errors';
import { RuleFields } from '../../../shared/rule-fields/rule-fields';
import { SetsApi } from '../../../sets/sets-api';
import { TemplatesApi, VersionSummary } from '../../../templates/templates-api';
import { ClassesApi } from '../../classes-api';
import { isoOfLocal } from '../../class-words';

/** The due date: a date and time in the future. */
export function futureDate(control: AbstractControl<string>): ValidationErrors | null {
  if (!control.value) return null;
  const iso = isoOfLocal(control.value);
  if (iso === null) return { date: true };
  return Date.parse(iso) <= Date.now() ? { past: true } : null;
}

/** The band from the form: the template's tolerance or a flat allowance (−low %, +high %). */
export function assignmentRule(bandFrom: 'template' | 'allowance', low: string, high: string): AcceptanceRule | { field: 'allowanceLow' | 'allowanceHigh'; message: string } {
  const rule: AcceptanceRule = { decision: 'simple', nearLimitFraction: NEAR_LIMIT_FRACTION, bandFrom };
  if (bandFrom === 'template') return rule;
  const lo = Number(low.replace('−', '-').trim());
  const hi = Number(high.replace('−', '-').trim());
  if (low.trim() === '' || !Number.isFinite(lo) || lo >= 0 || lo <= -100) return { field: 'allowanceLow', message: 'A negative percentage, such as −20.' };
  if (high.trim() === '' || !Number.isFinite(hi) || hi <= 0) return { field: 'allowanceHigh', message: 'A positive percentage, such as 20.' };
  return { ...rule, allowance: { lowPct: lo, highPct: hi } };
}

const MESSAGES = {
  title: { required: 'Give the assignment a title.', maxlength: 'At most 200 characters.' },
  templateId: { required: 'Choose the chassis template.' },
  versionNumber: { required: 'Choose a published version of the template.' },
  setId: { required: 'Choose the training set.' },
  dueAt: { required: 'Set the due date and time.', date: 'Not a date and time.', past: 'The due date is in the past.' },
} satisfies Record<string, ErrorMessages>;

interface TemplateChoice {
  readonly id: number;
  readonly text: string;
}

/**
 * A new assignment: template and published version, the training set (the instructor's sets of
 * that template), the reference survey (a complete survey of that set), due date, band rule,
 * predict first and whether verdicts show while measuring.
 */
@Component({
  selector: 'dm-assignment-form',
  imports: [DatePipe, ReactiveFormsModule, MatButtonModule, MatCheckboxModule, MatFormFieldModule, MatIconModule, MatInputModule, MatSelectModule, FieldErrors, RuleFields],
  template: `
    <section class="block" aria-labelledby="new-assignment-title">
      <h3 id="new-assignment-title">New assignment</h3>
      @if (loadError(); as text) {
        <p class="dm-form-message" role="alert">{{ text }}</p>
      }
      @if (error(); as text) {
        <p class="dm-form-message" role="alert" data-test="form-error">{{ text }}</p>
      }
      <form class="dm-form" [formGroup]="form" (ngSubmit)="create()" novalidate>
        <mat-form-field class="full">
          <mat-label>Title</mat-label>
          <input matInput formControlName="title" autocomplete="off" />
          <mat-error><dm-field-errors [control]="form.controls.title" [messages]="messages.title" /></mat-error>
        </mat-form-field>
        <mat-form-field class="full">
          <mat-label>Instructions</mat-label>
          <textarea matInput formControlName="instructions" rows="3"></textarea>
          <mat-hint>What to measure, how, and what to look out for</mat-hint>
        </mat-form-field>
        <div class="pair">
          <mat-form-field>
            <mat-label>Chassis template</mat-label>
            <mat-select formControlName="templateId">
              @for (t of templateChoices(); track t.id) {
                <mat-option [value]="t.id">{{ t.text }}</mat-option>
              }
            </mat-select>
            @if (templateChoices().length === 0 && !loading()) {
              <mat-hint>None of your sets yet: a training set is one of your own sets.</mat-hint>
            }
            <mat-error><dm-field-errors [control]="form.controls.templateId" [messages]="messages.templateId" /></mat-error>
          </mat-form-field>
          <mat-form-field>
            <mat-label>Published version</mat-label>
            <mat-select formControlName="versionNumber">
              @for (v of versions(); track v.number) {
                <mat-option [value]="v.number">Version {{ v.number }}{{ v.changelog ? ': ' + v.changelog : '' }}</mat-option>
              }
            </mat-select>
            <mat-error><dm-field-errors [control]="form.controls.versionNumber" [messages]="messages.versionNumber" /></mat-error>
          </mat-form-field>
        </div>
        <div class="pair">
          <mat-form-field>
            <mat-label>Training set</mat-label>
            <mat-select formControlName="setId">
              @for (s of setChoices(); track s.id) {
                <mat-option [value]="s.id">{{ s.label }}{{ s.serial ? ' · serial ' + s.serial : '' }}</mat-option>
              }
            </mat-select>
            <mat-hint>Students survey this set through the assignment, nothing else of it.</mat-hint>
            <mat-error><dm-field-errors [control]="form.controls.setId" [messages]="messages.setId" /></mat-error>
          </mat-form-field>
          <mat-form-field>
            <mat-label>Reference survey</mat-label>
            <mat-select formControlName="referenceSurveyId">
              <mat-option [value]="null">None yet (no comparison in reviews)</mat-option>
              @for (s of references(); track s.id) {
                <mat-option [value]="s.id">{{ s.purpose }}, {{ (s.completedAt ?? s.startedAt) | date: 'mediumDate' }} · version {{ s.versionNumber }}{{ s.meterName ? ' · ' + s.meterName : '' }}</mat-option>
              }
            </mat-select>
            <mat-hint>Your own complete survey of the training set on this version; students see it after acceptance.</mat-hint>
            <mat-error><dm-field-errors [control]="form.controls.referenceSurveyId" /></mat-error>
          </mat-form-field>
        </div>
        <div class="pair">
          <mat-form-field>
            <mat-label>Due</mat-label>
            <input matInput type="datetime-local" formControlName="dueAt" />
            <mat-error><dm-field-errors [control]="form.controls.dueAt" [messages]="messages.dueAt" /></mat-error>
          </mat-form-field>
        </div>
        <fieldset>
          <legend>Acceptance rule</legend>
          <dm-rule-fields [group]="form" />
        </fieldset>
        <mat-checkbox formControlName="predictFirst">Predict first: a predicted in-circuit reading before the expected values show</mat-checkbox>
        <mat-checkbox formControlName="showVerdicts">Show verdicts while measuring</mat-checkbox>
        <div class="dm-form-actions">
          <button mat-flat-button type="submit" class="dm-touch" [disabled]="busy()">Create the assignment</button>
          <button mat-button type="button" class="dm-touch" (click)="cancelled.emit()">Cancel</button>
        </div>
      </form>
    </section>
  `,
  styleUrl: './section.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AssignmentForm {
  private readonly api = inject(ClassesApi);
  private readonly sets = inject(SetsApi);
  private readonly templates = inject(TemplatesApi);
  private readonly fb = inject(NonNullableFormBuilder);

  readonly cls = input.required<ClassDetail>();
  readonly created = output<AssignmentDetail>();
  readonly cancelled = output<void>();

  protected readonly messages = MESSAGES;
  protected readonly form = this.fb.group({
    title: ['', [Validators.required, Validators.maxLength(200)]],
    instructions: [''],
    templateId: this.fb.control<number | null>(null, Validators.required),
    versionNumber: this.fb.control<number | null>(null, Validators.required),
    setId: this.fb.control<number | null>(null, Validators.required),
    referenceSurveyId: this.fb.control<number | null>(null),
    dueAt: ['', [Validators.required, futureDate]],
    bandFrom: this.fb.control<'template' | 'allowance'>('template'),
    allowanceLow: [String(DEFAULT_ALLOWANCE.lowPct)],
    allowanceHigh: [String(DEFAULT_ALLOWANCE.highPct)],
    predictFirst: [false],
    showVerdicts: [true],
  });

  protected readonly loading = signal(true);
  protected readonly loadError = signal<string | null>(null);
  protected readonly error = signal<string | null>(null);
  protected readonly busy = signal(false);
  private readonly mySets = signal<readonly SetSummary[]>([]);
  protected readonly versions = signal<readonly VersionSummary[]>([]);
  /** The set's complete surveys of its own (not class surveys). */
  private readonly setSurveys = signal<readonly SurveySummary[]>([]);

  private readonly templateId = toSignal(this.form.controls.templateId.valueChanges, { initialValue: null });
  private readonly setId = toSignal(this.form.controls.setId.valueChanges, { initialValue: null });
  private readonly versionNumber = toSignal(this.form.controls.versionNumber.valueChanges, { initialValue: null });
  /** Reference candidates: the set's complete surveys of the chosen version (the test points must match). */
  protected readonly references = computed(() => this.setSurveys().filter((s) => s.versionNumber === this.versionNumber()));

  protected readonly templateChoices = computed<TemplateChoice[]>(() => {
    const seen = new Map<number, TemplateChoice>();
    for (const s of this.mySets()) {
      const t = s.template;
      if (!seen.has(t.id)) seen.set(t.id, { id: t.id, text: `${t.maker} ${t.model}${t.chassisNumber ? ' (' + t.chassisNumber + ')' : ''}` });
    }
    return [...seen.values()].sort((a, b) => a.text.localeCompare(b.text));
  });
  protected readonly setChoices = computed(() => this.mySets().filter((s) => s.template.id === this.templateId()));

  constructor() {
    this.sets
      .list({ page: 1, pageSize: 100 })
      .pipe(takeUntilDestroyed())
      .subscribe({
        next: (page) => {
          this.loading.set(false);
          this.mySets.set(page.items);
        },
        error: (err: unknown) => {
          this.loading.set(false);
          this.loadError.set(`Your sets could not be loaded: ${apiErrorOf(err).message}`);
        },
      });

    toObservable(this.templateId)
      .pipe(
        switchMap((id) => {
          this.form.patchValue({ versionNumber: null, setId: null, referenceSurveyId: null });
          if (id === null) return of([] as VersionSummary[]);
          return this.templates.template(id).pipe(
            map((t) => t.versions.filter((v) => v.state === 'published').sort((a, b) => b.number - a.number)),
            catchError(() => of([] as VersionSummary[])),
          );
        }),
        takeUntilDestroyed(),
      )
      .subscribe((versions) => {
        this.versions.set(versions);
        if (versions.length) this.form.controls.versionNumber.setValue(versions[0].number);
        const only = this.setChoices();
        if (only.length === 1) this.form.controls.setId.setValue(only[0].id);
      });

    toObservable(this.setId)
      .pipe(
        switchMap((id) => {
          this.form.controls.referenceSurveyId.setValue(null);
          if (id === null) return of([] as SurveySummary[]);
          return this.sets.surveys(id).pipe(
            map((list) => list.filter((s) => s.state === 'complete' && s.purpose !== 'assignment')),
            catchError(() => of([] as SurveySummary[])),
          );
        }),
        takeUntilDestroyed(),
      )
      .subscribe((list) => {
        this.setSurveys.set(list);
        const fitting = this.references();
        if (fitting.length === 1) this.form.controls.referenceSurveyId.setValue(fitting[0].id);
      });
    // A reference of another version does not fit: drop it when the version changes.
    toObservable(this.versionNumber)
      .pipe(takeUntilDestroyed())
      .subscribe(() => {
        const chosen = this.form.controls.referenceSurveyId.value;
        if (chosen !== null && !this.references().some((s) => s.id === chosen)) this.form.controls.referenceSurveyId.setValue(null);
      });
  }

  protected create(): void {
    if (this.busy()) return;
    this.error.set(null);
    this.form.markAllAsTouched();
    if (this.form.invalid) return;
    const v = this.form.getRawValue();
    const rule = assignmentRule(v.bandFrom, v.allowanceLow, v.allowanceHigh);
    if ('field' in rule) {
      this.form.controls[rule.field].setErrors({ server: rule.message });
      return;
    }
    const input: AssignmentInput = {
      title: v.title.trim(),
      instructions: v.instructions.trim(),
      templateId: v.templateId!,
      versionNumber: v.versionNumber!,
      setId: v.setId!,
      dueAt: isoOfLocal(v.dueAt)!,
      rule,
      referenceSurveyId: v.referenceSurveyId,
      predictFirst: v.predictFirst,
      showVerdicts: v.showVerdicts,
    };
    this.busy.set(true);
    this.api.createAssignment(this.cls().id, input).subscribe({
      next: (a) => {
        this.busy.set(false);
        this.created.emit(a);
      },
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        if (!showServerError(this.form, e)) this.error.set(e.message);
      },
    });
  }
}
