import { Router, type Request } from 'express';
import {
  invitationAcceptSchema,
  invitationCreateSchema,
} from '../../shared/schemas/invitation';
import { logIn } from '../auth/login';
import { ApiError, parseId } from '../http/errors';
import { clubAccess, clubOf, publicRoute } from '../middleware/authorize';
import { validate } from '../middleware/validate';
import { loadMe } from '../services/auth';
import { acceptInvitation, createInvitation, listInvitations, previewInvitation, resendInvitation, revokeInvitation } from '../services/invitations';

/** Invitations of a club, for its admins. */
export const invitationsRouter = Router();

/** The public side of an invitation link: what it offers, and accepting it. */
export const invitationLinksRouter = Router();

/** The admin calling (clubAccess has made sure someone is signed in). */
function signedInUser(req: Request): Express.User {
  return req.user as Express.User;
}

invitationsRouter.get('/clubs/:clubId/invitations', clubAccess('admin'), async (req, res) => {
  const invitations = await listInvitations(clubOf(req).id);
  res.json({ data: invitations, meta: { total: invitations.length } });
});

invitationsRouter.post('/clubs/:clubId/invitations', clubAccess('admin'), validate(invitationCreateSchema), async (req, res) => {
  res.status(201).json({ data: await createInvitation(clubOf(req).id, signedInUser(req), req.body) });
});

invitationsRouter.post('/clubs/:clubId/invitations/:invitationId/resend', clubAccess('admin'), async (req, res) => {
  const invitationId = parseId(req.params.invitationId, 'invitation');
  res.json({ data: await resendInvitation(clubOf(req).id, invitationId, signedInUser(req)) });
});

invitationsRouter.post('/clubs/:clubId/invitations/:invitationId/revoke', clubAccess('admin'), async (req, res) => {
  const invitationId = parseId(req.params.invitationId, 'invitation');
  res.json({ data: await revokeInvitation(clubOf(req).id, invitationId) });
});

// The token is the credential here: anyone holding the link may read what it offers and accept it.
invitationLinksRouter.get('/invitations/:token', publicRoute, async (req, res) => {
  res.json({ data: await previewInvitation(String(req.params.token), req.user) });
});

invitationLinksRouter.post('/invitations/:token/accept', publicRoute, validate(invitationAcceptSchema), async (req, res) => {
  const { accepted, newUser } = await acceptInvitation(String(req.params.token), req.body, req.user);
  if (newUser) await logIn(req, newUser);
  const userId = newUser?.id ?? req.user?.id;
  const me = userId === undefined ? null : await loadMe(userId);
  if (!me) throw new ApiError('UNAUTHENTICATED', 'Your account could not be found; sign in again.');
  res.json({ data: { ...accepted, me } });
});
