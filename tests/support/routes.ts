import type { Express } from 'express';

interface Layer {
  route?: { path: string; methods: Record<string, boolean> };
  handle: { stack?: Layer[] };
  rawPath?: string | string[];
  slash?: boolean;
}

/**
 * Every route the app really serves, as "METHOD /path" in Express form, found by walking the router
 * stack (routers mounted with a path add it as a prefix). Tests compare this with their tables and
 * with the OpenAPI description, so a new route cannot be left out of either.
 */
export function listExpressRoutes(app: Express): string[] {
  const found = new Set<string>();
  const walk = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        for (const [method, on] of Object.entries(layer.route.methods)) {
          if (on && method !== '_all') found.add(`${method.toUpperCase()} ${prefix}${layer.route.path}`);
        }
      } else if (layer.handle.stack) {
        const mount = layer.slash || typeof layer.rawPath !== 'string' ? '' : layer.rawPath.replace(/\/$/, '');
        walk(layer.handle.stack, prefix + mount);
      }
    }
  };
  walk((app as unknown as { router: { stack: Layer[] } }).router.stack, '');
  return [...found].sort();
}

/** The API's own routes (the client's SPA fallback is not one). */
export const listApiRoutes = (app: Express) => listExpressRoutes(app).filter((r) => r.split(' ')[1]!.startsWith('/api/'));
