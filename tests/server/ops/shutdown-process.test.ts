/**
 * SIGTERM on a real app process (`node --import tsx server/index.ts`): it stops accepting connections,
 * lets a request in flight finish within SHUTDOWN_GRACE_MS, then exits 0; a request that outlasts the
 * grace is cut and the process still exits.
 */
import { request as httpRequest, type ClientRequest, type IncomingMessage } from 'node:http';
import { afterEach, describe, expect, it } from 'vitest';
import { freePort, startProcess, type ServerProcess } from '../../support/process';

let proc: ServerProcess | null = null;

afterEach(() => {
  if (proc && proc.child.exitCode === null && proc.child.signalCode === null) proc.child.kill('SIGKILL');
  proc = null;
});

async function startApp(graceMs: number): Promise<{ proc: ServerProcess; port: number }> {
  const port = await freePort();
  const started = startProcess('server/index.ts', { PORT: String(port), HOST: '127.0.0.1', SHUTDOWN_GRACE_MS: String(graceMs), WORKERS_IN_WEB: '0' });
  await started.waitForOutput(/Arcwright listening on/);
  return { proc: started, port };
}

/** A POST whose JSON body is sent in two halves: the request stays in flight until `finish()`. */
function slowPost(port: number): { req: ClientRequest; response: Promise<{ status: number; body: string }>; finish: () => void } {
  const body = JSON.stringify({ email: 'slow@test.example', password: 'x'.repeat(64) });
  const req = httpRequest({
    host: '127.0.0.1',
    port,
    method: 'POST',
    path: '/api/v1/auth/signin',
    headers: { 'content-type': 'application/json', 'content-length': Buffer.byteLength(body) },
  });
  const response = new Promise<{ status: number; body: string }>((resolve, reject) => {
    req.on('response', (res: IncomingMessage) => {
      let text = '';
      res.on('data', (d: Buffer) => (text += d.toString()));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, body: text }));
    });
    req.on('error', reject);
  });
  req.write(body.slice(0, 20));
  return { req, response, finish: () => req.end(body.slice(20)) };
}

function connectRefused(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const req = httpRequest({ host: '127.0.0.1', port, path: '/api/v1/health/live', agent: false }, (res) => {
      res.resume();
      resolve(false);
    });
    req.on('error', (err: NodeJS.ErrnoException) => resolve(err.code === 'ECONNREFUSED'));
    req.end();
  });
}

describe('graceful shutdown of the app process', () => {
  it('lets a request in flight finish after SIGTERM, refuses new connections, and exits 0', async () => {
    const app = await startApp(5000);
    proc = app.proc;
    const slow = slowPost(app.port);
    await new Promise((r) => setTimeout(r, 300));
    proc.child.kill('SIGTERM');
    await proc.waitForOutput(/SIGTERM received, draining/);
    expect(await connectRefused(app.port)).toBe(true);
    slow.finish();
    const answer = await slow.response;
    // The request ran to its normal answer (here: refused for want of a CSRF token), not a cut connection.
    expect(answer.status).toBe(403);
    expect(JSON.parse(answer.body).error.code).toBe('CSRF_INVALID');
    expect(await proc.exited).toBe(0);
    expect(proc.output()).toMatch(/"msg":"Stopped"/);
    expect(proc.output()).not.toMatch(/grace period ran out/);
  });

  it('cuts a request that outlasts the grace period and still exits', async () => {
    const app = await startApp(800);
    proc = app.proc;
    const slow = slowPost(app.port);
    slow.response.catch(() => undefined);
    await new Promise((r) => setTimeout(r, 300));
    const sent = Date.now();
    proc.child.kill('SIGTERM');
    expect(await proc.exited).toBe(0);
    expect(Date.now() - sent).toBeLessThan(5000);
    expect(proc.output()).toMatch(/Shutdown grace period ran out; closing the connections still open/);
    await expect(slow.response).rejects.toThrow(/socket hang up|ECONNRESET/);
  });
});

describe('crash handlers', () => {
  it('logs an unhandled rejection with its stack on one line and shuts down with exit code 1', async () => {
    proc = startProcess('tests/fixtures/processes/unhandled-rejection.ts', {});
    expect(await proc.exited).toBe(1);
    const lines = proc.logLines();
    const crash = lines.find((l) => l.msg === 'Unhandled promise rejection; shutting down');
    expect(crash).toMatchObject({ level: 50, error: 'nobody caught this' });
    expect(String(crash?.stack)).toContain('unhandled-rejection.ts');
    expect(lines.find((l) => l.msg === 'shutdown requested')).toMatchObject({ reason: 'unhandledRejection', exitCode: 1 });
    expect(proc.output()).not.toContain('still running');
  });
});
