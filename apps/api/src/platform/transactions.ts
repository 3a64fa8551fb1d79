/** PostgreSQL's "try again" answers: deadlock detected, serialization failure. */
const RETRYABLE = new Set(['40P01', '40001']);

/**
 * Runs an idempotent transaction again when PostgreSQL aborted it to break a deadlock or a serialization
 * conflict between concurrent batches. Anything else is thrown as it came.
 */
export async function withRetryOnConflict<T>(work: () => Promise<T>, attempts = 4): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await work();
    } catch (error) {
      const code =
        (error as { code?: unknown; cause?: { code?: unknown } } | null)?.code ??
        (error as { cause?: { code?: unknown } } | null)?.cause?.code;
      if (attempt >= attempts || typeof code !== 'string' || !RETRYABLE.has(code)) throw error;
      await new Promise((resolve) => setTimeout(resolve, 10 * attempt + Math.random() * 20));
    }
  }
}
