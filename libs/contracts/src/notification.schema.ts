import { z } from 'zod';
import { PASSWORD_MIN_LENGTH } from './user.schema';

export const notificationSettingsSchema = z.object({
  newExceptions: z.boolean(),
  workOrderAssigned: z.boolean(),
  workOrderDone: z.boolean(),
});
export type NotificationSettings = z.infer<typeof notificationSettingsSchema>;

export const notificationSettingsUpdateSchema = notificationSettingsSchema
  .partial()
  .refine((value) => Object.keys(value).length > 0, 'Send at least one setting to change');

export const forgotPasswordSchema = z.object({
  email: z.email('Enter a valid e-mail address').max(254),
});
export type ForgotPassword = z.infer<typeof forgotPasswordSchema>;

export const setPasswordSchema = z.object({
  token: z.string().min(20, 'This link is not complete').max(200),
  password: z
    .string()
    .min(PASSWORD_MIN_LENGTH, `Passwords have at least ${PASSWORD_MIN_LENGTH} characters`)
    .max(200),
});
export type SetPassword = z.infer<typeof setPasswordSchema>;
