/**
 * Structured logs with pino: one JSON object a line on stdout (levels as numbers, `time` in ms since
 * the epoch, `msg`), so a log collector can parse every line. Stacks stay inside one line's `stack`
 * field (JSON escapes their line breaks). Secrets are redacted by path wherever they appear in a
 * detail object. A person at a terminal in development gets pino-pretty's coloured lines instead,
 * when the package is installed (it is a development dependency; the runtime image has none).
 */
import { createRequire } from 'node:module';
import pino, { type DestinationStream, type Logger } from 'pino';
import { config } from './config';

/** Paths pino replaces with "[redacted]" before a line is written. */
export const REDACTED_PATHS = [
  'password',
  'newPassword',
  'currentPassword',
  'token',
  'secret',
  'cookie',
  'authorization',
  '*.password',
  '*.newPassword',
  '*.currentPassword',
  '*.token',
  '*.secret',
  '*.cookie',
  '*.authorization',
  'req.headers.cookie',
  'req.headers.authorization',
  'req.headers["x-csrf-token"]',
  'res.headers["set-cookie"]',
] as const;

const LEVEL_NAMES = ['trace', 'debug', 'info', 'warn', 'error', 'fatal', 'silent'];

function level(): string {
  return LEVEL_NAMES.includes(config.logLevel) ? config.logLevel : 'info';
}

/** pino-pretty's stream when a person reads the output in development, else null (plain JSON). */
function prettyStream(): DestinationStream | null {
  const wanted = process.env.LOG_PRETTY;
  const pretty = wanted === undefined || wanted === '' ? process.stdout.isTTY && config.nodeEnv === 'development' && !config.isTest : wanted === '1';
  if (!pretty) return null;
  try {
    const require = createRequire(import.meta.url);
    const build = require('pino-pretty') as (options: Record<string, unknown>) => DestinationStream;
    return build({ colorize: true, translateTime: 'SYS:HH:MM:ss.l', ignore: 'pid,hostname' });
  } catch {
    return null;
  }
}

/** Builds a logger writing to `destination` (tests pass a stream that collects the lines). */
export function createLogger(destination?: DestinationStream, minLevel = level()): Logger {
  return pino(
    {
      level: minLevel,
      base: { pid: process.pid },
      redact: { paths: [...REDACTED_PATHS], censor: '[redacted]' },
      serializers: { err: pino.stdSerializers.err },
    },
    destination ?? prettyStream() ?? pino.destination({ dest: 1, sync: true }),
  );
}

/** The process's logger; pino-http's access log writes through it as well. */
export let logger: Logger = createLogger();

/** Replaces the process logger (tests collect its lines). Returns the previous one. */
export function setLogger(next: Logger): Logger {
  const previous = logger;
  logger = next;
  return previous;
}

type Detail = Record<string, unknown>;

/** The short form the code uses: a message and an optional object of fields. */
export const log = {
  debug: (message: string, detail?: Detail) => logger.debug(detail ?? {}, message),
  info: (message: string, detail?: Detail) => logger.info(detail ?? {}, message),
  warn: (message: string, detail?: Detail) => logger.warn(detail ?? {}, message),
  error: (message: string, detail?: Detail) => logger.error(detail ?? {}, message),
};

/** The fields of an error for a log line: its message and its stack in one field. */
export function errorFields(err: unknown): { error: string; stack?: string } {
  if (err instanceof Error) return { error: err.message, stack: err.stack };
  return { error: String(err) };
}
