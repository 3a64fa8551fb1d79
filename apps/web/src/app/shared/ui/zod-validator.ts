import type { AbstractControl, ValidationErrors, ValidatorFn } from '@angular/forms';
import type { z } from 'zod';

/**
 * A form validator from a contract schema, so a field is checked by the very rule the API applies
 * and shows the same message. The error key is `schema`, its value the message.
 */
export function zodValidator(schema: z.ZodType): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const result = schema.safeParse(control.value);
    return result.success ? null : { schema: result.error.issues[0]?.message ?? 'Not valid' };
  };
}

/** The message of the first error on a control, for `<mat-error>`. */
export function firstError(control: AbstractControl): string | null {
  const errors = control.errors;
  if (!errors) return null;
  const schemaMessage: unknown = errors['schema'];
  if (typeof schemaMessage === 'string') return schemaMessage;
  const serverMessage: unknown = errors['server'];
  if (typeof serverMessage === 'string') return serverMessage;
  if (errors['required']) return 'Required';
  return 'Not valid';
}
