/**
 * Short-hands for API tests of the job set-up routes: a signed-in agent's reads and writes with
 * the CSRF header set, and the URL of a job's resource.
 */
import type { Response } from 'supertest';
import type { TrimoutApp } from '../../server/app';
import { signIn, type SignedIn } from './app';
import { addMember, buildJob, buildJobWithCrew } from './factories';

export interface Caller {
  get(path: string): Promise<Response>;
  post(path: string, body?: unknown, headers?: Record<string, string>): Promise<Response>;
  patch(path: string, body: unknown, headers?: Record<string, string>): Promise<Response>;
  del(path: string, headers?: Record<string, string>): Promise<Response>;
}

export function caller({ agent, csrf }: SignedIn): Caller {
  return {
    get: (path) => agent.get(path).then((r) => r),
    post: (path, body = {}, headers = {}) => agent.post(path).set('X-CSRF-Token', csrf).set(headers).send(body as object).then((r) => r),
    patch: (path, body, headers = {}) => agent.patch(path).set('X-CSRF-Token', csrf).set(headers).send(body as object).then((r) => r),
    del: (path, headers = {}) => agent.delete(path).set('X-CSRF-Token', csrf).set(headers).then((r) => r),
  };
}

/** "/api/jobs/<id>/levels" */
export function jobPath(jobId: string, rest = ''): string {
  return `/api/jobs/${jobId}${rest}`;
}

/** If-Match for a version. */
export function ifMatch(version: number): Record<string, string> {
  return { 'If-Match': `"v${version}"` };
}


export type Crew = Awaited<ReturnType<typeof buildJobWithCrew>>;
export interface SignedCrew extends Crew {
  gc: Caller;
  insp: Caller;
  sub: Caller;
  /** The GC manager's agent and CSRF token, for bodies that are not JSON. */
  gcSignedIn: SignedIn;
}

/** A job with one member of each role, the GC manager, inspector and subcontractor A signed in (once per file: scrypt is slow). */
export async function signInCrew(app: TrimoutApp['app']): Promise<SignedCrew> {
  const crew = await buildJobWithCrew();
  const gcSignedIn = await signIn(app, crew.gcManager.email);
  const gc = caller(gcSignedIn);
  const insp = caller(await signIn(app, crew.inspector.email));
  const sub = caller(await signIn(app, crew.subA.email));
  return { ...crew, gc, insp, sub, gcSignedIn };
}

/** Another job of the same GC company with the same crew as members: fresh data, no new sign-in. */
export async function newJobFor(crew: Crew) {
  const job = await buildJob({ ownerCompanyId: crew.gcCompany.id });
  await addMember(job.id, crew.gcManager.id, 'gc_manager');
  await addMember(job.id, crew.inspector.id, 'inspector');
  await addMember(job.id, crew.subA.id, 'subcontractor');
  await addMember(job.id, crew.subB.id, 'subcontractor');
  return job;
}
