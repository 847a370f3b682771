import { ChangeDetectionStrategy, Component, OnInit, inject, input, output, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { JOB_STATUSES, RESTORATION_LEVELS, type JobStatus, type RestorationLevel, type SetDetail } from '@domain/set-format';
import { apiErrorOf } from '../../../core/errors/api-error';
import { showServerError } from '../../../core/errors/server-errors';
import { FieldErrors } from '../../../shared/field-errors/field-errors';
import { JOB_STATUS_LABELS, RESTORATION_LEVEL_LABELS } from '../../set-words';
import { SetsApi } from '../../sets-api';

/** The intake record of the set (label, serial, accession, customer, job status, level, condition, complaint, notes), edited with its version. */
@Component({
  selector: 'dm-intake-section',
  imports: [ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatInputModule, MatSelectModule, FieldErrors],
  template: `
    @if (error(); as text) {
      <p class="dm-form-message" role="alert">{{ text }}</p>
    }
    @if (saved()) {
      <p class="dm-form-message dm-info" role="status">Saved.</p>
    }
    <form class="dm-form" [formGroup]="form" (ngSubmit)="save()" aria-label="Intake record">
      <div class="row-form">
        <mat-form-field>
          <mat-label>Label</mat-label>
          <input matInput formControlName="label" autocomplete="off" />
          <mat-error><dm-field-errors [control]="form.controls.label" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Serial</mat-label>
          <input matInput formControlName="serial" autocomplete="off" />
          <mat-error><dm-field-errors [control]="form.controls.serial" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Accession number</mat-label>
          <input matInput formControlName="accessionNumber" autocomplete="off" />
          <mat-error><dm-field-errors [control]="form.controls.accessionNumber" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Customer</mat-label>
          <input matInput formControlName="customer" autocomplete="off" />
          <mat-error><dm-field-errors [control]="form.controls.customer" /></mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Job status</mat-label>
          <mat-select formControlName="jobStatus">
            @for (s of statuses; track s) {
              <mat-option [value]="s">{{ statusLabels[s] }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Restoration level</mat-label>
          <mat-select formControlName="restorationLevel">
            @for (l of levels; track l) {
              <mat-option [value]="l">{{ levelLabels[l] }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
      </div>
      <mat-form-field>
        <mat-label>Condition</mat-label>
        <textarea matInput formControlName="condition" rows="2"></textarea>
      </mat-form-field>
      <mat-form-field>
        <mat-label>Complaint</mat-label>
        <textarea matInput formControlName="complaint" rows="2"></textarea>
      </mat-form-field>
      <mat-form-field>
        <mat-label>Intake notes</mat-label>
        <textarea matInput formControlName="intakeNotes" rows="3"></textarea>
      </mat-form-field>
      <div class="dm-form-actions">
        <button mat-flat-button type="submit" class="dm-touch" [disabled]="busy() || form.pristine">Save the intake record</button>
      </div>
    </form>
  `,
  styleUrl: './section.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class IntakeSection implements OnInit {
  private readonly api = inject(SetsApi);
  private readonly fb = inject(NonNullableFormBuilder);
  readonly set = input.required<SetDetail>();
  readonly changed = output<SetDetail | void>();

  protected readonly statuses = JOB_STATUSES;
  protected readonly statusLabels = JOB_STATUS_LABELS;
  protected readonly levels = RESTORATION_LEVELS;
  protected readonly levelLabels = RESTORATION_LEVEL_LABELS;
  protected readonly busy = signal(false);
  protected readonly saved = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly form = this.fb.group({
    label: ['', [Validators.required, Validators.maxLength(200)]],
    serial: ['', Validators.maxLength(80)],
    accessionNumber: ['', Validators.maxLength(80)],
    customer: ['', Validators.maxLength(200)],
    jobStatus: this.fb.control<JobStatus>('intake'),
    restorationLevel: this.fb.control<RestorationLevel>('repair'),
    condition: [''],
    complaint: [''],
    intakeNotes: [''],
  });

  ngOnInit(): void {
    const s = this.set();
    this.form.reset({
      label: s.label,
      serial: s.serial,
      accessionNumber: s.accessionNumber,
      customer: s.customer,
      jobStatus: s.jobStatus,
      restorationLevel: s.restorationLevel,
      condition: s.condition,
      complaint: s.complaint,
      intakeNotes: s.intakeNotes,
    });
  }

  protected save(): void {
    this.form.markAllAsTouched();
    if (this.form.invalid || this.busy()) return;
    const v = this.form.getRawValue();
    this.busy.set(true);
    this.saved.set(false);
    this.error.set(null);
    this.api
      .update(this.set().id, {
        label: v.label.trim(),
        serial: v.serial.trim(),
        accessionNumber: v.accessionNumber.trim(),
        customer: v.customer.trim(),
        jobStatus: v.jobStatus,
        restorationLevel: v.restorationLevel,
        condition: v.condition.trim(),
        complaint: v.complaint.trim(),
        intakeNotes: v.intakeNotes.trim(),
        version: this.set().version,
      })
      .subscribe({
        next: (updated) => {
          this.busy.set(false);
          this.saved.set(true);
          this.form.markAsPristine();
          this.changed.emit(updated);
        },
        error: (err: unknown) => {
          this.busy.set(false);
          const e = apiErrorOf(err);
          if (e.status === 409) this.error.set('The set was changed meanwhile (another tab or person). Reload the page and make your change again.');
          else if (!showServerError(this.form, e)) this.error.set(e.message);
        },
      });
  }
}
