import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { FormControl, ReactiveFormsModule, Validators } from '@angular/forms';
import { ErrorMessages, FieldErrors, messageFor } from './field-errors';

describe('messageFor', () => {
  const messages: ErrorMessages = {
    required: 'Enter the email.',
    minlength: (e) => `Needs ${(e as { requiredLength: number }).requiredLength}.`,
  };

  it('words the first error with the form\'s own message, a function getting the error value', () => {
    expect(messageFor({ required: true }, messages)).toBe('Enter the email.');
    expect(messageFor({ minlength: { requiredLength: 10, actualLength: 3 } }, messages)).toBe('Needs 10.');
  });

  it('falls back to the default words, then to naming the key; nothing for a valid control', () => {
    expect(messageFor({ email: true }, messages)).toContain('email address');
    expect(messageFor({ server: 'Email already in use.' }, messages)).toBe('Email already in use.');
    expect(messageFor({ oddRule: true }, messages)).toBe('Check this field (oddRule).');
    expect(messageFor(null, messages)).toBeNull();
  });
});

@Component({
  imports: [ReactiveFormsModule, FieldErrors],
  template: `<dm-field-errors [control]="control" [messages]="messages" />`,
})
class Host {
  readonly control = new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.minLength(10)] });
  readonly messages: ErrorMessages = { required: 'Choose a password.' };
}

describe('FieldErrors', () => {
  it('renders the message of the current error and follows the control as it changes', async () => {
    const fixture = TestBed.createComponent(Host);
    await fixture.whenStable();
    const text = () => (fixture.nativeElement as HTMLElement).textContent?.trim();
    expect(text()).toBe('Choose a password.');

    fixture.componentInstance.control.setValue('short');
    await fixture.whenStable();
    expect(text()).toBe('At least 10 characters.');

    fixture.componentInstance.control.setValue('long enough words');
    await fixture.whenStable();
    expect(text()).toBe('');

    fixture.componentInstance.control.setErrors({ server: 'Too common a password.' });
    await fixture.whenStable();
    expect(text()).toBe('Too common a password.');
  });
});
