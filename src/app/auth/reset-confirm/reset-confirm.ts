import { ChangeDetectionStrategy, Component, DestroyRef, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { Router, RouterLink } from '@angular/router';
import { Auth } from '../../core/auth/auth';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { NewPasswordField } from '../new-password-field/new-password-field';
import { AccountApi } from '../account-api';
import { newPasswordValidators } from '../password-rules';


/** `/reset-password/:token` from the mail: choose a new password. */
@Component({
  selector: 'dm-reset-confirm',
  imports: [NewPasswordField, ReactiveFormsModule, RouterLink, MatButtonModule],
  templateUrl: './reset-confirm.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ResetConfirm {
  private readonly account = inject(AccountApi);
  private readonly auth = inject(Auth);
  private readonly router = inject(Router);
  private readonly destroyRef = inject(DestroyRef);

  /** Route parameter. */
  readonly token = input.required<string>();

  protected readonly form = inject(NonNullableFormBuilder).group({
    password: ['', newPasswordValidators],
  });
  protected readonly busy = signal(false);
  protected readonly formError = signal<string | null>(null);

  protected savePassword(): void {
    if (this.busy()) return;
    this.formError.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    this.account
      .confirmPasswordReset(this.token(), this.form.controls.password.value)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: () => {
          this.auth.notice.set('Your password is changed. Sign in with the new one.');
          void this.router.navigateByUrl('/sign-in');
        },
        error: (err: unknown) => {
          const error = apiErrorOf(err);
          if (!showServerError(this.form, error)) this.formError.set(error.message);
          this.busy.set(false);
        },
      });
  }
}
