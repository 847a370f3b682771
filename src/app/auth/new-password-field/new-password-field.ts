import { ChangeDetectionStrategy, Component, input, signal } from '@angular/core';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { FieldErrors } from '../../shared/field-errors/field-errors';
import { MIN_PASSWORD_LENGTH, NEW_PASSWORD_MESSAGES } from '../password-rules';

/** A new password: the field with a show/hide switch, the length hint and its messages (sign-up, invitation, reset). */
@Component({
  selector: 'dm-new-password-field',
  imports: [ReactiveFormsModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule, FieldErrors],
  template: `
    <mat-form-field>
      <mat-label>{{ label() }}</mat-label>
      <input matInput [formControl]="control()" [type]="hidden() ? 'password' : 'text'" autocomplete="new-password" />
      <button
        mat-icon-button
        matSuffix
        type="button"
        (click)="hidden.set(!hidden())"
        aria-label="Show password"
        [attr.aria-pressed]="!hidden()"
      >
        <mat-icon aria-hidden="true">{{ hidden() ? 'visibility' : 'visibility_off' }}</mat-icon>
      </button>
      <mat-hint>At least {{ minLength }} characters.</mat-hint>
      <mat-error><dm-field-errors [control]="control()" [messages]="messages" /></mat-error>
    </mat-form-field>
  `,
  styles: `
    :host {
      display: block;
    }
    mat-form-field {
      width: 100%;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NewPasswordField {
  readonly control = input.required<FormControl<string>>();
  readonly label = input('Password');
  protected readonly hidden = signal(true);
  protected readonly minLength = MIN_PASSWORD_LENGTH;
  protected readonly messages = NEW_PASSWORD_MESSAGES;
}
