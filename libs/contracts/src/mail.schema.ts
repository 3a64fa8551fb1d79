import { z } from 'zod';

/** One message the local mail catcher received over SMTP, as the Mailbox page shows it. */
export const caughtMailSchema = z.object({
  id: z.number().int(),
  from: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
  html: z.string().nullable(),
  receivedAt: z.iso.datetime(),
});
export type CaughtMail = z.infer<typeof caughtMailSchema>;
