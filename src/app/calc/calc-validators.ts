import { AbstractControl, ValidationErrors, ValidatorFn } from '@angular/forms';
import { parseResistance } from '@domain/notation';
import { parsePlainNumber } from './calc-format';

/**
 * A resistance typed as a technician writes it (`4k7`, `19.99k`, `0.2`); the error carries the
 * notation module's own message under `notation`. Empty text passes (pair with `required` where needed).
 */
export function ohmsTextValidator(options: { allowZero?: boolean } = {}): ValidatorFn {
  return (control: AbstractControl<string>): ValidationErrors | null => {
    const text = control.value ?? '';
    if (text.trim() === '') return null;
    const parsed = parseResistance(text);
    if (!parsed.ok) return { notation: parsed.message };
    if (parsed.state !== 'value' || parsed.ohms === null) return { notation: `'${text}': a number of ohms is needed here, not a reading state` };
    if (parsed.ohms === 0 && !options.allowZero) return { notation: `'${text}': must be above 0 Ω` };
    return null;
  };
}

/** A plain number (a percentage, a count) within [min, max]; `number` error names the bounds. */
export function numberTextValidator(min: number, max: number, what: string): ValidatorFn {
  return (control: AbstractControl<string>): ValidationErrors | null => {
    const text = control.value ?? '';
    if (text.trim() === '') return null;
    const x = parsePlainNumber(text);
    if (x === null || x < min || x > max) return { number: `${what}: a number from ${min} to ${max}` };
    return null;
  };
}

/** Messages for the errors above, for `dm-field-errors`. */
export const CALC_MESSAGES = {
  notation: (e: unknown) => String(e),
  number: (e: unknown) => String(e),
  domain: (e: unknown) => String(e),
  required: 'Required.',
} as const;
