/**
 * `npm run --silent follow -- CLIP --from FRAME,X,Y [--fps CAPTURE_RATE] [--radius PX] [--moving-camera]`
 *
 * Follows the ball from one click and prints the track as CSV on stdout:
 * `frame,t,x_px,y_px,confidence,x_ref_px,y_ref_px`, one row per followed frame starting with the
 * start frame (frames where the ball is out of view have none). Pixels from the top-left corner of
 * the displayed picture, y down, in each frame's own picture and then in the start frame's; t in
 * seconds from frame 0 (frame / capture rate, or from the frame's timestamp for a variable rate). Exit codes: 0 done, 1 the clip or the start point cannot be used (message on
 * stderr), 2 wrong options (usage on stderr).
 */
import { parseArgs } from 'node:util';
import { followBall, isVideoError } from '../server/video/index';

const USAGE = `Usage: npm run --silent follow -- CLIP --from FRAME,X,Y [--fps CAPTURE_RATE] [--radius PX] [--moving-camera]

Follows the ball from one click and prints its track as CSV:
  frame,t,x_px,y_px,confidence,x_ref_px,y_ref_px
(x_px, y_px in each frame's own picture; x_ref_px, y_ref_px the same point in the start
frame's picture, which differ when the camera moved; no row while the ball is out of view)

  CLIP              a video file, or a folder of JPEG/PNG frames (then --fps is required)
  --from FRAME,X,Y  the clicked frame (0-based) and the ball's centre in pixels from the
                    top-left corner of the picture (y down)
  --fps RATE        capture rate in frames per second, for t (default: the clip's own rate;
                    give it for slow-motion clips, which play back slower than they were filmed)
  --radius PX       the ball's radius in pixels, when known (default: measured)
  --moving-camera   the camera was turned to follow the ball: estimate its motion from
                    the background (default: the camera was still)
  -h, --help        show this help

Exit status: 0 done, 1 the clip or the start point cannot be used, 2 wrong options.
`;

function usageError(message: string): never {
  process.stderr.write(`follow: ${message}\n\n${USAGE}`);
  process.exit(2);
}

function positiveNumber(text: string, what: string): number {
  const v = Number(text);
  if (text.trim() === '' || !Number.isFinite(v) || v <= 0) usageError(`${what} must be a number above 0 (got "${text}").`);
  return v;
}

async function main(): Promise<void> {
  let parsed;
  try {
    parsed = parseArgs({
      args: process.argv.slice(2),
      allowPositionals: true,
      strict: true,
      options: {
        from: { type: 'string' },
        fps: { type: 'string' },
        radius: { type: 'string' },
        'moving-camera': { type: 'boolean' },
        help: { type: 'boolean', short: 'h' },
      },
    });
  } catch (err) {
    // parseArgs explains at length; the first sentence is the useful part.
    usageError(((err as Error).message.split('. ')[0] ?? 'wrong options').replace(/\.$/, '') + '.');
  }
  const { values, positionals } = parsed;
  if (values.help) {
    process.stdout.write(USAGE);
    return;
  }
  if (positionals.length !== 1) usageError(positionals.length === 0 ? 'give the clip to follow.' : `give one clip only (got ${positionals.length}).`);
  if (values.from === undefined) usageError('give the start with --from FRAME,X,Y.');
  const parts = values.from.split(',').map((s) => s.trim());
  const nums = parts.map(Number);
  if (parts.length !== 3 || parts.some((s) => s === '') || nums.some((v) => !Number.isFinite(v))) {
    usageError(`--from must be three numbers FRAME,X,Y (got "${values.from}").`);
  }
  const [frame, x, y] = nums as [number, number, number];
  if (!Number.isInteger(frame) || frame < 0) usageError(`FRAME in --from must be a whole number from 0 (got "${parts[0]}").`);
  const fps = values.fps === undefined ? undefined : positiveNumber(values.fps, '--fps');
  const radius = values.radius === undefined ? undefined : positiveNumber(values.radius, '--radius');

  try {
    const camera = values['moving-camera'] ? 'moving' : 'still';
    const result = await followBall(positionals[0]!, { frame, x, y, radius }, { captureFps: fps, camera });
    const lines = ['frame,t,x_px,y_px,confidence,x_ref_px,y_ref_px'];
    for (const p of result.points) {
      lines.push(`${p.frame},${p.t.toFixed(6)},${p.x.toFixed(3)},${p.y.toFixed(3)},${p.confidence.toFixed(3)},${p.xRef.toFixed(3)},${p.yRef.toFixed(3)}`);
    }
    process.stdout.write(`${lines.join('\n')}\n`);
    process.stderr.write(`follow: ${result.points.length} frames followed; stopped: ${result.stoppedBecause}.\n`);
  } catch (err) {
    if (isVideoError(err)) {
      process.stderr.write(`follow: ${err.message}\n`);
      process.exit(1);
    }
    process.stderr.write(`follow: the clip could not be followed (${(err as Error).message ?? String(err)}).\n`);
    process.exit(1);
  }
}

process.stdout.on('error', (err: NodeJS.ErrnoException) => {
  // A closed pipe (`| head`) is the reader's choice, not a failure.
  if (err.code === 'EPIPE') process.exit(0);
  throw err;
});
await main();
