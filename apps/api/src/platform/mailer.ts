import nodemailer from 'nodemailer';

export interface OutgoingMail {
  to: string[];
  subject: string;
  text: string;
  html: string;
}

/** Sends mail over SMTP (nodemailer); without an SMTP URL it only logs, so a bare API still runs. */
export interface Mailer {
  readonly isEnabled: boolean;
  send(mail: OutgoingMail): Promise<void>;
  close(): void;
}

export function createMailer(options: {
  smtpUrl: string | undefined;
  from: string;
  info: (message: string) => void;
}): Mailer {
  const { smtpUrl, from, info } = options;
  if (!smtpUrl) {
    return {
      isEnabled: false,
      send(mail) {
        info(`mail not sent (no SMTP_URL): "${mail.subject}" to ${mail.to.join(', ')}`);
        return Promise.resolve();
      },
      close: () => undefined,
    };
  }
  const transport = nodemailer.createTransport(smtpUrl);
  return {
    isEnabled: true,
    async send(mail) {
      if (mail.to.length === 0) return;
      await transport.sendMail({ from, ...mail });
      info(`mail sent: "${mail.subject}" to ${mail.to.join(', ')}`);
    },
    close() {
      transport.close();
    },
  };
}
