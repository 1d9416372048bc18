import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runFitCli } from '../../scripts/fit/cli';
import { FIXTURES, FIXTURE_DIR, fixtureText } from '../../scripts/fit/generate-tracks';

const dir = 'tests/fixtures/tracks';
const file = (name: string) => join(dir, name);

async function run(args: string[]): Promise<{ status: number; out: string[]; err: string[] }> {
  const out: string[] = [], err: string[] = [];
  const status = await runFitCli(args, { out: (l) => out.push(l), err: (l) => err.push(l) });
  return { status, out, err };
}

const REQUIRED_KEYS = ['file', 'model', 'launchSpeed', 'launchAngle', 'launchHeight', 'cd', 'cdError', 'cl', 'clError', 'apexHeight',
  'apexTime', 'timeUp', 'timeDown', 'flightTime', 'carry', 'landingSpeed', 'landingAngle', 'standardCarry', 'reynolds', 'rms', 'warnings'];

describe('fit command', () => {
  it('keeps its example tracks equal to what the generator writes', () => {
    for (const f of FIXTURES) expect(readFileSync(join(FIXTURE_DIR, f.name), 'utf8')).toBe(fixtureText(f));
  });

  it('prints one JSON line per file in input order with the documented keys', async () => {
    const r = await run([file('punt-evening.csv'), file('goal-kick-backspin.csv'), file('shot-put.csv')]);
    expect(r.status).toBe(0);
    expect(r.out).toHaveLength(3);
    const lines = r.out.map((l) => JSON.parse(l));
    expect(lines.map((l) => l.file)).toEqual([file('punt-evening.csv'), file('goal-kick-backspin.csv'), file('shot-put.csv')]);
    for (const l of lines) for (const k of REQUIRED_KEYS) expect(l).toHaveProperty(k);
    expect(Object.keys(lines[0]).slice(0, 3)).toEqual(['file', 'model', 'launchSpeed']);
    // The punt was generated with C_d 0.26 at 26 m/s, 48°; the goal kick with backspin C_L 0.12.
    expect(lines[0].model).toBe('drag');
    expect(Math.abs(lines[0].cd - 0.26)).toBeLessThan(3 * lines[0].cdError);
    expect(Math.abs(lines[0].launchAngle - 48)).toBeLessThan(0.1);
    expect(lines[1].model).toBe('drag-lift');
    expect(Math.abs(lines[1].cl - 0.12)).toBeLessThan(3 * lines[1].clError);
  });

  it('fits the other files and reports the failing ones with a non-zero status', async () => {
    const r = await run([file('too-few.csv'), file('throw-in-short.csv'), file('millimetres.csv'), file('missing.csv')]);
    expect(r.status).toBe(1);
    const [few, short, mm, missing] = r.out.map((l) => JSON.parse(l));
    expect(few).toMatchObject({ file: file('too-few.csv'), code: 'TOO_FEW_POINTS' });
    expect(few.error).toMatch(/at least 5/);
    expect(short.carry).toBeGreaterThan(20);
    expect(short.warnings.map((w: { code: string }) => w.code)).toContain('EXTRAPOLATED');
    expect(mm).toMatchObject({ code: 'SCALE_SUSPECT' });
    expect(mm.error).toMatch(/millimetres/);
    expect(missing).toMatchObject({ file: file('missing.csv'), code: 'READ_FAILED' });
    expect(missing.error).toMatch(/ENOENT/);
  });

  it('uses the command-line ball and air for files that do not carry them', async () => {
    const text = readFileSync(file('punt-evening.csv'), 'utf8').split('\n').filter((l) => !/^# (ball|temperature_c|pressure_pa|humidity_pct):/.test(l)).join('\n');
    const args = ['--mass', '0.43', '--diameter', '0.2196', '--temperature', '12', '--pressure', '101200', '--humidity', '70', '--model', 'drag', 'bare.csv'];
    const out: string[] = [];
    const status = await runFitCli(args, { out: (l) => out.push(l), err: () => {}, readFile: async () => text });
    expect(status).toBe(0);
    const line = JSON.parse(out[0]);
    expect(line.airDensity).toBeCloseTo(1.2324, 3);
    expect(Math.abs(line.cd - 0.26)).toBeLessThan(0.005);
  });

  it('names the catalogue ball it assumed for a file that gives only mass and diameter', async () => {
    // The first 0.25 s of the throw-in cannot determine C_d alone; 0.43 kg and 0.22 m lie within IFAB Law 2's ranges (from memory).
    const lines = readFileSync(file('throw-in-short.csv'), 'utf8').replace('# ball: football-5', '# mass_kg: 0.43\n# diameter_m: 0.22').split('\n');
    const text = lines.slice(0, lines.findIndex((l) => l.startsWith('t,')) + 16).join('\n');
    const out: string[] = [];
    const status = await runFitCli(['--model', 'drag', 'throw-in.csv'], { out: (l) => out.push(l), err: () => {}, readFile: async () => text });
    expect(status).toBe(0);
    const line = JSON.parse(out[0]);
    expect(line.cdPriorUsed).toBe(true);
    const prior = (line.warnings as { code: string; message: string }[]).find((w) => w.code === 'CD_PRIOR_USED')!;
    expect(prior.message).toMatch(/0\.2–0\.3 for Association football, size 5 \(the ball was assumed to be one/);
  });

  it('traces a late-starting track back to the release height given on the command line', async () => {
    const lines = readFileSync(file('punt-evening.csv'), 'utf8').split('\n');
    const header = lines.findIndex((l) => l.startsWith('t,'));
    // Leave out the first 6 samples: the trace starts after the release.
    const late = [...lines.slice(0, header + 1), ...lines.slice(header + 7)].join('\n');
    const out: string[] = [];
    const full = JSON.parse((await run([file('punt-evening.csv')])).out[0]);
    const status = await runFitCli(['--release-height', String(full.launchHeight), '--fps', '60', 'a.csv'], { out: (l) => out.push(l), err: () => {}, readFile: async () => late });
    expect(status).toBe(0);
    const line = JSON.parse(out[0]);
    expect(line.releaseMode).toBe('height');
    expect(line.releaseBackFrames).toBeGreaterThan(5);
    expect(Math.abs(line.launchSpeed - full.launchSpeed) / full.launchSpeed).toBeLessThan(0.01);
  });

  it.each([
    [['--release-time', '0', '--release-height', '0', 'a.csv'], /either --release-time or --release-height/],
    [['--release-height', '7', 'a.csv'], /--release-height 7 is outside 0…5/],
    [['--mass', '0.43', 'a.csv'], /--mass and --diameter go together/],
    [['--ball', 'football-5', '--mass', '0.43', '--diameter', '0.22', 'a.csv'], /either --ball or --mass/],
    [['--rho', '1.2', '--altitude', '1000', 'a.csv'], /either --rho or the weather/],
    [['--model', 'spin', 'a.csv'], /--model must be/],
    [['--wind', 'fast', 'a.csv'], /--wind needs a number/],
    [['--ball', 'beachball', 'a.csv'], /Unknown ball "beachball"/],
    [['--frobnicate', 'a.csv'], /Unknown option/],
    [[], /at least one CSV file/],
  ])('prints the usage and exits 2 on wrong options (%j)', async (args, message) => {
    const r = await run(args);
    expect(r.status).toBe(2);
    expect(r.err[0]).toMatch(message);
    expect(r.err.join('\n')).toMatch(/Usage: npm run --silent fit --/);
    expect(r.out).toEqual([]);
  });

  it('prints the help and the ball catalogue', async () => {
    const help = await run(['--help']);
    expect(help.status).toBe(0);
    expect(help.out[0]).toMatch(/--model auto\|vacuum\|linear\|drag\|drag-lift/);
    const balls = await run(['--balls']);
    expect(balls.out.map((l) => JSON.parse(l).id)).toContain('football-5');
  });

  it('runs as `npm run --silent fit` with the documented exit status', () => {
    const r = spawnSync('npm', ['run', '--silent', 'fit', '--', file('shot-put.csv'), file('too-few.csv')], { encoding: 'utf8', timeout: 60000 });
    expect(r.status).toBe(1);
    const lines = r.stdout.trim().split('\n').map((l) => JSON.parse(l));
    expect(lines[0].file).toBe(file('shot-put.csv'));
    expect(lines[1].code).toBe('TOO_FEW_POINTS');
  });
});
