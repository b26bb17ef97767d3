/**
 * Signs a user in from a mailed link (invitation accepted, e-mail confirmed, password reset):
 * the same steps as POST /api/session. passport's req.login regenerates the session, so the id
 * the browser held before dies and nothing of it is kept.
 */
import type { Request } from 'express';
import type { SessionResponse } from '../../shared/schemas/session';
import { unauthorized } from '../errors';
import { carriesSecret, newCsrfToken } from '../middleware/csrf';
import { presentUser } from '../presenters/session';
import { jobsOf } from '../services/memberships';
import { loadAuthUser } from './passport';

export async function signInAs(req: Request, userId: string): Promise<SessionResponse> {
  const user = await loadAuthUser(userId);
  if (!user) throw unauthorized('This account cannot sign in.');
  await new Promise<void>((resolve, reject) => req.login(user, (err) => (err ? reject(err) : resolve())));
  req.session.signedInAt = Date.now();
  req.session.csrfToken = newCsrfToken();
  carriesSecret(req);
  return { user: presentUser(user), jobs: await jobsOf(user.id), csrfToken: req.session.csrfToken };
}
