import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { Observable, map } from 'rxjs';
import { ROLES, ROLE_LABELS, Role } from '../../core/auth/roles';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { ErrorMessages, FieldErrors } from '../../shared/field-errors/field-errors';
import { AdminApi, AdminUser, InvitationSummary } from '../admin-api';
import { ROLES_MESSAGES, atLeastOneRole } from '../roles-field';

/** `invite`: mail an invitation link; `create`: make the account now with a first password. */
export type NewUserMode = 'invite' | 'create';

export type NewUserResult = { readonly mode: 'invite'; readonly invitation: InvitationSummary } | { readonly mode: 'create'; readonly user: AdminUser };

const MIN_PASSWORD_LENGTH = 10;

const MESSAGES = {
  email: { required: "Enter the person's email address.", email: 'Enter an email address such as name@example.org.' },
  name: { required: 'Enter their name.' },
  roles: ROLES_MESSAGES,
  password: {
    required: 'Set a first password.',
    minlength: `At least ${MIN_PASSWORD_LENGTH} characters.`,
  },
} satisfies Record<string, ErrorMessages>;

@Component({
  selector: 'dm-new-user-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatButtonModule, FieldErrors],
  templateUrl: './new-user-dialog.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NewUserDialog {
  private readonly api = inject(AdminApi);
  private readonly dialogRef = inject<MatDialogRef<NewUserDialog, NewUserResult>>(MatDialogRef);
  private readonly destroyRef = inject(DestroyRef);
  protected readonly mode = signal<NewUserMode>(inject<NewUserMode>(MAT_DIALOG_DATA));
  protected readonly title = computed(() => (this.mode() === 'invite' ? 'Invite a person' : 'Create an account'));

  private readonly fb = inject(NonNullableFormBuilder);
  protected readonly form = this.fb.group({
    email: ['', [Validators.required, Validators.email]],
    name: ['', this.mode() === 'create' ? [Validators.required] : []],
    roles: this.fb.control<Role[]>(['technician'], atLeastOneRole),
    password: ['', this.mode() === 'create' ? [Validators.required, Validators.minLength(MIN_PASSWORD_LENGTH)] : []],
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
    const { email, name, roles, password } = this.form.getRawValue();
    const request: Observable<NewUserResult> =
      this.mode() === 'invite'
        ? this.api
            .invite({ email: email.trim(), ...(name.trim() ? { name: name.trim() } : {}), roles })
            .pipe(map((invitation) => ({ mode: 'invite', invitation }) as const))
        : this.api
            .createUser({ email: email.trim(), name: name.trim(), roles, password })
            .pipe(map((user) => ({ mode: 'create', user }) as const));
    request.pipe(takeUntilDestroyed(this.destroyRef)).subscribe({
      next: (result) => this.dialogRef.close(result),
      error: (err: unknown) => {
        const error = apiErrorOf(err);
        if (!showServerError(this.form, error)) this.formError.set(error.message);
        this.busy.set(false);
      },
    });
  }
}
