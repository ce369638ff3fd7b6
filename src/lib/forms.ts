import { useState } from 'react';
import type { z } from 'zod';
import { isApiError } from './apiClient';

export type FieldErrors = Record<string, string>;

/** Validates form values with a shared schema; returns the parsed data or the first message per field. */
export function validate<S extends z.ZodType>(
  schema: S,
  values: unknown,
): { ok: true; data: z.infer<S> } | { ok: false; errors: FieldErrors } {
  const result = schema.safeParse(values);
  if (result.success) return { ok: true, data: result.data };
  const errors: FieldErrors = {};
  for (const issue of result.error.issues) {
    const path = issue.path.map(String).join('.') || 'form';
    if (!(path in errors)) errors[path] = issue.message;
  }
  return { ok: false, errors };
}

/**
 * Field errors for one form: those found before submitting and those the server sent back.
 * A server error without field issues is shown once, above the submit button.
 */
export function useFormErrors() {
  const [fieldErrors, setFieldErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);

  function clear() {
    setFieldErrors({});
    setFormError(null);
  }

  function fromServer(error: unknown) {
    if (isApiError(error) && error.issues.length > 0) {
      setFieldErrors(error.fieldErrors());
      setFormError(error.message);
    } else {
      setFieldErrors({});
      setFormError(error instanceof Error ? error.message : 'Something went wrong.');
    }
  }

  return { fieldErrors, formError, setFieldErrors, setFormError, clear, fromServer };
}

/** Parses a typed number; empty text is `undefined`, anything else that is not a number is NaN. */
export function parseNumber(text: string): number | undefined {
  const trimmed = text.trim();
  if (trimmed === '') return undefined;
  return Number(trimmed);
}
