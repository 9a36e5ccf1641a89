import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { ApiError } from './api-client';

/**
 * Puts the server's field errors on the form's fields. `fieldMap` maps a server field name
 * (e.g. `startAt`) to the form field that entered it. Returns the messages that have no field.
 */
export function applyServerErrors<T extends FieldValues>(
  error: unknown,
  setError: UseFormSetError<T>,
  fields: readonly string[],
  fieldMap: Record<string, string> = {},
): string[] {
  if (!(error instanceof ApiError)) return [error instanceof Error ? error.message : String(error)];
  const leftover: string[] = [];
  const fieldErrors = error.body.fieldErrors ?? {};
  for (const [serverField, messages] of Object.entries(fieldErrors)) {
    const formField = fieldMap[serverField] ?? serverField;
    if (fields.includes(formField)) {
      setError(formField as Path<T>, { type: 'server', message: messages.join('; ') });
    } else {
      leftover.push(`${serverField}: ${messages.join('; ')}`);
    }
  }
  if (Object.keys(fieldErrors).length === 0) leftover.push(error.body.message);
  return leftover;
}
