import { fromNodeHeaders } from 'better-auth/node';
import { Router, type RequestHandler } from 'express';
import { invitationCreateSchema, invitationSchema, memberUpdateSchema } from '../../lib/schemas';
import type { AppContext } from '../context';
import { accessOf, byCampaign, requireCampaignRole, type CampaignResolver } from '../middleware/campaign-access';
import { requireSession, userOf } from '../middleware/session';
import { validate } from '../middleware/validate';
import { listMembers } from '../services/campaigns';
import {
  acceptInvitation,
  changeRole,
  invitationCampaign,
  invite,
  listInvitations,
  removeMember,
  resendInvitation,
  revokeInvitation,
} from '../services/team';

export function teamRoutes(ctx: AppContext): Router {
  const { db, auth } = ctx;
  const r = Router();
  const signedIn = requireSession(auth);
  const byInvitation: CampaignResolver = (_db, req) => invitationCampaign(ctx, req.params.invitationId as string);
  const lead = (resolve: CampaignResolver, action: string): RequestHandler[] => [
    signedIn,
    requireCampaignRole(db, resolve, ['lead'], action),
  ];
  const actor = (req: Parameters<RequestHandler>[0]) => ({ id: userOf(req).id, name: userOf(req).name });
  const newInvitation = validate(invitationCreateSchema);
  const roleChange = validate(memberUpdateSchema);

  r.get('/campaigns/:campaignId/invitations', ...lead(byCampaign, 'see invitations'), (req, res) => {
    res.json(listInvitations(ctx, accessOf(req).campaignId));
  });

  r.post('/campaigns/:campaignId/invitations', ...lead(byCampaign, 'invite people'), newInvitation, (req, res) => {
    const invitation = invitationSchema.parse(invite(ctx, accessOf(req).campaignId, actor(req), newInvitation.of(req)));
    res.status(201).json(invitation);
  });

  // Also "send again" for an invitation whose mail failed.
  r.post('/invitations/:invitationId/resend', ...lead(byInvitation, 'resend invitations'), (req, res) => {
    res.json(resendInvitation(ctx, req.params.invitationId as string, actor(req)));
  });

  r.delete('/invitations/:invitationId', ...lead(byInvitation, 'revoke invitations'), (req, res) => {
    res.json(revokeInvitation(ctx, req.params.invitationId as string, userOf(req).id));
  });

  // A browser lands here from the invitation mail, so the answers are pages, not JSON.
  r.get('/invitations/:invitationId/accept', async (req, res) => {
    const session = await auth.api.getSession({ headers: fromNodeHeaders(req.headers) });
    const problem = (reason: string) => res.redirect(303, `/invitation-problem?reason=${encodeURIComponent(reason)}`);
    if (!session) return problem('signed-out');
    const result = acceptInvitation(ctx, req.params.invitationId, { id: session.user.id, email: session.user.email });
    if ('problem' in result) return problem(result.problem);
    res.redirect(303, `/campaigns/${result.campaignId}?welcome=1`);
  });

  r.patch('/campaigns/:campaignId/members/:userId', ...lead(byCampaign, 'change roles'), roleChange, (req, res) => {
    const { campaignId } = accessOf(req);
    changeRole(ctx, campaignId, req.params.userId as string, userOf(req).id, roleChange.of(req));
    res.json(listMembers(db, campaignId));
  });

  r.delete('/campaigns/:campaignId/members/:userId', ...lead(byCampaign, 'remove members'), (req, res) => {
    const { campaignId } = accessOf(req);
    removeMember(ctx, campaignId, req.params.userId as string, userOf(req).id);
    res.json(listMembers(db, campaignId));
  });

  return r;
}
