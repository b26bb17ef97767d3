/**
 * Validates body, query and path parameters with the shared zod schemas before a handler runs.
 * Parsed values land on req.valid; the first issue is reported as `field: message`.
 */
import type { RequestHandler } from 'express';
import type { z } from 'zod';
import { badRequest, type FieldErrors } from '../errors';

type Schemas = { body?: z.ZodType; query?: z.ZodType; params?: z.ZodType };

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      valid: { body?: unknown; query?: unknown; params?: unknown };
    }
  }
}

export function zodFieldErrors(error: z.ZodError, prefix?: string): FieldErrors {
  const fields: FieldErrors = {};
  for (const issue of error.issues) {
    const key = [prefix, ...issue.path.map(String)].filter(Boolean).join('.') || (prefix ?? 'body');
    if (!(key in fields)) fields[key] = issue.message;
  }
  return fields;
}

/** The middleware carries its schemas, so tests that walk the router can see what a route accepts. */
export function validate(schemas: Schemas): RequestHandler & { schemas: Schemas } {
  const handler: RequestHandler = (req, _res, next) => {
    req.valid ??= {};
    const fields: FieldErrors = {};
    for (const part of ['params', 'query', 'body'] as const) {
      const schema = schemas[part];
      if (!schema) continue;
      const input = part === 'body' ? (req.body ?? {}) : req[part];
      const result = schema.safeParse(input);
      if (result.success) req.valid[part] = result.data;
      else Object.assign(fields, zodFieldErrors(result.error, part === 'body' ? undefined : part));
    }
    const first = Object.entries(fields)[0];
    if (first) return next(badRequest(`${first[0]}: ${first[1]}`, fields));
    next();
  };
  return Object.assign(handler, { schemas });
}

/** Typed access to what validate() parsed. */
export function valid<T>(value: unknown): T {
  return value as T;
}
