import { ValidatorFn, Validators } from '@angular/forms';
import { ErrorMessages } from '../shared/field-errors/field-errors';

/** The API's rule: passwords of at least 10 characters. */
export const MIN_PASSWORD_LENGTH = 10;

export const newPasswordValidators: ValidatorFn[] = [Validators.required, Validators.minLength(MIN_PASSWORD_LENGTH)];

export const NEW_PASSWORD_MESSAGES: ErrorMessages = {
  required: 'Choose a password.',
  minlength: `Use at least ${MIN_PASSWORD_LENGTH} characters; a few unrelated words make a good one.`,
};

export const EMAIL_MESSAGES: ErrorMessages = {
  required: 'Enter your email address.',
  email: 'Enter an email address such as name@example.org.',
};

export const NAME_MESSAGES: ErrorMessages = {
  required: 'Enter your name as others should see it.',
};
