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
