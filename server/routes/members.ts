import { Router } from 'express';
import { memberRoleSchema } from '../../shared/schemas/club';
import { parseId } from '../http/errors';
import { clubAccess, clubOf } from '../middleware/authorize';
import { validate } from '../middleware/validate';
import { changeMemberRole, listMembers, removeMember } from '../services/clubs';

/** Members of a club and their roles. */
export const membersRouter = Router();

membersRouter.get('/clubs/:clubId/members', clubAccess('admin', 'coach'), async (req, res) => {
  const members = await listMembers(clubOf(req).id);
  res.json({ data: members, meta: { total: members.length } });
});

membersRouter.patch('/clubs/:clubId/members/:memberId', clubAccess('admin'), validate(memberRoleSchema), async (req, res) => {
  const memberId = parseId(req.params.memberId, 'member');
  res.json({ data: await changeMemberRole(clubOf(req).id, memberId, req.body.role) });
});

membersRouter.delete('/clubs/:clubId/members/:memberId', clubAccess('admin'), async (req, res) => {
  await removeMember(clubOf(req).id, parseId(req.params.memberId, 'member'));
  res.status(204).end();
});
