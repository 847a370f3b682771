import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { toObservable, toSignal } from '@angular/core/rxjs-interop';
import { AbstractControl, ValidationErrors } from '@angular/forms';
import { map, startWith, switchMap } from 'rxjs';

/** Messages for one control, keyed by validator error key; a function gets the error's value. */
export type ErrorMessages = Readonly<Record<string, string | ((error: unknown) => string)>>;

/** Used when a form does not word an error itself. `server` is the API's own message. */
export const DEFAULT_MESSAGES: ErrorMessages = {
  required: 'Required.',
  email: 'Enter an email address such as name@example.org.',
  minlength: (e) => `At least ${(e as { requiredLength: number }).requiredLength} characters.`,
  maxlength: (e) => `At most ${(e as { requiredLength: number }).requiredLength} characters.`,
  server: (e) => String(e),
};

/** The message for the first error of a control (in the order the control reports them). */
export function messageFor(errors: ValidationErrors | null, messages: ErrorMessages): string | null {
  if (!errors) return null;
  for (const [key, value] of Object.entries(errors)) {
    const message = messages[key] ?? DEFAULT_MESSAGES[key];
    if (typeof message === 'function') return message(value);
    if (typeof message === 'string') return message;
    return `Check this field (${key}).`;
  }
  return null;
}

/** Renders the message of a control's first error; put it inside `mat-error`. */
@Component({
  selector: 'dm-field-errors',
  template: `@if (message(); as text) {<span>{{ text }}</span>}`,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FieldErrors {
  readonly control = input.required<AbstractControl>();
  readonly messages = input<ErrorMessages>({});

  private readonly errors = toSignal(
    toObservable(this.control).pipe(
      switchMap((control) => control.events.pipe(startWith(null), map(() => control.errors))),
    ),
    { initialValue: null },
  );
  protected readonly message = computed(() => messageFor(this.errors(), this.messages()));
}
