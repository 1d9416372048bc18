/**
 * Packaging kept true by reading the files (docker cannot run here): `.env.example` lists every variable
 * the code and compose read and pins no derived value; compose runs app and worker from one image with
 * health checks, the worker waiting for a healthy app, and stop grace periods longer than the app's;
 * the runtime image's packages (`dependencies`) are only those the server uses.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { config } from '../../../server/config';
import { jobSettings } from '../../../server/jobs/settings';
import { ROOT } from '../../support/db';

function filesUnder(dir: string, ext: RegExp): string[] {
  return readdirSync(join(ROOT, dir)).flatMap((name) => {
    const rel = join(dir, name);
    return statSync(join(ROOT, rel)).isDirectory() ? filesUnder(rel, ext) : ext.test(name) ? [rel] : [];
  });
}

const read = (rel: string) => readFileSync(join(ROOT, rel), 'utf8');
const envExample = read('.env.example');
const compose = read('docker/compose.yaml');

/** Names listed in .env.example, set or commented out (`NAME=` or `# NAME=`). */
const listed = new Set([...envExample.matchAll(/^#? ?([A-Z][A-Z0-9_]+)=/gm)].map((m) => m[1]!));

/** The block of one compose service (its indented lines). */
function service(name: string): string {
  const m = new RegExp(`^  ${name}:\\n((?:(?:    .*)?\\n)+)`, 'm').exec(compose);
  if (!m) throw new Error(`compose has no service ${name}`);
  return m[1]!;
}

function seconds(duration: string): number {
  const m = /^(\d+)(s|m)$/.exec(duration);
  if (!m) throw new Error(`unreadable duration ${duration}`);
  return Number(m[1]) * (m[2] === 'm' ? 60 : 1);
}

describe('.env.example', () => {
  it('lists every variable the server and compose read', () => {
    const read_ = new Set<string>();
    for (const file of filesUnder('server', /\.ts$/)) {
      const text = read(file);
      for (const m of text.matchAll(/\b(?:str|int|flag|protocol)\('([A-Z][A-Z0-9_]+)'/g)) read_.add(m[1]!);
      for (const m of text.matchAll(/process\.env\.([A-Z][A-Z0-9_]+)/g)) read_.add(m[1]!);
    }
    for (const m of compose.matchAll(/\$\{([A-Z][A-Z0-9_]+)/g)) read_.add(m[1]!);
    // Names Vitest sets for itself.
    read_.delete('VITEST');
    const missing = [...read_].filter((name) => !listed.has(name)).sort();
    expect(missing).toEqual([]);
  });

  it('pins no value that is derived from another variable', () => {
    for (const name of ['GOOGLE_AUTH_URL', 'GOOGLE_TOKEN_URL', 'GOOGLE_USERINFO_URL', 'GOOGLE_CALLBACK_URL', 'PAYMENT_WEBHOOK_URL', 'PAYMENT_API_PORT', 'SMTP_PORT', 'APP_URL']) {
      const set = new RegExp(`^${name}=(.+)$`, 'm').exec(envExample);
      expect(set?.[1], `${name} is derived; leave it unset in .env.example`).toBeUndefined();
    }
  });
});

describe('compose', () => {
  it('runs app and worker from one image built once', () => {
    expect(service('app')).toMatch(/^ {4}build:/m);
    expect(service('app')).toMatch(/^ {4}image: arcwright:local$/m);
    expect(service('worker')).not.toMatch(/^ {4}build:/m);
    expect(service('worker')).toMatch(/^ {4}image: arcwright:local$/m);
    expect(service('worker')).toMatch(/^ {4}pull_policy: never$/m);
  });

  it('gives the worker a health check and starts it once the app is healthy', () => {
    const worker = service('worker');
    expect(worker).toMatch(/healthcheck:\n {6}# .*\n {6}test: \["CMD", "node", "-e", ".*WORKER_HEARTBEAT_FILE.*"\]/);
    expect(worker).not.toMatch(/disable: true/);
    expect(worker).toMatch(/WORKER_HEARTBEAT_FILE: \S+/);
    expect(worker).toMatch(/depends_on:\n {6}app:\n {8}condition: service_healthy/);
    expect(service('app')).toMatch(/healthcheck:\n(?: {6}#.*\n)* {6}test: .*\/api\/v1\/health/);
  });

  it('waits longer on stop than the app drains and the worker hands jobs back', () => {
    const app = seconds(/stop_grace_period: (\S+)/.exec(service('app'))![1]!);
    const worker = seconds(/stop_grace_period: (\S+)/.exec(service('worker'))![1]!);
    const appGrace = Number(/SHUTDOWN_GRACE_MS: \$\{SHUTDOWN_GRACE_MS:-(\d+)\}/.exec(service('app'))![1]) / 1000;
    expect(appGrace).toBe(config.shutdown.graceMs / 1000);
    // server/index.ts exits at the latest 5 s after the grace; server/worker.ts 10 s after the job grace.
    expect(app).toBeGreaterThan(appGrace + 5);
    expect(worker).toBeGreaterThan(jobSettings.stopGraceMs / 1000 + 10);
  });
});

describe('runtime image packages', () => {
  it('holds only packages the server, shared code or scripts import (the client is bundled at build)', () => {
    const pkg = JSON.parse(read('package.json')) as { dependencies: Record<string, string> };
    const code = ['server', 'shared', 'scripts'].flatMap((dir) => filesUnder(dir, /\.ts$/)).map(read).join('\n');
    // Loaded without an import: tsx runs the server, Sequelize loads the mariadb driver by dialect name.
    const loadedIndirectly = new Set(['tsx', 'mariadb']);
    const unused = Object.keys(pkg.dependencies).filter((name) => {
      if (loadedIndirectly.has(name)) return false;
      return !new RegExp(`from '${name.replace(/[/.]/g, '\\$&')}(/[^']*)?'`).test(code);
    });
    expect(unused).toEqual([]);
  });
});
