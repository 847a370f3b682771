import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import type { TemplateProblem } from '@domain/template-format';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { FieldErrors } from '../../shared/field-errors/field-errors';
import { TemplateView, TemplatesApi, problemsOf } from '../templates-api';

export interface PublishData {
  readonly templateId: number;
  /** The number the new version will get. */
  readonly nextNumber: number;
}

/** Publish the draft as the next immutable version, with a changelog line. */
@Component({
  selector: 'dm-publish-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatButtonModule, FieldErrors],
  template: `
    <h2 mat-dialog-title>Publish version {{ data.nextNumber }}</h2>
    <form [formGroup]="form" (ngSubmit)="publish()" novalidate>
      <mat-dialog-content>
        <p>The draft becomes version {{ data.nextNumber }}: an immutable snapshot that surveys can use. Later edits go to a new draft.</p>
        @if (conflict(); as text) {
          <div class="dm-form-message" role="alert">
            <p>{{ text }}</p>
            @if (problems().length) {
              <ul>
                @for (p of problems(); track $index) {
                  <li><code>{{ p.path }}</code> — {{ p.message }}</li>
                }
              </ul>
            }
          </div>
        }
        <mat-form-field style="width: 100%">
          <mat-label>Changelog</mat-label>
          <input matInput formControlName="changelog" maxlength="500" autocomplete="off" cdkFocusInitial />
          <mat-hint>One line: what changed since the last version.</mat-hint>
          <mat-error><dm-field-errors [control]="form.controls.changelog" [messages]="{ required: 'Say what changed in one line.' }" /></mat-error>
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" class="dm-touch" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" class="dm-touch" [disabled]="busy()">Publish</button>
      </mat-dialog-actions>
    </form>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PublishDialog {
  private readonly api = inject(TemplatesApi);
  private readonly dialogRef = inject<MatDialogRef<PublishDialog, TemplateView>>(MatDialogRef);
  private readonly destroyRef = inject(DestroyRef);
  protected readonly data = inject<PublishData>(MAT_DIALOG_DATA);
  protected readonly form = inject(NonNullableFormBuilder).group({ changelog: ['', [Validators.required, Validators.maxLength(500)]] });
  protected readonly busy = signal(false);
  /** The API's 409 (or other) message, shown as it says it. */
  protected readonly conflict = signal<string | null>(null);
  protected readonly problems = signal<readonly TemplateProblem[]>([]);

  protected publish(): void {
    if (this.busy()) return;
    this.conflict.set(null);
    this.problems.set([]);
    if (this.form.invalid || !this.form.controls.changelog.value.trim()) {
      this.form.controls.changelog.setErrors({ required: true });
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    this.api
      .publish(this.data.templateId, this.form.controls.changelog.value.trim())
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (view) => this.dialogRef.close(view),
        error: (err: unknown) => {
          const e = apiErrorOf(err);
          if (e.status === 409 || !showServerError(this.form, e)) {
            this.conflict.set(e.message);
            this.problems.set(problemsOf(err));
          }
          this.busy.set(false);
        },
      });
  }
}
