/** Test clips for the browser tests, made by the video engine's generator. */
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';

/** The parts of the generator's truth file (server/video/synth.ts, FlightTruth) this test reads. */
export interface Truth {
  launchFrame: number;
  frames: { frame: number; x: number; y: number; visible: boolean }[];
  /** With a tilted camera: the rectangle's corners (bottom left, bottom right, top right, top left) and the ground under the launch. */
  plane?: { corners: { x: number; y: number }[]; widthM: number; heightM: number; origin: { x: number; y: number } };
}

/**
 * Renders the test clip with the video engine's generator (server/video/synth.ts) in a child process.
 * Note: a child process rather than an import, because the browser tests' TypeScript project holds tests/e2e only.
 */
export function renderClip(videoPath: string, spec: Record<string, unknown>): { videoPath: string; truth: Truth } {
  const synth = pathToFileURL(resolve('server/video/synth.ts')).href;
  const code =
    `import { renderFlightClip } from ${JSON.stringify(synth)};` +
    'renderFlightClip(process.argv[1], JSON.parse(process.argv[2])).then((r) => process.stdout.write(JSON.stringify({ truthPath: r.truthPath })));';
  const run = spawnSync('npx', ['tsx', '--input-type=module', '--eval', code, videoPath, JSON.stringify(spec)], { encoding: 'utf8' });
  if (run.status !== 0) throw new Error(`The test clip could not be generated: ${run.stderr || run.stdout}`);
  const { truthPath } = JSON.parse(run.stdout) as { truthPath: string };
  return { videoPath, truth: JSON.parse(readFileSync(truthPath, 'utf8')) as Truth };
}
