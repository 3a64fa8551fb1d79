import nodemailer from 'nodemailer';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startMailCatcher, type MailCatcher } from './mail-catcher';

let catcher: MailCatcher;
beforeAll(async () => {
  catcher = await startMailCatcher();
});
afterAll(async () => {
  await catcher.close();
});

describe('the local mail catcher', () => {
  it('takes a real SMTP conversation and keeps envelope recipients, subject, text and HTML', async () => {
    const transport = nodemailer.createTransport(`smtp://127.0.0.1:${catcher.smtpPort}`);
    await transport.sendMail({
      from: 'Tierscope <tierscope@localhost>',
      to: ['one@example.test', 'two@example.test'],
      subject: 'Grüße aus dem Stall',
      text: 'plain words',
      html: '<p>rich words</p>',
    });
    transport.close();
    const [mail] = catcher.messages();
    expect(mail).toMatchObject({
      from: 'tierscope@localhost',
      to: ['one@example.test', 'two@example.test'],
      subject: 'Grüße aus dem Stall',
      html: '<p>rich words</p>',
    });
    expect(mail?.text.trim()).toBe('plain words');
  });

  it('serves the same list as JSON on loopback, newest first', async () => {
    const transport = nodemailer.createTransport(`smtp://127.0.0.1:${catcher.smtpPort}`);
    await transport.sendMail({ from: 'a@x.test', to: 'b@x.test', subject: 'second', text: '2' });
    transport.close();
    const response = await fetch(`${catcher.httpUrl}/messages`);
    const list = (await response.json()) as { subject: string }[];
    expect(list.map((m) => m.subject).slice(0, 2)).toEqual(['second', 'Grüße aus dem Stall']);
    expect((await fetch(`${catcher.httpUrl}/nothing`)).status).toBe(404);
  });
});
