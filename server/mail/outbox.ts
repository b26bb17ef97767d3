/**
 * The seam every mail goes through. `sendMail(msg)` never throws: it tries the SMTP transport,
 * retries 3 times with growing waits (in this process), and logs a failure that remains.
 * Callers send only after their transaction committed (`sendAfterCommit`), so a mail can never
 * make an API write fail or roll it back. The retries live in this process: a graceful stop waits
 * for them (server/index.ts), a killed process loses them; a queue kept in PostgreSQL could take
 * their place behind this same function without changing a caller.
 */
import type { Transaction } from 'sequelize';
import type { Transporter } from 'nodemailer';
import { headerSafe } from './safe';

export interface MailMessage {
  to: { name?: string; address: string };
  subject: string;
  text: string;
  html: string;
  /** Extra headers of ours (List-Unsubscribe, List-Unsubscribe-Post); values are cleaned like the subject. */
  headers?: Record<string, string>;
}

export interface Outbox {
  /** Resolves true when the message was handed to the SMTP server, false after the last retry failed. */
  sendMail(message: MailMessage): Promise<boolean>;
  /** Sends once the transaction has committed; nothing is sent when it rolls back. */
  sendAfterCommit(transaction: Transaction, message: MailMessage): void;
  /** Resolves when every send started so far has finished (tests, shutdown). */
  idle(): Promise<void>;
}

export interface OutboxOptions {
  transport: Pick<Transporter, 'sendMail'>;
  from: string;
  log: (message: string, err?: unknown) => void;
  /** Retries after the first attempt. */
  retries?: number;
  /** First wait; each retry waits four times longer (250 ms, 1 s, 4 s by default). */
  backoffMs?: number;
}

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

export function createOutbox(options: OutboxOptions): Outbox {
  const retries = options.retries ?? 3;
  const backoffMs = options.backoffMs ?? 250;
  const inFlight = new Set<Promise<boolean>>();

  async function attempt(message: MailMessage): Promise<boolean> {
    const envelope = {
      from: headerSafe(options.from),
      to: { name: headerSafe(message.to.name ?? ''), address: headerSafe(message.to.address) },
      subject: headerSafe(message.subject),
      text: message.text,
      html: message.html,
      ...(message.headers
        ? { headers: Object.fromEntries(Object.entries(message.headers).map(([k, v]) => [headerSafe(k, 80), headerSafe(v, 900)])) }
        : {}),
      // Header values are ours and already cleaned; no user value becomes a header of its own.
      disableFileAccess: true,
      disableUrlAccess: true,
    };
    for (let i = 0; i <= retries; i++) {
      try {
        await options.transport.sendMail(envelope);
        return true;
      } catch (err) {
        if (i === retries) {
          options.log(`mail to ${envelope.to.address} ("${envelope.subject}") not sent after ${retries + 1} attempts`, err);
          return false;
        }
        await sleep(backoffMs * 4 ** i);
      }
    }
    return false;
  }

  const outbox: Outbox = {
    sendMail(message) {
      const p = attempt(message).catch((err: unknown) => {
        options.log('mail send failed', err);
        return false;
      });
      inFlight.add(p);
      void p.finally(() => inFlight.delete(p));
      return p;
    },
    sendAfterCommit(transaction, message) {
      transaction.afterCommit(() => {
        void outbox.sendMail(message);
      });
    },
    async idle() {
      while (inFlight.size) await Promise.all(Array.from(inFlight));
    },
  };
  return outbox;
}
