/**
 * Display units for the browser: the conversions and formatting live once in `shared/units.ts` (the server's CSV
 * exports use the same), re-exported here so every screen imports them from one place.
 */
export * from '@shared/units';
