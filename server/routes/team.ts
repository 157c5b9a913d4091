import { fromNodeHeaders } from 'better-auth/node';
import { Router, type RequestHandler } from 'express';
import { invitationSchema } from '../../lib/schemas';
import type { AppContext } from '../context';
import { forbidden } from '../errors';
import { accessOf, byCampaign, requireCampaignRole, type CampaignResolver } from '../middleware/campaign-access';
import { requireSession, userOf } from '../middleware/session';
import { getCampaign, listMembers } from '../services/campaigns';
import {
  acceptInvitation,
  changeRole,
  createCampaign,
  invitationCampaign,
  invite,
  listInvitations,
  removeMember,
  resendInvitation,
  revokeInvitation,
  updateCampaign,
} from '../services/team';

export function teamRoutes(ctx: AppContext): Router {
  const { db, auth } = ctx;
  const r = Router();
  const signedIn = requireSession(auth);
  const siteAdmin: RequestHandler = (req, _res, next) => {
    if (userOf(req).siteRole !== 'admin') throw forbidden('Only the site administrator may do this.');
    next();
  };
  const byInvitation: CampaignResolver = (_db, req) => invitationCampaign(ctx, req.params.invitationId as string);
  const lead = (resolve: CampaignResolver, action: string): RequestHandler[] => [
    signedIn,
    requireCampaignRole(db, resolve, ['lead'], action),
  ];
  const actor = (req: Parameters<RequestHandler>[0]) => ({ id: userOf(req).id, name: userOf(req).name });

  // The lead's invitation mail is queued with the campaign: `leadInvitation.mail` says where it is.
  r.post('/campaigns', signedIn, siteAdmin, (req, res) => {
    const { campaignId, leadInvitation } = createCampaign(ctx, actor(req), req.body);
    res
      .status(201)
      .location(`/api/campaigns/${campaignId}`)
      .json({ ...getCampaign(db, campaignId, 'admin')!, leadInvited: !!leadInvitation, leadInvitation });
  });

  r.patch('/campaigns/:campaignId', ...lead(byCampaign, 'change the campaign'), (req, res) => {
    const { campaignId, role } = accessOf(req);
    updateCampaign(ctx, campaignId, userOf(req).id, req.body);
    res.json(getCampaign(db, campaignId, role));
  });

  r.get('/campaigns/:campaignId/invitations', ...lead(byCampaign, 'see invitations'), (req, res) => {
    res.json(listInvitations(ctx, accessOf(req).campaignId));
  });

  r.post('/campaigns/:campaignId/invitations', ...lead(byCampaign, 'invite people'), (req, res) => {
    const invitation = invitationSchema.parse(invite(ctx, accessOf(req).campaignId, actor(req), req.body));
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

  r.patch('/campaigns/:campaignId/members/:userId', ...lead(byCampaign, 'change roles'), (req, res) => {
    const { campaignId } = accessOf(req);
    changeRole(ctx, campaignId, req.params.userId as string, userOf(req).id, req.body);
    res.json(listMembers(db, campaignId));
  });

  r.delete('/campaigns/:campaignId/members/:userId', ...lead(byCampaign, 'remove members'), (req, res) => {
    const { campaignId } = accessOf(req);
    removeMember(ctx, campaignId, req.params.userId as string, userOf(req).id);
    res.json(listMembers(db, campaignId));
  });

  return r;
}
