import type { Express } from 'express';

export interface MountedRoute {
  method: string;
  /** Normalised to the OpenAPI template style: `:id` → `{id}`. */
  path: string;
  /** The permission-matrix actions its `authorize(action)` middleware checks (the handler carries `.action`). */
  actions: string[];
}

function joinPaths(prefix: string, p: string): string {
  const joined = `${prefix}/${p}`.replace(/\/+/g, '/');
  return joined.length > 1 ? joined.replace(/\/$/, '') : joined;
}

const toTemplate = (p: string) => p.replace(/:(\w+)/g, '{$1}');

/**
 * Every method + path the Express app answers through a route, found by walking the router stack
 * of `buildApp()` (Express 5 / router 2: `app.router.stack`, layers carry `rawPath`, nested routers
 * their own `stack`). Middleware without a route (helmet, the validator, static files) is not a route.
 */
export function listExpressRoutes(app: Express): MountedRoute[] {
  const out: MountedRoute[] = [];
  const walk = (stack: any[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const paths: string[] = Array.isArray(layer.route.path) ? layer.route.path : [layer.route.path];
        for (const p of paths) {
          if (typeof p !== 'string') throw new Error(`route with a non-string path under ${prefix}: ${String(p)}`);
          const actions = (layer.route.stack as any[]).map((l) => l.handle?.action).filter((a): a is string => typeof a === 'string');
          for (const [method, on] of Object.entries<boolean>(layer.route.methods)) {
            if (on && method !== '_all') out.push({ method, path: toTemplate(joinPaths(prefix, p)), actions });
          }
        }
      } else if (Array.isArray(layer.handle?.stack)) {
        const raw = layer.rawPath;
        if (raw !== undefined && typeof raw !== 'string') throw new Error(`router mounted on a non-string path under ${prefix}`);
        walk(layer.handle.stack, raw && raw !== '/' ? joinPaths(prefix, raw) : prefix);
      }
    }
  };
  const root = (app as any).router ?? (app as any)._router;
  walk(root.stack, '');
  return out;
}
