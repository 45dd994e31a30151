import type { Express } from 'express';

/** One route the app serves: `POST /api/bookings/:id`. */
export interface ServedRoute {
  method: string;
  path: string;
}

export const routeKey = (r: ServedRoute) => `${r.method} ${r.path}`;

interface RouterLayer {
  route?: { path: string | string[]; methods: Record<string, boolean> };
  handle?: { stack?: RouterLayer[] };
  /** The path the layer was mounted at (`app.use('/api/kegs', router)`). */
  rawPath?: string | string[];
  /** True for a layer mounted without a path (`app.use(fn)`). */
  slash?: boolean;
}

const join = (prefix: string, path: string) => {
  const p = `${prefix}${path === '/' ? '' : path}`;
  return p === '' ? '/' : p;
};

/**
 * Every method + path the app's router serves, read from the router itself (mount paths from the
 * layers' raw paths, routes from `route.path` / `route.methods`), so a route added anywhere shows up
 * here without a list to keep in step. Only string paths are expected; anything else fails loudly.
 */
export function servedRoutes(app: Express, under = '/api'): ServedRoute[] {
  const out: ServedRoute[] = [];
  const walk = (stack: RouterLayer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const paths = Array.isArray(layer.route.path) ? layer.route.path : [layer.route.path];
        for (const p of paths) {
          if (typeof p !== 'string') throw new Error(`a route under ${prefix} has a non-string path`);
          for (const [m, on] of Object.entries(layer.route.methods)) if (on && m !== '_all') out.push({ method: m.toUpperCase(), path: join(prefix, p) });
        }
      } else if (layer.handle?.stack) {
        const mount = layer.slash ? '' : layer.rawPath;
        if (typeof mount !== 'string') throw new Error(`a router under ${prefix || '/'} is mounted at a non-string path`);
        walk(layer.handle.stack, join(prefix, mount));
      }
    }
  };
  walk((app as unknown as { router: { stack: RouterLayer[] } }).router.stack, '');
  const seen = new Set<string>();
  return out.filter((r) => (r.path === under || r.path.startsWith(`${under}/`)) && !seen.has(routeKey(r)) && seen.add(routeKey(r)));
}

export const isWrite = (r: ServedRoute) => !['GET', 'HEAD', 'OPTIONS'].includes(r.method);
