/** The route table of an Express 5 router, for the authorization tests' completeness checks. */
import type { Router } from 'express';

/** Routes as `method path` from an Express 5 router's own table. */
export function routesOf(router: Router): string[] {
  const stack = (router as unknown as { stack: { route?: { path: string; methods: Record<string, boolean> } }[] }).stack;
  return stack.filter((layer) => layer.route).flatMap((layer) => Object.keys(layer.route!.methods).map((m) => `${m} ${layer.route!.path}`));
}
