import { z } from 'zod';
import { dbId } from './primitives.schema';
import { roleSchema } from './auth.schema';

export const PASSWORD_MIN_LENGTH = 10;

export const membershipInputSchema = z.object({
  farmId: dbId,
  role: roleSchema,
});

const membershipsInput = z
  .array(membershipInputSchema)
  .max(100)
  .refine(
    (list) => new Set(list.map((m) => m.farmId)).size === list.length,
    'A user holds one role per farm',
  );

export const userCreateSchema = z.object({
  email: z.email('Enter a valid e-mail address').max(254),
  name: z.string().trim().min(1, 'Enter a name').max(120),
  /** left out: the user is mailed an invitation link to choose their own */
  password: z
    .string()
    .min(PASSWORD_MIN_LENGTH, `Passwords have at least ${PASSWORD_MIN_LENGTH} characters`)
    .max(200)
    .optional(),
  memberships: membershipsInput.min(1, 'Give the user a role on at least one farm'),
});
export type UserCreate = z.infer<typeof userCreateSchema>;

export const userUpdateSchema = z
  .object({
    name: z.string().trim().min(1, 'Enter a name').max(120),
    disabled: z.boolean(),
    memberships: membershipsInput,
  })
  .partial()
  .refine((value) => Object.keys(value).length > 0, 'Send at least one field to change');
export type UserUpdate = z.infer<typeof userUpdateSchema>;

export const userSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  disabled: z.boolean(),
  memberships: z.array(z.object({ farmId: z.number().int(), role: roleSchema })),
  createdAt: z.iso.datetime(),
});
export type User = z.infer<typeof userSchema>;
