import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { ROLES, ROLE_LABELS, Role } from '../../core/auth/roles';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { ErrorMessages, FieldErrors } from '../../shared/field-errors/field-errors';
import { AdminApi, AdminUser } from '../admin-api';
import { ROLES_MESSAGES, atLeastOneRole } from '../roles-field';

const MESSAGES = {
  name: { required: 'Enter their name.' },
  roles: ROLES_MESSAGES,
} satisfies Record<string, ErrorMessages>;

/** Edit a user's name and roles. */
@Component({
  selector: 'dm-edit-user-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatButtonModule, FieldErrors],
  templateUrl: './edit-user-dialog.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class EditUserDialog {
  private readonly api = inject(AdminApi);
  private readonly dialogRef = inject<MatDialogRef<EditUserDialog, AdminUser>>(MatDialogRef);
  private readonly destroyRef = inject(DestroyRef);
  protected readonly user = inject<AdminUser>(MAT_DIALOG_DATA);

  private readonly fb = inject(NonNullableFormBuilder);
  protected readonly form = this.fb.group({
    name: [this.user.name, [Validators.required]],
    roles: this.fb.control<Role[]>([...this.user.roles], atLeastOneRole),
  });
  protected readonly messages = MESSAGES;
  protected readonly roles = ROLES;
  protected readonly roleLabels = ROLE_LABELS;
  protected readonly busy = signal(false);
  protected readonly formError = signal<string | null>(null);

  protected save(): void {
    if (this.busy()) return;
    this.formError.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    const { name, roles } = this.form.getRawValue();
    this.api
      .updateUser(this.user.id, { name: name.trim(), roles }, true)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (user) => this.dialogRef.close(user),
        error: (err: unknown) => {
          const error = apiErrorOf(err);
          if (!showServerError(this.form, error)) this.formError.set(error.message);
          this.busy.set(false);
        },
      });
  }
}
