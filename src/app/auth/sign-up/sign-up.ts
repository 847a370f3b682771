import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { Router, RouterLink } from '@angular/router';
import { Auth } from '../../core/auth/auth';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { ErrorMessages, FieldErrors } from '../../shared/field-errors/field-errors';
import { NewPasswordField } from '../new-password-field/new-password-field';
import { AccountApi } from '../account-api';
import { EMAIL_MESSAGES, NAME_MESSAGES, newPasswordValidators } from '../password-rules';

const MESSAGES = {
  name: NAME_MESSAGES,
  email: EMAIL_MESSAGES,
} satisfies Record<string, ErrorMessages>;

/** Self sign-up (only while open sign-up is on); new accounts get the technician role. */
@Component({
  selector: 'dm-sign-up',
  imports: [NewPasswordField, ReactiveFormsModule, RouterLink, MatFormFieldModule, MatInputModule, MatButtonModule, FieldErrors],
  templateUrl: './sign-up.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SignUp {
  private readonly account = inject(AccountApi);
  private readonly auth = inject(Auth);
  private readonly router = inject(Router);
  private readonly destroyRef = inject(DestroyRef);

  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', [Validators.required, Validators.maxLength(120)]],
    email: ['', [Validators.required, Validators.email]],
    password: ['', newPasswordValidators],
  });
  protected readonly messages = MESSAGES;
  protected readonly busy = signal(false);
  protected readonly formError = signal<string | null>(null);

  protected createAccount(): void {
    if (this.busy()) return;
    this.formError.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    const { name, email, password } = this.form.getRawValue();
    this.account
      .signUp({ name: name.trim(), email: email.trim(), password })
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (session) => {
          this.auth.begin(session);
          void this.router.navigateByUrl('/home');
        },
        error: (err: unknown) => {
          const error = apiErrorOf(err);
          if (!showServerError(this.form, error)) this.formError.set(error.message);
          this.busy.set(false);
        },
      });
  }
}
