import { AbstractControl, FormGroup } from '@angular/forms';
import { ApiError } from './api-error';

/**
 * Puts a server validation error beside its field (`details.field`) as the `server` error of that
 * control. Returns false when the error names no field of this form, so that the caller shows it
 * at form level instead.
 */
export function showServerError(form: FormGroup, error: ApiError): boolean {
  if (!error.field) return false;
  const control: AbstractControl | null = form.get(error.field);
  if (!control) return false;
  control.setErrors({ ...(control.errors ?? {}), server: error.message });
  control.markAsTouched();
  return true;
}
