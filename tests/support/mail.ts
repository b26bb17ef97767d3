/**
 * Mail in tests: each test file starts its own fake SMTP server (in process, 127.0.0.1, a free
 * port) and builds the app with a mail service pointed at it, so it can read what was sent.
 */
import type { Database } from '../../server/db';
import { createMailService, type MailService } from '../../server/mail';
import { startFakeSmtp as startServerFake, type CaughtMail, type FakeSmtp } from '../../server/mail/fakeSmtp';
import { testEnv } from './app';

export type { CaughtMail, FakeSmtp };

export function startFakeSmtp(): Promise<FakeSmtp> {
  return startServerFake({ port: 0 });
}

export function testMailService(fake: FakeSmtp, options: { backoffMs?: number; env?: ReturnType<typeof testEnv> } = {}): MailService {
  return createMailService({ env: options.env ?? testEnv(), fake, log: () => undefined, backoffMs: options.backoffMs ?? 5 });
}

/** The first link in a mail that goes to this client path (e.g. '/invite/'). */
export function linkTo(mail: CaughtMail, pathPrefix: string): string {
  const link = mail.links.find((l) => new URL(l).pathname.startsWith(pathPrefix));
  if (!link) throw new Error(`No ${pathPrefix} link in the mail "${mail.subject}": ${mail.links.join(', ')}`);
  return link;
}

/** The token at the end of a mailed link. */
export function tokenOf(mail: CaughtMail, pathPrefix: string): string {
  return new URL(linkTo(mail, pathPrefix)).pathname.slice(pathPrefix.length);
}

export type { Database };
