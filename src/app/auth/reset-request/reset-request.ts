import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { RouterLink } from '@angular/router';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { ErrorMessages, FieldErrors } from '../../shared/field-errors/field-errors';
import { AccountApi } from '../account-api';
import { EMAIL_MESSAGES } from '../password-rules';

const MESSAGES = { email: EMAIL_MESSAGES } satisfies Record<string, ErrorMessages>;

/** Asks for a reset link. The server answers 202 whether or not the account exists; so does this page. */
@Component({
  selector: 'dm-reset-request',
  imports: [ReactiveFormsModule, RouterLink, MatFormFieldModule, MatInputModule, MatButtonModule, FieldErrors],
  templateUrl: './reset-request.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ResetRequest {
  private readonly account = inject(AccountApi);
  private readonly destroyRef = inject(DestroyRef);

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', [Validators.required, Validators.email]],
  });
  protected readonly messages = MESSAGES;
  protected readonly busy = signal(false);
  protected readonly sentTo = signal<string | null>(null);
  protected readonly formError = signal<string | null>(null);

  protected sendLink(): void {
    if (this.busy()) return;
    this.formError.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    const email = this.form.controls.email.value.trim();
    this.account
      .requestPasswordReset(email)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: () => {
          this.sentTo.set(email);
          this.busy.set(false);
        },
        error: (err: unknown) => {
          const error = apiErrorOf(err);
          if (!showServerError(this.form, error)) this.formError.set(error.message);
          this.busy.set(false);
        },
      });
  }
}
