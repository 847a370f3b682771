import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, OnInit, computed, inject, input, output, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import type { AssignmentDetail, AssignmentPatch } from '@domain/class-format';
import type { SurveySummary } from '@domain/set-format';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { FieldErrors } from '../../shared/field-errors/field-errors';
import { SetsApi } from '../../sets/sets-api';
import { ClassesApi } from '../classes-api';
import { isoOfLocal, localOfIso } from '../class-words';
import { futureDate } from '../class-page/sections/assignment-form';

/** The instructor changes an assignment: title, instructions, due date, reference survey, verdicts while measuring. Only changed fields are sent. */
@Component({
  selector: 'dm-assignment-edit',
  imports: [DatePipe, ReactiveFormsModule, MatButtonModule, MatCheckboxModule, MatFormFieldModule, MatInputModule, MatSelectModule, FieldErrors],
  template: `
    <section class="edit" aria-labelledby="edit-title">
      <h2 id="edit-title">Change the assignment</h2>
      @if (error(); as text) {
        <p class="dm-form-message" role="alert">{{ text }}</p>
      }
      <form class="dm-form" [formGroup]="form" (ngSubmit)="save()" novalidate>
        <mat-form-field>
          <mat-label>Title</mat-label>
          <input matInput formControlName="title" autocomplete="off" />
          <mat-error><dm-field-errors [control]="form.controls.title" [messages]="{ required: 'Give the assignment a title.' }" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Instructions</mat-label>
          <textarea matInput formControlName="instructions" rows="3"></textarea>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Due</mat-label>
          <input matInput type="datetime-local" formControlName="dueAt" />
          <mat-hint>A new due date sends the reminder again before it.</mat-hint>
          <mat-error><dm-field-errors [control]="form.controls.dueAt" [messages]="dueMessages" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Reference survey</mat-label>
          <mat-select formControlName="referenceSurveyId">
            <mat-option [value]="null">None (no comparison in reviews)</mat-option>
            @for (s of references(); track s.id) {
              <mat-option [value]="s.id">{{ s.purpose }}, {{ (s.completedAt ?? s.startedAt) | date: 'mediumDate' }}{{ s.meterName ? ' · ' + s.meterName : '' }}</mat-option>
            }
          </mat-select>
          <mat-error><dm-field-errors [control]="form.controls.referenceSurveyId" /></mat-error>
        </mat-form-field>
        <mat-checkbox formControlName="showVerdicts">Show verdicts while measuring</mat-checkbox>
        <div class="dm-form-actions">
          <button mat-flat-button type="submit" class="dm-touch" [disabled]="busy()">Save</button>
          <button mat-button type="button" class="dm-touch" (click)="cancelled.emit()">Cancel</button>
        </div>
      </form>
    </section>
  `,
  styles: `
    .edit {
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: var(--mat-sys-corner-medium);
      padding: 4px 16px 16px;
      margin: 16px 0;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AssignmentEdit implements OnInit {
  private readonly api = inject(ClassesApi);
  private readonly sets = inject(SetsApi);
  private readonly fb = inject(NonNullableFormBuilder);

  readonly assignment = input.required<AssignmentDetail>();
  readonly saved = output<AssignmentDetail>();
  readonly cancelled = output<void>();

  protected readonly dueMessages = { required: 'Set the due date and time.', date: 'Not a date and time.', past: 'The due date is in the past.' };
  private readonly surveys = signal<readonly SurveySummary[]>([]);
  protected readonly references = computed(() => this.surveys().filter((s) => s.state === 'complete' && s.purpose !== 'assignment' && s.versionNumber === this.assignment().versionNumber));
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly form = this.fb.group({
    title: ['', [Validators.required, Validators.maxLength(200)]],
    instructions: [''],
    dueAt: ['', [Validators.required, futureDate]],
    referenceSurveyId: this.fb.control<number | null>(null),
    showVerdicts: [true],
  });

  ngOnInit(): void {
    const a = this.assignment();
    this.form.reset({ title: a.title, instructions: a.instructions, dueAt: localOfIso(a.dueAt), referenceSurveyId: a.referenceSurveyId, showVerdicts: a.showVerdicts });
    // An unchanged due date that has passed stays as it is (only a changed one must lie ahead).
    this.form.controls.dueAt.setValidators([Validators.required, (c) => (c.value === localOfIso(a.dueAt) ? null : futureDate(c))]);
    this.form.controls.dueAt.updateValueAndValidity();
    this.sets.surveys(a.set.id).subscribe({ next: (list) => this.surveys.set(list), error: () => undefined });
  }

  protected save(): void {
    if (this.busy()) return;
    this.error.set(null);
    this.form.markAllAsTouched();
    if (this.form.invalid) return;
    const a = this.assignment();
    const v = this.form.getRawValue();
    const patch: AssignmentPatch = {};
    if (v.title.trim() !== a.title) patch.title = v.title.trim();
    if (v.instructions !== a.instructions) patch.instructions = v.instructions;
    if (v.dueAt !== localOfIso(a.dueAt)) patch.dueAt = isoOfLocal(v.dueAt)!;
    if (v.referenceSurveyId !== a.referenceSurveyId) patch.referenceSurveyId = v.referenceSurveyId;
    if (v.showVerdicts !== a.showVerdicts) patch.showVerdicts = v.showVerdicts;
    if (Object.keys(patch).length === 0) {
      this.cancelled.emit();
      return;
    }
    this.busy.set(true);
    this.api.updateAssignment(a.id, patch).subscribe({
      next: (updated) => {
        this.busy.set(false);
        this.saved.emit(updated);
      },
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        if (!showServerError(this.form, e)) this.error.set(e.message);
      },
    });
  }
}
