/**
 * GET /api/dev/mail: the mails the local fake SMTP server caught, newest first, for the
 * /mailbox screen. Served only outside production and only while the fake is in use; 404 otherwise.
 */
import { Router } from 'express';
import type { CaughtMailDto } from '../../shared/schemas/auth';
import { notFound } from '../errors';
import type { MailService } from '../mail';
import { policy } from '../policies';

export function devMailRouter(mail: MailService): Router {
  const router = Router();
  router.get('/dev/mail', policy.public(), (_req, res, next) => {
    const fake = mail.fake;
    if (!fake) return next(notFound('No API route for GET /api/dev/mail.'));
    const items: CaughtMailDto[] = fake
      .messages()
      .reverse()
      .map((m) => ({ id: m.id, receivedAt: m.receivedAt, from: m.from, to: m.to, subject: m.subject, text: m.text, links: m.links }));
    res.json({ items });
  });
  return router;
}
