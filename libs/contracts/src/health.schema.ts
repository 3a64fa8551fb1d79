import { z } from 'zod';

export const healthSchema = z.object({
  status: z.enum(['ok', 'degraded', 'stopping']),
  database: z.enum(['up', 'down']),
  version: z.string(),
});
export type Health = z.infer<typeof healthSchema>;
