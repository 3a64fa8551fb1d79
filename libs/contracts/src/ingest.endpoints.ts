import { endpoint } from './endpoint';
import { ingestResultSchema, readingsBatchSchema } from './ingest.schema';

export const ingestEndpoints = {
  readings: endpoint({
    method: 'post',
    path: '/ingest/readings',
    summary:
      'Post up to 10,000 counter readings with a gateway key. Each reading carries eggs (since the previous reading) or total (running total). Re-sending never counts twice.',
    access: 'gateway',
    body: readingsBatchSchema,
    answer: ingestResultSchema,
    errors: {
      401: 'Missing, unknown or revoked gateway key',
      413: 'More than 10,000 readings, or a body over 4 MB',
      503: 'Database unreachable: retry',
    },
  }),
};
