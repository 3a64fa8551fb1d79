import { z } from 'zod';
import { roleSchema } from './auth.schema';

/** ISO 4217 currency codes this runtime knows (the same list formats them in the browser). */
const KNOWN_CURRENCIES = new Set(Intl.supportedValuesOf('currency'));

/** The money a farm counts in: an ISO 4217 code such as USD or EUR. */
export const currencyCode = z
  .string('Choose a currency')
  .trim()
  .toUpperCase()
  .refine((code) => KNOWN_CURRENCIES.has(code), 'Choose a currency code such as USD, EUR or GBP');

export const farmSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  currency: z.string(),
  role: roleSchema,
  houseCount: z.number().int(),
  createdAt: z.iso.datetime(),
});
export type Farm = z.infer<typeof farmSchema>;

export const farmName = z.string().trim().min(1, 'Give the farm a name').max(120);

export const farmCreateSchema = z.object({
  name: farmName,
  currency: currencyCode.default('USD'),
});
export type FarmCreate = z.input<typeof farmCreateSchema>;

export const farmUpdateSchema = z
  .object({ name: farmName, currency: currencyCode })
  .partial()
  .refine((value) => Object.keys(value).length > 0, 'Send at least one field to change');
export type FarmUpdate = z.infer<typeof farmUpdateSchema>;
