import { AbstractControl, ValidationErrors } from '@angular/forms';
import { ErrorMessages } from '../shared/field-errors/field-errors';

/** A user holds at least one role. */
export function atLeastOneRole(control: AbstractControl<readonly unknown[]>): ValidationErrors | null {
  return control.value.length > 0 ? null : { noRole: true };
}

export const ROLES_MESSAGES: ErrorMessages = { noRole: 'Choose at least one role.' };
