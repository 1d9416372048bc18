/**
 * WEB_PROCESSES=2 on a real app process: the primary migrates and forks two web processes that share the
 * port, replaces one that dies, and on SIGTERM drains both and exits 0 with none left behind.
 */
import { execFileSync } from 'node:child_process';
import { afterEach, describe, expect, it } from 'vitest';
import { alive, freePort, startProcess, waitUntil, type ServerProcess } from '../../support/process';

let proc: ServerProcess | null = null;

afterEach(() => {
  if (proc && proc.child.exitCode === null && proc.child.signalCode === null) proc.child.kill('SIGKILL');
  proc = null;
});

/** The pids of the primary's web processes. */
function webProcesses(primary: number): number[] {
  try {
    return execFileSync('pgrep', ['-P', String(primary)], { encoding: 'utf8' }).trim().split('\n').filter(Boolean).map(Number);
  } catch {
    return [];
  }
}

describe('several web processes on one port', () => {
  it('serves from two processes, replaces one that was killed, and drains both on SIGTERM', async () => {
    const port = await freePort();
    proc = startProcess('server/index.ts', { PORT: String(port), HOST: '127.0.0.1', WEB_PROCESSES: '2', WORKERS_IN_WEB: '0', SHUTDOWN_GRACE_MS: '3000', LOG_LEVEL: 'info' });
    await proc.waitForOutput(/listening on http:\/\/127\.0\.0\.1:\d+ \(2 web processes\)/, 60_000);
    const primary = proc.child.pid!;
    const first = await waitUntil('two web processes', async () => (webProcesses(primary).length === 2 ? webProcesses(primary) : null), 150_000, 250);
    const answers = await Promise.all(Array.from({ length: 10 }, () => fetch(`http://127.0.0.1:${port}/api/v1/health/live`).then((r) => r.status)));
    expect(answers).toEqual(answers.map(() => 200));

    process.kill(first[0]!, 'SIGKILL');
    await proc.waitForOutput(/A web process \(pid \d+\) ended \(SIGKILL\); starting another/, 60_000);
    const replaced = await waitUntil(
      'a replacement web process',
      async () => {
        const now = webProcesses(primary);
        return now.length === 2 && !now.includes(first[0]!) ? now : null;
      },
      150_000,
      250,
    );
    expect(replaced).toContain(first[1]);
    expect((await fetch(`http://127.0.0.1:${port}/api/v1/health/live`)).status).toBe(200);

    proc.child.kill('SIGTERM');
    expect(await proc.exited).toBe(0);
    expect(proc.output()).toMatch(/SIGTERM received, draining 2 web processes/);
    for (const pid of replaced) expect(alive(pid)).toBe(false);
  }, 420_000);

  it('refuses a WEB_PROCESSES that is not a number of processes, saying what to give', async () => {
    proc = startProcess('server/index.ts', { PORT: String(await freePort()), HOST: '127.0.0.1', WEB_PROCESSES: 'many' });
    expect(await proc.exited).not.toBe(0);
    expect(proc.output()).toMatch(/WEB_PROCESSES="many" is not a number of processes: give a whole number from 1 to 64, or auto/);
  });
});
