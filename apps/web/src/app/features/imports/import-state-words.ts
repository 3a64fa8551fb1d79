import type { ImportState } from '@tierscope/domain';

/** An import's state as the page says it. */
export const IMPORT_STATE_WORDS: Record<ImportState, string> = {
  queued: 'Waiting to start',
  running: 'Importing',
  done: 'Imported',
  failed: 'Failed',
  cancelled: 'Cancelled',
};
