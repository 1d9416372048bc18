import { Router } from 'express';
import { jobListQuerySchema } from '../../shared/schemas/clip';
import { parseId } from '../http/errors';
import { clubAccess, clubOf } from '../middleware/authorize';
import { validationError } from '../middleware/validate';
import { getJob, listJobs, retryJob } from '../services/jobs';

/** Job progress and retry: admins and coaches (athletes start no jobs). */
export const jobsRouter = Router();

jobsRouter.get('/clubs/:clubId/jobs', clubAccess('admin', 'coach'), async (req, res) => {
  const query = jobListQuerySchema.safeParse(req.query);
  if (!query.success) throw validationError(query.error);
  const jobs = await listJobs(clubOf(req), query.data);
  res.json({ data: jobs, meta: { total: jobs.length } });
});

jobsRouter.get('/clubs/:clubId/jobs/:jobId', clubAccess('admin', 'coach'), async (req, res) => {
  res.setHeader('Cache-Control', 'no-store');
  res.json({ data: await getJob(clubOf(req), parseId(req.params.jobId, 'job')) });
});

jobsRouter.post('/clubs/:clubId/jobs/:jobId/retry', clubAccess('admin', 'coach'), async (req, res) => {
  res.status(202).json({ data: await retryJob(clubOf(req), parseId(req.params.jobId, 'job')) });
});
