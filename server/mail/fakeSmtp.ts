/**
 * A local fake SMTP server for development and tests: `smtp-server` on loopback, in this
 * process. It accepts every message (no authentication, no TLS: it only ever listens on
 * 127.0.0.1), keeps the last 200 in memory, parsed with `mailparser`, and delivers nothing.
 * `npm start` reads them at /mailbox; tests read them through `messages()` and `waitFor()`.
 */
import type { AddressInfo } from 'node:net';
import { simpleParser, type AddressObject } from 'mailparser';
import { SMTPServer } from 'smtp-server';

export const CAUGHT_MAIL_LIMIT = 200;

export interface CaughtMail {
  /** Sequence number in this server's life, newest highest. */
  id: number;
  receivedAt: string;
  /** SMTP envelope. */
  envelopeFrom: string;
  envelopeTo: string[];
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
  /** http(s) links found in the text part. */
  links: string[];
  /** The whole message as received (headers and body), for header-injection checks. */
  raw: string;
}

export interface FakeSmtp {
  host: string;
  port: number;
  /** smtp://127.0.0.1:<port> for nodemailer. */
  url: string;
  /** Caught mails, oldest first. */
  messages(): CaughtMail[];
  /** Resolves with the first caught mail (already here or still to come) that matches. */
  waitFor(predicate: (mail: CaughtMail) => boolean, timeoutMs?: number): Promise<CaughtMail>;
  clear(): void;
  close(): Promise<void>;
}

function addresses(value: AddressObject | AddressObject[] | undefined): string[] {
  if (!value) return [];
  const list = Array.isArray(value) ? value : [value];
  return list.flatMap((a) => a.value.map((v) => v.address ?? '')).filter(Boolean);
}

export function linksIn(text: string): string[] {
  return Array.from(new Set(text.match(/https?:\/\/[^\s<>"')]+/g) ?? []));
}

export async function startFakeSmtp(options: { port?: number; host?: string } = {}): Promise<FakeSmtp> {
  const host = options.host ?? '127.0.0.1';
  const caught: CaughtMail[] = [];
  const waiters = new Set<{ predicate: (m: CaughtMail) => boolean; resolve: (m: CaughtMail) => void }>();
  let sequence = 0;

  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    banner: 'Trimout local fake SMTP server: mail is caught, never delivered',
    logger: false,
    size: 10 * 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('error', callback);
      stream.on('end', () => {
        const raw = Buffer.concat(chunks);
        simpleParser(raw)
          .then((parsed) => {
            const text = parsed.text ?? '';
            const mail: CaughtMail = {
              id: ++sequence,
              receivedAt: new Date().toISOString(),
              envelopeFrom: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
              envelopeTo: session.envelope.rcptTo.map((r) => r.address),
              from: addresses(parsed.from)[0] ?? '',
              to: addresses(parsed.to),
              subject: parsed.subject ?? '',
              text,
              html: typeof parsed.html === 'string' ? parsed.html : '',
              links: linksIn(text),
              raw: raw.toString('utf8'),
            };
            caught.push(mail);
            if (caught.length > CAUGHT_MAIL_LIMIT) caught.splice(0, caught.length - CAUGHT_MAIL_LIMIT);
            for (const waiter of waiters) {
              if (waiter.predicate(mail)) {
                waiters.delete(waiter);
                waiter.resolve(mail);
              }
            }
            callback();
          })
          .catch((err: Error) => callback(err));
      });
    },
  });

  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(options.port ?? 0, host, () => {
      server.off('error', reject);
      resolve();
    });
  });
  server.on('error', () => undefined); // a broken client connection must not end the process
  const port = (server.server.address() as AddressInfo).port;

  return {
    host,
    port,
    url: `smtp://${host}:${port}`,
    messages: () => caught.slice(),
    waitFor(predicate, timeoutMs = 10_000) {
      const already = caught.find(predicate);
      if (already) return Promise.resolve(already);
      return new Promise<CaughtMail>((resolve, reject) => {
        const waiter = {
          predicate,
          resolve: (m: CaughtMail) => {
            clearTimeout(timer);
            resolve(m);
          },
        };
        const timer = setTimeout(() => {
          waiters.delete(waiter);
          reject(new Error(`No matching mail arrived within ${timeoutMs} ms (${caught.length} caught).`));
        }, timeoutMs);
        waiters.add(waiter);
      });
    },
    clear: () => {
      caught.length = 0;
    },
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
