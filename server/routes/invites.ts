import { Router } from 'express';
import { IdParam } from './params';
import { AcceptInvite, CreateInvite, Invite, InviteAccepted, InviteList, InvitePreview, InviteToken } from '../../src/contracts/invites';
import { allow, currentUser, open } from '../middleware/auth';
import { acceptInvite, createInvite, listInvites, previewInvite, revokeInvite } from '../services/invites';
import type { AppContext } from '../context';

export function invitesRouter(ctx: AppContext): Router {
  const router = Router();
  router.get('/', allow('people.manage'), async (req, res) => {
    res.json(InviteList.parse(await listInvites(ctx, currentUser(req))));
  });
  router.post('/', allow('people.manage'), async (req, res) => {
    res.status(201).json(Invite.parse(await createInvite(ctx, currentUser(req), CreateInvite.parse(req.body))));
  });
  router.delete('/:id', allow('people.manage'), async (req, res) => {
    await revokeInvite(ctx, currentUser(req), IdParam.parse(req.params).id);
    res.status(204).end();
  });
  // Open: the invited person has no account yet; the link's token (in the body, kept out of logs) is the key.
  router.post('/preview', open, async (req, res) => {
    res.json(InvitePreview.parse(await previewInvite(ctx, InviteToken.parse(req.body).token)));
  });
  router.post('/accept', open, async (req, res) => {
    res.status(201).json(InviteAccepted.parse(await acceptInvite(ctx, AcceptInvite.parse(req.body))));
  });
  return router;
}
