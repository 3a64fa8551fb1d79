import { z } from 'zod';
import { roleSchema } from './auth.schema';

export const farmSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  role: roleSchema,
  houseCount: z.number().int(),
  createdAt: z.iso.datetime(),
});
export type Farm = z.infer<typeof farmSchema>;

export const farmCreateSchema = z.object({
  name: z.string().trim().min(1, 'Give the farm a name').max(120),
});
export type FarmCreate = z.infer<typeof farmCreateSchema>;

export const farmUpdateSchema = farmCreateSchema;
export type FarmUpdate = z.infer<typeof farmUpdateSchema>;
