/**
 * Lists every route of the /api router (walking nested routers), with its method, path and
 * handlers, so tests can check that no route is missing a policy or a matrix entry.
 */
import type { Router } from 'express';

export interface ApiRoute {
  method: string;
  path: string;
  handlers: Array<((...args: unknown[]) => unknown) & { policy?: string }>;
}

interface Layer {
  route?: { path: string; methods: Record<string, boolean>; stack: Array<{ handle: ApiRoute['handlers'][number]; method?: string }> };
  handle: { stack?: Layer[] };
}

export function listRoutes(router: Router): ApiRoute[] {
  const routes: ApiRoute[] = [];
  const walk = (stack: Layer[]) => {
    for (const layer of stack) {
      if (layer.route) {
        for (const method of Object.keys(layer.route.methods)) {
          const handlers = layer.route.stack.filter((l) => !l.method || l.method === method).map((l) => l.handle);
          routes.push({ method: method.toUpperCase(), path: `/api${layer.route.path}`, handlers });
        }
      } else if (layer.handle?.stack) {
        walk(layer.handle.stack);
      }
    }
  };
  walk((router as unknown as { stack: Layer[] }).stack);
  return routes;
}

/**
 * "METHOD /api/path" for every route, read from a router built without a database (the router
 * is all that is needed to list routes). `jest.requireActual` so a test file's mocks do not apply.
 */
export function routeKeysFromRouter(): string[] {
  const { createApp } = jest.requireActual('../../server/app') as typeof import('../../server/app');
  const { testEnv } = jest.requireActual('./app') as typeof import('./app');
  const probe = createApp({
    env: testEnv(),
    db: { sequelize: null } as unknown as import('../../server/db').Database,
    log: () => undefined,
  });
  void probe.close();
  return listRoutes(probe.api).map((x) => `${x.method} ${x.path}`);
}
