/**
 * Collects the server's log lines (parsed JSON objects) for assertions: `captureLogs()` swaps the process
 * logger for one writing into an array; `restore()` puts the previous one back.
 */
import { Writable } from 'node:stream';
import { createLogger, setLogger } from '../../server/logger';

export interface CapturedLogs {
  lines: Record<string, unknown>[];
  /** The raw text written, one JSON object per line. */
  raw: string[];
  restore: () => void;
}

export function captureLogs(level = 'info'): CapturedLogs {
  const lines: Record<string, unknown>[] = [];
  const raw: string[] = [];
  const stream = new Writable({
    write(chunk: Buffer, _encoding, callback) {
      for (const line of chunk.toString('utf8').split('\n')) {
        if (line.trim() === '') continue;
        raw.push(line);
        lines.push(JSON.parse(line) as Record<string, unknown>);
      }
      callback();
    },
  });
  const previous = setLogger(createLogger(stream, level));
  return { lines, raw, restore: () => setLogger(previous) };
}
