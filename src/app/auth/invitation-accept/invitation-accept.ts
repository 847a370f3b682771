import { ChangeDetectionStrategy, Component, DestroyRef, OnInit, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatProgressSpinnerModule } from '@angular/material/progress-spinner';
import { Router, RouterLink } from '@angular/router';
import { Auth } from '../../core/auth/auth';
import { ROLE_LABELS } from '../../core/auth/roles';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { ErrorMessages, FieldErrors } from '../../shared/field-errors/field-errors';
import { NewPasswordField } from '../new-password-field/new-password-field';
import { AccountApi, Invitation } from '../account-api';
import { NAME_MESSAGES, newPasswordValidators } from '../password-rules';

const MESSAGES = { name: NAME_MESSAGES } satisfies Record<string, ErrorMessages>;

/** `/invitation/:token` from the mail: see the invitation, choose a name and password, start. */
@Component({
  selector: 'dm-invitation-accept',
  imports: [
    NewPasswordField,
    ReactiveFormsModule,
    RouterLink,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatProgressSpinnerModule,
    FieldErrors,
  ],
  templateUrl: './invitation-accept.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class InvitationAccept implements OnInit {
  private readonly account = inject(AccountApi);
  private readonly auth = inject(Auth);
  private readonly router = inject(Router);
  private readonly destroyRef = inject(DestroyRef);

  /** Route parameter. */
  readonly token = input.required<string>();

  protected readonly invitation = signal<Invitation | null>(null);
  protected readonly loadError = signal<string | null>(null);
  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', [Validators.required, Validators.maxLength(120)]],
    password: ['', newPasswordValidators],
  });
  protected readonly messages = MESSAGES;
  protected readonly roleLabels = ROLE_LABELS;
  protected readonly busy = signal(false);
  protected readonly formError = signal<string | null>(null);

  ngOnInit(): void {
    this.account
      .invitation(this.token())
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (invitation) => {
          if (invitation.name) this.form.controls.name.setValue(invitation.name);
          this.invitation.set(invitation);
        },
        error: (err: unknown) => {
          const error = apiErrorOf(err);
          this.loadError.set(
            error.status === 404 ? 'This invitation has been used or has expired. Ask your admin for a new one.' : error.message,
          );
        },
      });
  }

  protected accept(): void {
    if (this.busy()) return;
    this.formError.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    const { name, password } = this.form.getRawValue();
    this.account
      .acceptInvitation({ token: this.token(), name: name.trim(), password })
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
