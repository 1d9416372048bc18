/**
 * A small leveled logger writing one line per event to stdout/stderr.
 * Stacks go only here, never into an HTTP response.
 */
import { config } from './config';

const LEVELS = { debug: 10, info: 20, warn: 30, error: 40, silent: 100 } as const;
type Level = Exclude<keyof typeof LEVELS, 'silent'>;

function threshold(): number {
  return LEVELS[config.logLevel as keyof typeof LEVELS] ?? LEVELS.info;
}

function write(level: Level, message: string, detail?: Record<string, unknown>): void {
  if (LEVELS[level] < threshold()) return;
  const parts = [new Date().toISOString(), level.toUpperCase(), message];
  if (detail) {
    const { stack, ...rest } = detail;
    if (Object.keys(rest).length > 0) parts.push(JSON.stringify(rest));
    if (typeof stack === 'string') parts.push(`\n${stack}`);
  }
  const line = parts.join(' ');
  if (level === 'error' || level === 'warn') console.error(line);
  else console.log(line);
}

export const log = {
  debug: (message: string, detail?: Record<string, unknown>) => write('debug', message, detail),
  info: (message: string, detail?: Record<string, unknown>) => write('info', message, detail),
  warn: (message: string, detail?: Record<string, unknown>) => write('warn', message, detail),
  error: (message: string, detail?: Record<string, unknown>) => write('error', message, detail),
};
