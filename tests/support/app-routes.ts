/** The routes an Express app really has, read from its own router stacks (no list kept by hand). */
import type { Express } from 'express';

interface StackLayer {
  rawPath?: string | string[];
  route?: { path: string; methods: Record<string, boolean> };
  handle: { stack?: StackLayer[] };
}

function routesOf(stack: StackLayer[], prefix: string, out: string[]) {
  for (const layer of stack) {
    if (layer.route) {
      for (const method of Object.keys(layer.route.methods)) if (method !== '_all') out.push(`${method.toUpperCase()} ${prefix}${layer.route.path === '/' ? '' : layer.route.path}`);
    } else if (layer.handle.stack) {
      const mount = typeof layer.rawPath === 'string' && layer.rawPath !== '/' ? layer.rawPath : '';
      routesOf(layer.handle.stack, prefix + mount, out);
    }
  }
  return out;
}

/**
 * Every `METHOD /path` below the app's `/api` mounts (the health check is mounted there on its own, before the
 * session middleware), paths as Express declares them. Example: 'GET /projects/:projectId/runs/:runId'.
 */
export function apiRoutes(app: Express): string[] {
  const apis = (app as unknown as { router: { stack: StackLayer[] } }).router.stack.filter((l) => l.rawPath === '/api');
  return apis.flatMap((api) => routesOf(api.handle.stack!, '', [])).sort();
}
