import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal } from '@angular/core';
import { AbstractControl, NonNullableFormBuilder, ReactiveFormsModule, ValidationErrors, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import type { ClassDetail, ClassInvitation, ClassStudent, InvitationState } from '@domain/class-format';
import { apiErrorOf } from '../../../core/errors/api-error';
import { showServerError } from '../../../core/errors/server-errors';
import { ErrorMessages, FieldErrors } from '../../../shared/field-errors/field-errors';
import { ClassesApi } from '../../classes-api';

/** The most addresses one invitation request takes (the API's limit). */
export const MAX_INVITES = 50;
const EMAIL = /^[^\s@]+@[^\s@]+\.[^\s@]+$/;

/** The addresses typed, split on commas, semicolons, spaces and new lines; duplicates dropped. */
export function emailsOf(text: string): string[] {
  const seen = new Set<string>();
  for (const part of text.split(/[\s,;]+/)) {
    const e = part.trim();
    if (e) seen.add(e);
  }
  return [...seen];
}

/** The addresses field: at least one, at most 50, each an e-mail address. */
export function emailListValidator(control: AbstractControl<string>): ValidationErrors | null {
  const list = emailsOf(control.value ?? '');
  if (list.length === 0) return { required: true };
  if (list.length > MAX_INVITES) return { tooMany: list.length };
  const bad = list.filter((e) => !EMAIL.test(e));
  return bad.length ? { badEmails: bad } : null;
}

const INVITE_MESSAGES: ErrorMessages = {
  required: 'Enter at least one e-mail address.',
  tooMany: (n) => `At most ${MAX_INVITES} addresses at once (${String(n)} given).`,
  badEmails: (bad) => `Not an e-mail address: ${(bad as string[]).join(', ')}.`,
};

export const INVITATION_STATE_LABELS: Readonly<Record<InvitationState, string>> = {
  open: 'waiting',
  accepted: 'joined',
  expired: 'expired',
  revoked: 'revoked',
};

/** The roster (remove a student) and the invitations by e-mail (invite, revoke an open one). */
@Component({
  selector: 'dm-students-section',
  imports: [DatePipe, ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, FieldErrors],
  template: `
    @if (error(); as text) {
      <p class="dm-form-message" role="alert">{{ text }}</p>
    }
    @if (notice(); as text) {
      <p class="dm-form-message dm-info" role="status">{{ text }}</p>
    }
    <h3>Students</h3>
    @if (current().length === 0) {
      <p class="empty">No student has joined yet.</p>
    } @else {
      <div class="table-wrap">
        <table class="plain" aria-label="Students of the class">
          <thead>
            <tr><th scope="col">Student</th><th scope="col">E-mail</th><th scope="col">Joined</th><th scope="col"><span class="cdk-visually-hidden">Actions</span></th></tr>
          </thead>
          <tbody>
            @for (s of current(); track s.student.id) {
              <tr>
                <td>{{ s.student.name }}</td>
                <td>{{ s.student.email }}</td>
                <td>{{ s.joinedAt | date: 'mediumDate' }}</td>
                <td>
                  @if (confirming() === s.student.id) {
                    <span class="inline">
                      <span>Remove {{ s.student.name }}? Their surveys stay.</span>
                      <button mat-flat-button type="button" class="dm-touch" [disabled]="busy()" (click)="remove(s)">Remove</button>
                      <button mat-button type="button" class="dm-touch" (click)="confirming.set(null)">Keep</button>
                    </span>
                  } @else {
                    <button mat-button type="button" class="dm-touch" (click)="confirming.set(s.student.id)">
                      Remove<span class="cdk-visually-hidden"> {{ s.student.name }}</span>
                    </button>
                  }
                </td>
              </tr>
            }
          </tbody>
        </table>
      </div>
    }
    @if (removed().length) {
      <p class="sub">Removed: @for (s of removed(); track s.student.id; let last = $last) {<span class="removed">{{ s.student.name }}</span>{{ last ? '' : ', ' }}}</p>
    }

    <section class="block" aria-labelledby="invite-title">
      <h3 id="invite-title">Invite students</h3>
      <p class="sub">Each address gets a single-use link, good for 14 days. Someone with an account signs in and joins; anyone else creates a student account.</p>
      <form class="dm-form" [formGroup]="form" (ngSubmit)="invite()" novalidate>
        <mat-form-field class="full">
          <mat-label>E-mail addresses</mat-label>
          <textarea matInput formControlName="emails" rows="3" autocomplete="off"></textarea>
          <mat-hint>One per line, or separated by commas (at most {{ max }})</mat-hint>
          <mat-error><dm-field-errors [control]="form.controls.emails" [messages]="inviteMessages" /></mat-error>
        </mat-form-field>
        <div class="dm-form-actions">
          <button mat-flat-button type="submit" class="dm-touch" [disabled]="busy()">
            <mat-icon aria-hidden="true">forward_to_inbox</mat-icon>
            Send invitations
          </button>
        </div>
      </form>
    </section>

    <h3>Invitations</h3>
    @if (cls().invitations.length === 0) {
      <p class="empty">No invitations sent.</p>
    } @else {
      <div class="table-wrap">
        <table class="plain" aria-label="Invitations">
          <thead>
            <tr><th scope="col">E-mail</th><th scope="col">State</th><th scope="col">Sent</th><th scope="col">Good until</th><th scope="col"><span class="cdk-visually-hidden">Actions</span></th></tr>
          </thead>
          <tbody>
            @for (i of cls().invitations; track i.id) {
              <tr [attr.data-state]="i.state">
                <td>{{ i.email }}</td>
                <td><span class="state-chip">{{ stateLabels[i.state] }}</span></td>
                <td>{{ i.createdAt | date: 'mediumDate' }}</td>
                <td>{{ i.state === 'accepted' ? 'joined ' + (i.acceptedAt | date: 'mediumDate') : (i.expiresAt | date: 'mediumDate') }}</td>
                <td>
                  @if (i.state === 'open') {
                    <button mat-button type="button" class="dm-touch" [disabled]="busy()" (click)="revoke(i)">
                      Revoke<span class="cdk-visually-hidden"> the invitation of {{ i.email }}</span>
                    </button>
                  }
                </td>
              </tr>
            }
          </tbody>
        </table>
      </div>
    }
  `,
  styleUrl: './section.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class StudentsSection {
  private readonly api = inject(ClassesApi);

  readonly cls = input.required<ClassDetail>();
  readonly changed = output<void>();

  protected readonly max = MAX_INVITES;
  protected readonly inviteMessages = INVITE_MESSAGES;
  protected readonly stateLabels = INVITATION_STATE_LABELS;
  protected readonly current = computed(() => this.cls().students.filter((s) => s.removedAt === null));
  protected readonly removed = computed(() => this.cls().students.filter((s) => s.removedAt !== null));
  protected readonly confirming = signal<number | null>(null);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly notice = signal<string | null>(null);
  protected readonly form = inject(NonNullableFormBuilder).group({ emails: ['', [emailListValidator, Validators.maxLength(20000)]] });

  protected invite(): void {
    if (this.busy()) return;
    this.error.set(null);
    this.notice.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const emails = emailsOf(this.form.controls.emails.value);
    this.busy.set(true);
    this.api.invite(this.cls().id, emails).subscribe({
      next: (items) => {
        this.busy.set(false);
        this.form.reset();
        this.notice.set(items.length === 1 ? 'Invitation sent.' : `${items.length} invitations sent.`);
        this.changed.emit();
      },
      error: (err: unknown) => {
        this.busy.set(false);
        const e = apiErrorOf(err);
        if (!(e.field?.startsWith('emails') && showServerError(this.form, { ...e, field: 'emails' }))) this.error.set(e.message);
      },
    });
  }

  protected revoke(i: ClassInvitation): void {
    this.run(this.api.revokeInvitation(this.cls().id, i.id), `The invitation of ${i.email} is revoked.`);
  }

  protected remove(s: ClassStudent): void {
    this.run(this.api.removeStudent(this.cls().id, s.student.id), `${s.student.name} is removed from the class.`);
  }

  private run(call: ReturnType<ClassesApi['revokeInvitation']>, done: string): void {
    if (this.busy()) return;
    this.busy.set(true);
    this.error.set(null);
    this.notice.set(null);
    call.subscribe({
      next: () => {
        this.busy.set(false);
        this.confirming.set(null);
        this.notice.set(done);
        this.changed.emit();
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.error.set(apiErrorOf(err).message);
      },
    });
  }
}
