import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { FormControl, NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatAutocompleteModule } from '@angular/material/autocomplete';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import { JOB_STATUSES, RESTORATION_LEVELS, type JobStatus, type RestorationLevel, type SetInput } from '@domain/set-format';
import { catchError, debounceTime, distinctUntilChanged, map, of, startWith, switchMap } from 'rxjs';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { FieldErrors } from '../../shared/field-errors/field-errors';
import { TemplateSummary, TemplatesApi } from '../../templates/templates-api';
import { JOB_STATUS_LABELS, RESTORATION_LEVEL_LABELS } from '../set-words';
import { SetsApi } from '../sets-api';

/** `/sets/new`: a set follows a template with a published version; the rest is the intake record. */
@Component({
  selector: 'dm-new-set',
  imports: [ReactiveFormsModule, RouterLink, MatAutocompleteModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatSelectModule, FieldErrors],
  templateUrl: './new-set.html',
  styleUrl: './new-set.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NewSet {
  private readonly api = inject(SetsApi);
  private readonly templates = inject(TemplatesApi);
  private readonly router = inject(Router);
  private readonly fb = inject(NonNullableFormBuilder);

  protected readonly statuses = JOB_STATUSES;
  protected readonly statusLabels = JOB_STATUS_LABELS;
  protected readonly levels = RESTORATION_LEVELS;
  protected readonly levelLabels = RESTORATION_LEVEL_LABELS;

  /** What is typed to find a template; the choice itself is `form.templateId`. */
  protected readonly templateSearch = new FormControl<string | TemplateSummary>('', { nonNullable: true });
  protected readonly form = this.fb.group({
    templateId: this.fb.control<number | null>(null, Validators.required),
    label: ['', [Validators.required, Validators.maxLength(200)]],
    accessionNumber: ['', Validators.maxLength(80)],
    customer: ['', Validators.maxLength(200)],
    serial: ['', Validators.maxLength(80)],
    jobStatus: this.fb.control<JobStatus>('intake'),
    restorationLevel: this.fb.control<RestorationLevel>('repair'),
    condition: [''],
    complaint: [''],
    intakeNotes: [''],
  });
  protected readonly messages = { required: 'Required.' };
  protected readonly chosen = signal<TemplateSummary | null>(null);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);

  /** Templates matching what is typed, only those with a published version (a survey needs one). */
  protected readonly options = toSignal(
    this.templateSearch.valueChanges.pipe(
      startWith(''),
      map((v) => (typeof v === 'string' ? v : '')),
      debounceTime(250),
      distinctUntilChanged(),
      switchMap((q) =>
        this.templates.library({ q, sort: 'use', page: 1, pageSize: 20 }).pipe(
          map((p) => p.items.filter((t) => t.latestVersion !== null)),
          catchError(() => of([] as TemplateSummary[])),
        ),
      ),
    ),
    { initialValue: [] as TemplateSummary[] },
  );
  protected readonly hot = computed(() => {
    const t = this.chosen();
    return t !== null && (t.power === 'ac-dc' || t.power === 'autotransformer');
  });

  constructor() {
    this.templateSearch.valueChanges.pipe(takeUntilDestroyed()).subscribe((v) => {
      if (typeof v === 'string') {
        // Typing again drops the choice until one is picked from the list.
        if (this.chosen() !== null && v !== templateName(this.chosen()!)) this.choose(null);
      }
    });
  }

  protected readonly templateName = (t: TemplateSummary | string | null): string => (t === null ? '' : typeof t === 'string' ? t : templateName(t));

  protected choose(t: TemplateSummary | null): void {
    this.chosen.set(t);
    this.form.controls.templateId.setValue(t?.id ?? null);
    this.form.controls.templateId.markAsTouched();
  }

  protected save(): void {
    this.form.markAllAsTouched();
    if (this.form.invalid || this.busy()) return;
    const v = this.form.getRawValue();
    const input: SetInput = {
      templateId: v.templateId!,
      label: v.label.trim(),
      accessionNumber: v.accessionNumber.trim(),
      customer: v.customer.trim(),
      serial: v.serial.trim(),
      jobStatus: v.jobStatus,
      restorationLevel: v.restorationLevel,
      condition: v.condition.trim(),
      complaint: v.complaint.trim(),
      intakeNotes: v.intakeNotes.trim(),
    };
    this.busy.set(true);
    this.error.set(null);
    this.api.create(input).subscribe({
      next: (set) => void this.router.navigate(['/sets', set.id]),
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        if (!showServerError(this.form, e)) this.error.set(e.message);
      },
    });
  }
}

function templateName(t: TemplateSummary): string {
  return `${t.maker} ${t.model}${t.chassisNumber ? ' (' + t.chassisNumber + ')' : ''}`;
}
