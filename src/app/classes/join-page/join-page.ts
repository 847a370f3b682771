import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import type { InvitationPreview } from '@domain/class-format';
import { catchError, map, of, switchMap } from 'rxjs';
import { Auth } from '../../core/auth/auth';
import { apiErrorOf } from '../../core/errors/api-error';
import { showServerError } from '../../core/errors/server-errors';
import { ErrorMessages, FieldErrors } from '../../shared/field-errors/field-errors';
import { NewPasswordField } from '../../auth/new-password-field/new-password-field';
import { NAME_MESSAGES, newPasswordValidators } from '../../auth/password-rules';
import { ClassesApi } from '../classes-api';

const MESSAGES = { name: { ...NAME_MESSAGES, maxlength: 'At most 120 characters.' } } satisfies Record<string, ErrorMessages>;

/** Why an invitation that is no longer open cannot be used, in words. */
export const CLOSED_INVITATION: Readonly<Record<'accepted' | 'expired' | 'revoked', string>> = {
  accepted: 'This invitation has already been used. Sign in to see your classes.',
  expired: 'This invitation has expired. Ask your instructor for a new one.',
  revoked: 'This invitation was withdrawn by the instructor.',
};

type Loaded = { state: 'loading' } | { state: 'ok'; preview: InvitationPreview } | { state: 'failed'; message: string };

/**
 * `/join/:token` from the invitation mail (public): which class it is for; a new student creates
 * an account here, someone with an account signs in and joins.
 */
@Component({
  selector: 'dm-join-page',
  imports: [ReactiveFormsModule, RouterLink, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule, FieldErrors, NewPasswordField],
  template: `
    <div class="dm-page dm-narrow">
      <h1>Join a class</h1>
      @switch (loaded().state) {
        @case ('loading') {
          <mat-progress-bar mode="indeterminate" aria-label="Loading the invitation" />
        }
        @case ('failed') {
          @if (loaded(); as l) {
            @if (l.state === 'failed') {
              <p class="dm-form-message" role="alert">{{ l.message }}</p>
            }
          }
        }
      }
      @if (preview(); as p) {
        <section class="invite" aria-label="The invitation">
          <p class="class-name"><mat-icon aria-hidden="true">school</mat-icon>{{ p.className }}</p>
          <p>{{ p.term ? p.term + ' · ' : '' }}taught by {{ p.instructorName }}</p>
          <p>For <strong>{{ p.email }}</strong></p>
        </section>
        @if (formError(); as text) {
          <p class="dm-form-message" role="alert" data-test="form-error">{{ text }}</p>
        }
        @if (p.state !== 'open') {
          <p class="dm-form-message" role="alert">{{ closed(p.state) }}</p>
        } @else if (auth.user(); as user) {
          @if (sameEmail()) {
            <p>You are signed in as {{ user.name }} ({{ user.email }}).</p>
            <button mat-flat-button type="button" class="dm-touch" [disabled]="busy()" (click)="join()">
              <mat-icon aria-hidden="true">group_add</mat-icon>
              Join the class
            </button>
          } @else {
            <p class="dm-form-message" role="alert" data-test="other-account">
              You are signed in as {{ user.email }}, but this invitation is for {{ p.email }}. Sign out, then sign in as {{ p.email }} to join.
            </p>
            <button mat-stroked-button type="button" class="dm-touch" (click)="signOut()">Sign out</button>
          }
        } @else if (p.accountExists || accountExists()) {
          <p>An account with {{ p.email }} exists. Sign in with it and you join the class.</p>
          <a mat-flat-button class="dm-touch" routerLink="/sign-in" [queryParams]="{ returnUrl: '/join/' + token() }">Sign in and join</a>
        } @else {
          <p>Create your student account to join.</p>
          <form class="dm-form" [formGroup]="form" (ngSubmit)="accept()" novalidate>
            <mat-form-field>
              <mat-label>Your name</mat-label>
              <input matInput formControlName="name" autocomplete="name" />
              <mat-error><dm-field-errors [control]="form.controls.name" [messages]="messages.name" /></mat-error>
            </mat-form-field>
            <dm-new-password-field [control]="form.controls.password" />
            <div class="dm-form-actions">
              <button mat-flat-button type="submit" class="dm-touch" [disabled]="busy()">Create the account and join</button>
            </div>
          </form>
          <p class="sub">Already have an account with {{ p.email }}? <a routerLink="/sign-in" [queryParams]="{ returnUrl: '/join/' + token() }">Sign in and join</a>.</p>
        }
      }
    </div>
  `,
  styles: `
    .invite {
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: var(--mat-sys-corner-medium);
      padding: 8px 16px;
      margin-bottom: 16px;
    }
    .invite p {
      margin: 4px 0;
    }
    .class-name {
      display: flex;
      align-items: center;
      gap: 8px;
      font: var(--mat-sys-title-large);
    }
    .sub {
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class JoinPage {
  private readonly api = inject(ClassesApi);
  protected readonly auth = inject(Auth);
  private readonly router = inject(Router);

  /** Route parameter. */
  readonly token = input.required<string>();

  protected readonly loaded = signal<Loaded>({ state: 'loading' });
  protected readonly preview = computed(() => {
    const l = this.loaded();
    return l.state === 'ok' ? l.preview : null;
  });
  protected readonly sameEmail = computed(() => {
    const p = this.preview();
    const u = this.auth.user();
    return !!p && !!u && p.email.trim().toLowerCase() === u.email.trim().toLowerCase();
  });
  protected readonly accountExists = signal(false);
  protected readonly busy = signal(false);
  protected readonly formError = signal<string | null>(null);
  protected readonly messages = MESSAGES;
  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', [Validators.required, Validators.maxLength(120)]],
    password: ['', newPasswordValidators],
  });

  constructor() {
    toObservable(this.token)
      .pipe(
        switchMap((token) =>
          this.api.invitation(token).pipe(
            map((preview): Loaded => ({ state: 'ok', preview })),
            catchError((err: unknown) => {
              const e = apiErrorOf(err);
              return of<Loaded>({ state: 'failed', message: e.status === 404 ? 'This invitation link is not valid: it may be mistyped, or it was withdrawn.' : e.message });
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((l) => this.loaded.set(l));
  }

  protected closed(state: InvitationPreview['state']): string {
    return state === 'open' ? '' : CLOSED_INVITATION[state];
  }

  protected accept(): void {
    if (this.busy()) return;
    this.formError.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const { name, password } = this.form.getRawValue();
    this.busy.set(true);
    this.api.acceptInvitation(this.token(), { name: name.trim(), password }).subscribe({
      next: (session) => {
        this.auth.begin(session);
        void this.router.navigateByUrl('/classes');
      },
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        if (e.status === 409) {
          this.accountExists.set(true);
          this.formError.set(`${e.message} Sign in with that account to join.`);
          return;
        }
        if (!showServerError(this.form, e)) this.formError.set(e.message);
      },
    });
  }

  protected join(): void {
    if (this.busy()) return;
    this.busy.set(true);
    this.formError.set(null);
    this.api.joinWithInvitation(this.token()).subscribe({
      next: (answer) => {
        const classId = typeof answer === 'object' && answer !== null ? (answer as { classId?: unknown; id?: unknown }).classId ?? (answer as { id?: unknown }).id : null;
        void this.router.navigateByUrl(typeof classId === 'number' ? `/classes/${classId}` : '/classes');
        // The account may have gained the student role: refresh the session's roles in the background.
        this.auth.refresh().subscribe({ error: () => undefined });
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.formError.set(apiErrorOf(err).message);
      },
    });
  }

  protected signOut(): void {
    this.auth.signOut();
  }
}
