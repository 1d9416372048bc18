/**
 * Health probes, answered before the session so that they create no session rows.
 * - `GET /api/v1/health/live`: liveness, the process answers (no dependency is asked).
 * - `GET /api/v1/health`: readiness, the database answers, storage is writable and ffmpeg is present;
 *   503 with the failing checks in `fields` otherwise, and 503 while the process drains at shutdown.
 */
import { constants } from 'node:fs';
import { access, mkdir, rm, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { Router } from 'express';
import { config } from '../config';
import { sequelize } from '../db';
import { ApiError } from '../http/errors';
import { isDraining } from '../lifecycle';
import { publicRoute } from '../middleware/authorize';
import { ffmpegPath } from '../video/tools';

export const healthRouter = Router();

async function checkDatabase(): Promise<string | null> {
  try {
    await sequelize.query('SELECT 1');
    return null;
  } catch {
    return 'The database is not answering. Start it (npm run db:start) or check DB_HOST and DB_PORT.';
  }
}

async function checkStorage(): Promise<string | null> {
  const probe = join(config.storage.dir, '.work', `.health-${process.pid}`);
  try {
    await mkdir(join(config.storage.dir, '.work'), { recursive: true });
    await writeFile(probe, 'ok');
    await rm(probe, { force: true });
    return null;
  } catch {
    return `Storage at ${config.storage.dir} is not writable. Check STORAGE_DIR and the folder's owner.`;
  }
}

async function checkFfmpeg(): Promise<string | null> {
  try {
    await access(ffmpegPath(), constants.X_OK);
    return null;
  } catch {
    return `ffmpeg was not found at ${ffmpegPath()}. Install ffmpeg or set FFMPEG_PATH.`;
  }
}

healthRouter.get('/health/live', publicRoute, (_req, res) => {
  res.json({ data: { status: 'ok' } });
});

healthRouter.get('/health', publicRoute, async (_req, res) => {
  if (isDraining()) {
    res.setHeader('Retry-After', '5');
    throw new ApiError('SERVICE_UNAVAILABLE', 'This app process is shutting down. Try again shortly; another process will answer.', {
      process: 'draining',
    });
  }
  const [db, storage, ffmpeg] = await Promise.all([checkDatabase(), checkStorage(), checkFfmpeg()]);
  const failed = Object.entries({ db, storage, ffmpeg }).filter((entry): entry is [string, string] => entry[1] !== null);
  if (failed.length > 0) {
    res.setHeader('Retry-After', '5');
    throw new ApiError('SERVICE_UNAVAILABLE', `Not ready: ${failed.map(([, reason]) => reason).join(' ')}`, Object.fromEntries(failed));
  }
  res.json({ data: { status: 'ok', db: 'ok', storage: 'ok', ffmpeg: 'ok' } });
});
