import { Router } from 'express';
import { sequelize } from '../db';
import { ApiError } from '../http/errors';
import { publicRoute } from '../middleware/authorize';

/** `GET /api/v1/health`: the app answers and the database answers. */
export const healthRouter = Router();

healthRouter.get('/health', publicRoute, async (_req, res) => {
  try {
    await sequelize.query('SELECT 1');
  } catch {
    throw new ApiError('SERVICE_UNAVAILABLE', 'The database is not answering. Start it with `npm run db:start` and try again.');
  }
  res.json({ data: { status: 'ok', db: 'ok' } });
});
