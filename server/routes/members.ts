import { Router } from 'express';
import { memberRoleSchema } from '../../shared/schemas/club';
import { paginationQuerySchema } from '../../shared/schemas/pagination';
import { parseId } from '../http/errors';
import { clubAccess, clubOf } from '../middleware/authorize';
import { validate, validationError } from '../middleware/validate';
import { changeMemberRole, listMembers, removeMember } from '../services/clubs';

/** Members of a club and their roles. */
export const membersRouter = Router();

membersRouter.get('/clubs/:clubId/members', clubAccess('admin', 'coach'), async (req, res) => {
  const query = paginationQuerySchema.safeParse(req.query);
  if (!query.success) throw validationError(query.error);
  res.json(await listMembers(clubOf(req).id, query.data));
});

membersRouter.patch('/clubs/:clubId/members/:memberId', clubAccess('admin'), validate(memberRoleSchema), async (req, res) => {
  const memberId = parseId(req.params.memberId, 'member');
  res.json({ data: await changeMemberRole(clubOf(req).id, memberId, req.body.role) });
});

membersRouter.delete('/clubs/:clubId/members/:memberId', clubAccess('admin'), async (req, res) => {
  await removeMember(clubOf(req).id, parseId(req.params.memberId, 'member'));
  res.status(204).end();
});
