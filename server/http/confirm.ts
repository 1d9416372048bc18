import type { Request } from 'express';

/** `?confirm=true` (or `{ confirm: true }` in the body) confirms deleting something that holds flights. */
export function confirmed(req: Request): boolean {
  const q = req.query.confirm;
  const b = (req.body as { confirm?: unknown } | undefined)?.confirm;
  return q === 'true' || q === '1' || b === true;
}
