/**
 * The local SMTP catcher that stands in for the mail service in development and tests: a real SMTP server
 * on loopback (smtp-server) that parses what it receives (mailparser) and keeps the newest messages in
 * memory, with a small JSON endpoint on loopback for the API's Mailbox page and for tests.
 */
import { createServer as createHttpServer, type Server as HttpServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import type { CaughtMail } from '@tierscope/contracts';
import { simpleParser, type AddressObject } from 'mailparser';
import { SMTPServer } from 'smtp-server';

export interface MailCatcher {
  /** the SMTP port it listens on (127.0.0.1) */
  readonly smtpPort: number;
  /** base URL of its JSON endpoint: GET /messages */
  readonly httpUrl: string;
  /** newest first */
  messages(): CaughtMail[];
  /** resolves with the first message (newest first) that `isWanted` accepts, or rejects after `timeoutMs` */
  waitFor(isWanted: (mail: CaughtMail) => boolean, timeoutMs?: number): Promise<CaughtMail>;
  clear(): void;
  close(): Promise<void>;
}

export interface MailCatcherOptions {
  /** 0 picks a free port */
  smtpPort?: number;
  /** 0 picks a free port */
  httpPort?: number;
  /** how many messages to keep; older ones are dropped */
  keep?: number;
  /** the largest message accepted, in bytes */
  maxBytes?: number;
}

const HOST = '127.0.0.1';

export async function startMailCatcher(options: MailCatcherOptions = {}): Promise<MailCatcher> {
  const keep = options.keep ?? 500;
  const caught: CaughtMail[] = [];
  const waiters = new Set<() => void>();
  let nextId = 1;

  const smtp = new SMTPServer({
    // Loopback only, no TLS and no sign-in: it only ever talks to this machine's own API.
    disabledCommands: ['STARTTLS', 'AUTH'],
    authOptional: true,
    banner: 'Tierscope mail catcher',
    size: options.maxBytes ?? 10 * 1024 * 1024,
    logger: false,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((parsed) => {
          const recipients = session.envelope.rcptTo.map((r) => r.address);
          caught.unshift({
            id: nextId++,
            from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
            to: recipients.length > 0 ? recipients : addresses(parsed.to),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : null,
            // When it arrived here, not the sender's Date header, so the list is in arrival order.
            receivedAt: new Date().toISOString(),
          });
          caught.length = Math.min(caught.length, keep);
          for (const wake of waiters) wake();
          callback();
        })
        .catch((error: unknown) => {
          // A message we cannot parse is refused, so the sender sees the failure instead of a silent loss.
          callback(error instanceof Error ? error : new Error('unparseable message'));
        });
    },
  });
  await new Promise<void>((resolve, reject) => {
    smtp.once('error', reject);
    smtp.listen(options.smtpPort ?? 0, HOST, () => {
      resolve();
    });
  });
  const smtpPort = (smtp.server.address() as AddressInfo).port;

  const http: HttpServer = createHttpServer((req, res) => {
    if (req.method === 'GET' && req.url === '/messages') {
      res.writeHead(200, { 'content-type': 'application/json' });
      res.end(JSON.stringify(caught));
      return;
    }
    if (req.method === 'DELETE' && req.url === '/messages') {
      caught.length = 0;
      res.writeHead(204).end();
      return;
    }
    res.writeHead(404, { 'content-type': 'application/json' });
    res.end(JSON.stringify({ error: 'GET /messages lists what was caught' }));
  });
  await new Promise<void>((resolve, reject) => {
    http.once('error', reject);
    http.listen(options.httpPort ?? 0, HOST, () => {
      resolve();
    });
  });
  const httpPort = (http.address() as AddressInfo).port;

  return {
    smtpPort,
    httpUrl: `http://${HOST}:${httpPort}`,
    messages: () => [...caught],
    clear() {
      caught.length = 0;
    },
    waitFor(isWanted, timeoutMs = 10_000) {
      return new Promise((resolve, reject) => {
        const check = () => {
          const found = caught.find(isWanted);
          if (!found) return;
          cleanup();
          resolve(found);
        };
        const timer = setTimeout(() => {
          cleanup();
          reject(new Error(`no matching mail within ${timeoutMs} ms (caught ${caught.length})`));
        }, timeoutMs);
        const cleanup = () => {
          clearTimeout(timer);
          waiters.delete(check);
        };
        waiters.add(check);
        check();
      });
    },
    async close() {
      await new Promise<void>((resolve) => {
        smtp.close(() => {
          resolve();
        });
      });
      await new Promise<void>((resolve) => {
        http.close(() => {
          resolve();
        });
      });
    },
  };
}

function addresses(field: AddressObject | AddressObject[] | undefined): string[] {
  if (!field) return [];
  const list = Array.isArray(field) ? field : [field];
  return list.flatMap((a) => a.value.map((v) => v.address ?? '')).filter((a) => a !== '');
}
