import { ROLES } from '@tierscope/domain';
import { z } from 'zod';

export const roleSchema = z.enum(ROLES);

export const loginRequestSchema = z.object({
  email: z.email('Enter a valid e-mail address').max(254),
  password: z.string().min(1, 'Enter your password').max(200),
});
export type LoginRequest = z.infer<typeof loginRequestSchema>;

export const membershipSchema = z.object({
  farmId: z.number().int(),
  farmName: z.string(),
  role: roleSchema,
});
export type Membership = z.infer<typeof membershipSchema>;

export const userSummarySchema = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
});
export type UserSummary = z.infer<typeof userSummarySchema>;

export const sessionSchema = z.object({
  user: userSummarySchema,
  memberships: z.array(membershipSchema),
});
export type Session = z.infer<typeof sessionSchema>;

export const loginResponseSchema = sessionSchema.extend({
  token: z.string(),
  expiresAt: z.iso.datetime(),
});
export type LoginResponse = z.infer<typeof loginResponseSchema>;
