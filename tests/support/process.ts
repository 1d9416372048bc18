/**
 * Child processes of the app (`server/index.ts`) and the worker (`server/worker.ts`) for process tests:
 * started with `node --import tsx` on the test database, their output collected, helpers to wait.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';
import { join } from 'node:path';
import { ROOT } from './root';

/** A free TCP port on 127.0.0.1 (the kernel's pick). */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const address = probe.address();
      probe.close(() => (typeof address === 'object' && address ? resolve(address.port) : reject(new Error('no port'))));
    });
  });
}

export interface ServerProcess {
  child: ChildProcess;
  /** Everything written to stdout and stderr so far. */
  output: () => string;
  /** Parsed JSON log lines so far (other lines skipped). */
  logLines: () => Record<string, unknown>[];
  /** Resolves with the exit code (or the signal's name). */
  exited: Promise<number | string | null>;
  waitForOutput: (pattern: RegExp, timeoutMs?: number) => Promise<void>;
}

/** The environment of a child: the test's, without Vitest's variables, on the test database. */
export function childEnv(extra: Record<string, string>): NodeJS.ProcessEnv {
  const env = Object.fromEntries(Object.entries(process.env).filter(([key]) => !key.startsWith('VITEST')));
  return {
    ...env,
    NODE_ENV: 'development',
    DB_NAME: process.env.TEST_DB_NAME ?? 'arcwright_test',
    ENV_FILE: 'none',
    FAKES: '0',
    GOOGLE_SIGNIN: '0',
    LOG_LEVEL: 'info',
    LOG_PRETTY: '0',
    ...extra,
  };
}

/** Starts `node --import tsx <script>` from the repository root. */
export function startProcess(script: string, env: Record<string, string>): ServerProcess {
  const child = spawn(process.execPath, ['--import', 'tsx', join(ROOT, script)], { cwd: ROOT, env: childEnv(env), stdio: ['ignore', 'pipe', 'pipe'] });
  let text = '';
  child.stdout!.on('data', (d: Buffer) => (text += d.toString()));
  child.stderr!.on('data', (d: Buffer) => (text += d.toString()));
  const exited = new Promise<number | string | null>((resolve) => child.on('exit', (code, signal) => resolve(code ?? signal)));
  const waitForOutput = async (pattern: RegExp, timeoutMs = 30_000): Promise<void> => {
    const until = Date.now() + timeoutMs;
    while (!pattern.test(text)) {
      if (child.exitCode !== null || child.signalCode !== null) throw new Error(`process exited before ${pattern}:\n${text}`);
      if (Date.now() > until) throw new Error(`timed out waiting for ${pattern}:\n${text}`);
      await new Promise((r) => setTimeout(r, 50));
    }
  };
  const logLines = () =>
    text.split('\n').flatMap((line) => {
      try {
        return line.startsWith('{') ? [JSON.parse(line) as Record<string, unknown>] : [];
      } catch {
        return [];
      }
    });
  return { child, output: () => text, logLines, exited, waitForOutput };
}

/** Polls `probe` until it answers non-null. */
export async function waitUntil<T>(what: string, probe: () => Promise<T | null> | T | null, timeoutMs = 30_000, everyMs = 100): Promise<T> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const value = await probe();
    if (value !== null) return value;
    await new Promise((r) => setTimeout(r, everyMs));
  }
  throw new Error(`timed out waiting for ${what}`);
}

/** True while a process with this pid exists. */
export function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}
