import { ChangeDetectionStrategy, Component, DestroyRef, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { Router, RouterLink } from '@angular/router';
import { catchError, map, of } from 'rxjs';
import { Auth } from '../../core/auth/auth';
import { safeReturnUrl } from '../../core/auth/return-url';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { ErrorMessages, FieldErrors } from '../../shared/field-errors/field-errors';
import { AccountApi } from '../account-api';
import { EMAIL_MESSAGES } from '../password-rules';

const MESSAGES = {
  email: EMAIL_MESSAGES,
  password: { required: 'Enter your password.' },
} satisfies Record<string, ErrorMessages>;

@Component({
  selector: 'dm-sign-in',
  imports: [
    ReactiveFormsModule,
    RouterLink,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatIconModule,
    FieldErrors,
  ],
  templateUrl: './sign-in.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SignIn {
  private readonly auth = inject(Auth);
  private readonly router = inject(Router);
  private readonly destroyRef = inject(DestroyRef);

  /** Query parameter: where to go after signing in. */
  readonly returnUrl = input<string>();

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', [Validators.required, Validators.email]],
    password: ['', [Validators.required]],
  });
  protected readonly messages = MESSAGES;
  protected readonly busy = signal(false);
  protected readonly formError = signal<string | null>(null);
  protected readonly hidePassword = signal(true);
  protected readonly notice = this.auth.notice;
  protected readonly openSignUp = toSignal(
    inject(AccountApi)
      .publicSettings()
      .pipe(
        map((s) => s.openSignUp),
        catchError(() => of(false)),
      ),
    { initialValue: false },
  );

  protected signIn(): void {
    if (this.busy()) return;
    this.formError.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    const { email, password } = this.form.getRawValue();
    this.auth
      .signIn(email.trim(), password)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: () => void this.router.navigateByUrl(safeReturnUrl(this.returnUrl())),
        error: (err: unknown) => {
          const error = apiErrorOf(err);
          if (!showServerError(this.form, error)) this.formError.set(error.message);
          this.busy.set(false);
        },
      });
  }
}
