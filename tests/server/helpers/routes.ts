/**
 * The routes Express registered for /api, read from the app's own router stack (walks nested routers and uses
 * their mount paths): the source of the route × role matrix (roles.test.ts) and of the fuzz test (fuzz.test.ts).
 */
import type { Express } from 'express';

export interface RegisteredRoute {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  path: string;
  /** "METHOD /api/path" */
  name: string;
}

export function registeredRouteList(app: Express): RegisteredRoute[] {
  const out: RegisteredRoute[] = [];
  const walk = (stack: any[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        for (const m of Object.keys(layer.route.methods)) {
          const path = `${prefix}${layer.route.path}`;
          out.push({ method: m as RegisteredRoute['method'], path, name: `${m.toUpperCase()} ${path}` });
        }
      } else if (layer.handle?.stack) {
        const mount = typeof layer.rawPath === 'string' && layer.rawPath !== '/' ? layer.rawPath : '';
        walk(layer.handle.stack, prefix + mount);
      }
    }
  };
  walk((app as any).router.stack, '');
  return out.filter((r) => r.path.startsWith('/api')).sort((a, b) => a.name.localeCompare(b.name));
}

/** METHOD + path of every registered /api route, sorted. */
export const registeredRoutes = (app: Express): string[] => registeredRouteList(app).map((r) => r.name).sort();

/** Fills the parameters of an Express path, e.g. /api/preparations/:key → /api/preparations/HWL-2026-0001. */
export function fillPath(path: string, params: Record<string, string>): string {
  return path.replace(/:([A-Za-z]+)/g, (_m, name: string) => params[name] ?? 'x');
}
