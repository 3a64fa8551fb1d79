import { HttpErrorResponse } from '@angular/common/http';
import { apiErrorSchema } from '@tierscope/contracts';

/** A sentence for the user from whatever an API call failed with. */
export function describeApiError(error: unknown): string {
  if (error instanceof HttpErrorResponse) {
    if (error.status === 0)
      return 'Tierscope cannot be reached. Check the connection and try again.';
    const parsed = apiErrorSchema.safeParse(error.error);
    if (parsed.success) return parsed.data.error.message;
    return `The server answered ${error.status}. Try again in a moment.`;
  }
  return 'Something went wrong. Try again in a moment.';
}

/** Field-level messages of a 400, keyed by field path. */
export function fieldErrorsOf(error: unknown): Record<string, string> {
  if (!(error instanceof HttpErrorResponse)) return {};
  const parsed = apiErrorSchema.safeParse(error.error);
  if (!parsed.success) return {};
  return Object.fromEntries((parsed.data.error.fields ?? []).map((f) => [f.path, f.message]));
}
