import { isApiError } from '../../../lib/apiClient';
import type { useFormErrors } from '../../../lib/forms';
import { serverFieldErrors } from './runForm';

/**
 * Shows the server's refusal of a run request: field problems beside their fields, and above the
 * button either the message itself or, when it already stands beside a field, a pointer to it.
 */
export function showRunRequestError(errors: ReturnType<typeof useFormErrors>, error: unknown): void {
  if (!isApiError(error)) return errors.fromServer(error);
  const byField = serverFieldErrors(error);
  errors.setFieldErrors(byField);
  const shown = Object.values(byField).includes(error.message);
  errors.setFormError(shown ? 'The server refused these settings; see the message beside the field.' : error.message);
}
