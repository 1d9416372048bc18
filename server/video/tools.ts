/**
 * Where ffmpeg and ffprobe live, and small helpers for running them.
 *
 * Paths come from `FFMPEG_PATH` and `FFPROBE_PATH` (defaults: Debian's `/usr/bin/ffmpeg` and
 * `/usr/bin/ffprobe`). They are read at call time, so a test or a worker may set them late.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { accessSync, constants } from 'node:fs';
import ffmpeg from 'fluent-ffmpeg';
import { VideoError } from './errors';

export function ffmpegPath(): string {
  return process.env.FFMPEG_PATH || '/usr/bin/ffmpeg';
}

export function ffprobePath(): string {
  return process.env.FFPROBE_PATH || '/usr/bin/ffprobe';
}

/** Points fluent-ffmpeg at the configured binaries; called before each use so env changes apply. */
export function configureFluentFfmpeg(): void {
  ffmpeg.setFfmpegPath(ffmpegPath());
  ffmpeg.setFfprobePath(ffprobePath());
}

/** util-linux's setpriv, present on Debian (util-linux is an essential package) and in the runtime image. */
const SETPRIV = '/usr/bin/setpriv';
let setprivUsable: boolean | undefined;

function executable(path: string): boolean {
  try {
    accessSync(path, constants.X_OK);
    return true;
  } catch {
    return false;
  }
}

/**
 * The command line that starts a tool so that it dies with this process: on Linux through
 * `setpriv --pdeathsig KILL`, which asks the kernel (prctl PR_SET_PDEATHSIG) to send SIGKILL to the
 * tool when its parent dies, even by SIGKILL where no exit handler of ours runs. Without setpriv, or
 * when the tool is missing (so that spawn still fails with ENOENT and the usual advice), the tool runs
 * directly. `ARCWRIGHT_TOOL_PDEATHSIG=0` turns the wrapper off.
 * Use as `spawn(...toolCommand(ffmpegPath(), args), options)`.
 */
export function toolCommand(path: string, args: readonly string[]): [string, string[]] {
  setprivUsable ??= process.platform === 'linux' && process.env.ARCWRIGHT_TOOL_PDEATHSIG !== '0' && executable(SETPRIV);
  if (!setprivUsable || !executable(path)) return [path, [...args]];
  return [SETPRIV, ['--pdeathsig', 'KILL', '--', path, ...args]];
}

export function toolMissing(tool: string, path: string): VideoError {
  const envName = tool === 'ffprobe' ? 'FFPROBE_PATH' : 'FFMPEG_PATH';
  return new VideoError(
    'VIDEO_TOOL_MISSING',
    `${tool} was not found at ${path}. Install ffmpeg (Debian: apt-get install ffmpeg) or set ${envName}.`,
    { tool, path },
  );
}

/** The last meaningful line of ffmpeg's stderr: the one that says why it failed. */
export function lastErrorLine(stderr: string): string {
  const lines = stderr
    .split(/\r?\n/)
    .map((l) => l.trim())
    .filter((l) => l.length > 0 && !/^(frame=|size=|video:|Press \[q\]|Conversion failed)/.test(l));
  return lines.length > 0 ? lines[lines.length - 1]! : '';
}

export interface RunResult {
  code: number | null;
  signal: NodeJS.Signals | null;
  stdout: string;
  stderr: string;
}

/**
 * Runs a tool to completion, keeping at most `maxStderr` characters of its stderr (the tail), so a
 * chatty ffmpeg cannot fill memory. Rejects only when the binary cannot be started.
 */
export function runTool(
  path: string,
  args: string[],
  opts: { signal?: AbortSignal; maxStderr?: number; onSpawn?: (child: ChildProcess) => void } = {},
): Promise<RunResult> {
  const maxStderr = opts.maxStderr ?? 64 * 1024;
  return new Promise((resolvePromise, reject) => {
    const child = spawn(...toolCommand(path, args), { stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    const onAbort = (): void => {
      child.kill('SIGKILL');
    };
    // Note: a signal aborted before the spawn never fires 'abort' again.
    if (opts.signal?.aborted) onAbort();
    else opts.signal?.addEventListener('abort', onAbort, { once: true });
    child.stdout!.setEncoding('utf8');
    child.stderr!.setEncoding('utf8');
    child.stdout!.on('data', (d: string) => {
      stdout += d;
    });
    child.stderr!.on('data', (d: string) => {
      stderr += d;
      if (stderr.length > maxStderr * 2) stderr = stderr.slice(-maxStderr);
    });
    child.on('error', (err: NodeJS.ErrnoException) => {
      opts.signal?.removeEventListener('abort', onAbort);
      if (err.code === 'ENOENT' || err.code === 'EACCES') {
        reject(toolMissing(path === ffprobePath() ? 'ffprobe' : 'ffmpeg', path));
      } else reject(err);
    });
    child.on('close', (code, signal) => {
      opts.signal?.removeEventListener('abort', onAbort);
      resolvePromise({ code, signal, stdout, stderr: stderr.slice(-maxStderr) });
    });
    opts.onSpawn?.(child);
  });
}
