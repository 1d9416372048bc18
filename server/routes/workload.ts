import { Router } from 'express';
import { workloadEntryInputSchema, workloadQuerySchema, workloadThresholdsBodySchema } from '../../shared/schemas/workload';
import { parseId } from '../http/errors';
import { ANY_ROLE, clubAccess, clubOf } from '../middleware/authorize';
import { validate, validationError } from '../middleware/validate';
import { athleteWorkload, clubCautions, createEntry, deleteEntry, listThresholds, replaceThresholds } from '../services/workload';

/**
 * Workload counts and cautions. Staff read every athlete's; an athlete reads only their own (others 404).
 * Coaches and admins enter unfilmed reps; the caution thresholds are the admin's to set.
 */
export const workloadRouter = Router();

workloadRouter.get('/clubs/:clubId/athletes/:athleteId/workload', clubAccess(...ANY_ROLE), async (req, res) => {
  const query = workloadQuerySchema.safeParse(req.query);
  if (!query.success) throw validationError(query.error);
  res.json({ data: await athleteWorkload(clubOf(req), parseId(req.params.athleteId, 'athlete'), query.data.weeks) });
});

workloadRouter.get('/clubs/:clubId/workload/cautions', clubAccess('admin', 'coach'), async (req, res) => {
  res.json({ data: await clubCautions(clubOf(req).id) });
});

workloadRouter.post('/clubs/:clubId/workload-entries', clubAccess('admin', 'coach'), validate(workloadEntryInputSchema), async (req, res) => {
  res.status(201).json({ data: await createEntry(clubOf(req), req.user!.id, req.body) });
});

workloadRouter.delete('/clubs/:clubId/workload-entries/:entryId', clubAccess('admin', 'coach'), async (req, res) => {
  await deleteEntry(clubOf(req), parseId(req.params.entryId, 'workload entry'));
  res.status(204).end();
});

workloadRouter.get('/clubs/:clubId/workload-thresholds', clubAccess('admin', 'coach'), async (req, res) => {
  res.json({ data: await listThresholds(clubOf(req).id) });
});

workloadRouter.put('/clubs/:clubId/workload-thresholds', clubAccess('admin'), validate(workloadThresholdsBodySchema), async (req, res) => {
  res.json({ data: await replaceThresholds(clubOf(req), req.body.thresholds) });
});
