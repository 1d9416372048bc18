/**
 * Defaults merged with caller options. Note: a plain spread lets `{ windSpeed: undefined }`
 * override a default with undefined; callers building options from optional form fields do that.
 */
export function withDefaults<D extends object, O extends object>(defaults: D, options: O | undefined): D & O {
  const out: Record<string, unknown> = { ...(defaults as Record<string, unknown>) };
  if (options) for (const [k, v] of Object.entries(options)) if (v !== undefined) out[k] = v;
  return out as D & O;
}
