import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { FieldErrors } from '../../shared/field-errors/field-errors';

export interface NoteData {
  readonly title: string;
  readonly text: string;
  readonly label: string;
  readonly confirm: string;
  readonly required: boolean;
  readonly maxLength: number;
}

/** Asks for a reason or a note (retire a version, accept or decline a correction); closes with the text. */
@Component({
  selector: 'dm-note-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatButtonModule, FieldErrors],
  template: `
    <h2 mat-dialog-title>{{ data.title }}</h2>
    <form [formGroup]="form" (ngSubmit)="done()" novalidate>
      <mat-dialog-content>
        <p>{{ data.text }}</p>
        <mat-form-field style="width: 100%">
          <mat-label>{{ data.label }}</mat-label>
          <textarea matInput formControlName="note" rows="3" [attr.maxlength]="data.maxLength" cdkFocusInitial></textarea>
          <mat-error><dm-field-errors [control]="form.controls.note" [messages]="{ required: 'Required: say why.' }" /></mat-error>
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" class="dm-touch" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" class="dm-touch">{{ data.confirm }}</button>
      </mat-dialog-actions>
    </form>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NoteDialog {
  private readonly dialogRef = inject<MatDialogRef<NoteDialog, string>>(MatDialogRef);
  protected readonly data = inject<NoteData>(MAT_DIALOG_DATA);
  protected readonly form = inject(NonNullableFormBuilder).group({
    note: ['', this.data.required ? [Validators.required, Validators.maxLength(this.data.maxLength)] : [Validators.maxLength(this.data.maxLength)]],
  });

  protected done(): void {
    const note = this.form.controls.note.value.trim();
    if (this.data.required && !note) {
      this.form.controls.note.setErrors({ required: true });
      this.form.markAllAsTouched();
      return;
    }
    if (this.form.invalid) return;
    this.dialogRef.close(note);
  }
}
