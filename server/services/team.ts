import { and, count, desc, eq, sql } from 'drizzle-orm';

import { campaigns, invitations, memberships, user } from '../../db/schema';
import {
  campaignCreateSchema,
  campaignUpdateSchema,
  invitationCreateSchema,
  memberUpdateSchema,
  type CampaignRole,
  type Invitation,
} from '../../lib/schemas';
import { forgetInvitationLinks, INVITATION_LINK_SECONDS, invitationLinks } from '../auth';
import type { AppContext } from '../context';
import { ApiError, conflict } from '../errors';
import { audit } from './audit';
import { renderMail } from './mail-templates';

type InvitationRow = typeof invitations.$inferSelect;
type Actor = { id: string; name: string };

const roleNames: Record<CampaignRole, string> = { lead: 'a lead', scientist: 'a scientist', pilot: 'a pilot', guest: 'a guest scientist' };
const roleHelp: Record<CampaignRole, string> = {
  lead: 'As a lead you run the campaign in Bathynote: its team, tags, dives and every entry.',
  scientist: 'As a scientist you log and edit your own entries, propose and verify identifications, and add photos.',
  pilot: 'As a pilot you plan and run dives, mark their phases, upload the telemetry log and log operations.',
  guest: 'As a guest you read the whole campaign, follow dives as they happen and add your own annotations.',
};

function statusOf(row: InvitationRow, now = new Date()): Invitation['status'] {
  return row.status === 'pending' && row.expiresAt <= now ? 'expired' : row.status;
}

export function listInvitations(ctx: AppContext, campaignId: string): Invitation[] {
  const rows = ctx.db
    .select({ inv: invitations, by: user.name })
    .from(invitations)
    .innerJoin(user, eq(user.id, invitations.invitedBy))
    .where(eq(invitations.campaignId, campaignId))
    .orderBy(desc(invitations.createdAt))
    .all();
  return rows.map(({ inv, by }) => ({
    id: inv.id,
    campaignId: inv.campaignId,
    email: inv.email,
    role: inv.role,
    status: statusOf(inv),
    invitedByName: by,
    createdAt: inv.createdAt.toISOString(),
    expiresAt: inv.expiresAt.toISOString(),
    sentAt: inv.sentAt ? inv.sentAt.toISOString() : null,
    acceptedAt: inv.acceptedAt ? inv.acceptedAt.toISOString() : null,
  }));
}

const invitationById = (ctx: AppContext, id: string) => ctx.db.select().from(invitations).where(eq(invitations.id, id)).get();

export function invitationCampaign(ctx: AppContext, id: string): string | undefined {
  return invitationById(ctx, id)?.campaignId;
}

/**
 * Mails the invitation: better-auth makes a one-time sign-in link (kept hashed) and the postbox
 * hands it to our own mail. Following the link signs the person in and lands on the accept route.
 */
async function sendInvitation(ctx: AppContext, row: InvitationRow, inviter: Actor, name?: string) {
  const campaign = ctx.db.select({ name: campaigns.name }).from(campaigns).where(eq(campaigns.id, row.campaignId)).get();
  const base = ctx.env.PUBLIC_URL;
  const callbackURL = `${base}/api/invitations/${row.id}/accept`;
  // A resend replaces the earlier link, once the new mail is out: only the newest mail's link
  // works, and a mail that could not be sent leaves the earlier one working.
  const earlier = invitationLinks(ctx.db, row.id);
  await ctx.postbox.expect(
    row.email,
    row.id,
    async (url) => {
      const mail = renderMail('invitation', `${inviter.name} invites you to ${campaign?.name ?? 'a campaign'} in Bathynote`, {
        greeting: name ? ` ${name}` : '',
        inviter: inviter.name,
        campaign: campaign?.name ?? 'the campaign',
        role: roleNames[row.role],
        roleHelp: roleHelp[row.role],
        url,
        expires: row.expiresAt.toISOString().slice(0, 16).replace('T', ' '),
      });
      await ctx.mailer.send({ to: row.email, toName: name, ...mail });
    },
    () =>
      ctx.auth.api.signInMagicLink({
        body: {
          email: row.email,
          ...(name ? { name } : {}),
          callbackURL,
          newUserCallbackURL: callbackURL,
          errorCallbackURL: `${base}/invitation-problem`,
        },
        headers: new Headers({ origin: base }),
      }),
  );
  forgetInvitationLinks(ctx.db, row.id, earlier);
  ctx.db.update(invitations).set({ sentAt: new Date() }).where(eq(invitations.id, row.id)).run();
}

export async function invite(ctx: AppContext, campaignId: string, inviter: Actor, body: unknown): Promise<Invitation> {
  const input = invitationCreateSchema.parse(body);
  const email = input.email.toLowerCase();
  const member = ctx.db
    .select({ role: memberships.role })
    .from(memberships)
    .innerJoin(user, eq(user.id, memberships.userId))
    .where(and(eq(memberships.campaignId, campaignId), sql`lower(${user.email}) = ${email}`))
    .get();
  if (member)
    throw conflict(
      'already_member',
      `${email} is already a member of this campaign (${member.role}). Change their role on the team list instead.`,
    );
  const now = new Date();
  const open = ctx.db
    .select()
    .from(invitations)
    .where(and(eq(invitations.campaignId, campaignId), eq(invitations.email, email), eq(invitations.status, 'pending')))
    .all()
    .find((i) => i.expiresAt > now);
  if (open) throw conflict('already_invited', `${email} already has an open invitation; resend it from the team list.`);
  const row = ctx.db
    .insert(invitations)
    .values({
      campaignId,
      email,
      role: input.role,
      invitedBy: inviter.id,
      createdAt: now,
      expiresAt: new Date(now.getTime() + INVITATION_LINK_SECONDS * 1000),
    })
    .returning()
    .get();
  await sendInvitation(ctx, row, inviter, input.name);
  audit(ctx.db, { campaignId, actorId: inviter.id, action: 'invitation.sent', target: row.id, detail: { email, role: input.role } });
  return listInvitations(ctx, campaignId).find((i) => i.id === row.id)!;
}

/** A new link (and a new expiry) for an open or expired invitation; the old link stops working. */
export async function resendInvitation(ctx: AppContext, id: string, inviter: Actor): Promise<Invitation> {
  const row = invitationById(ctx, id);
  if (!row) throw new ApiError(404, 'not_found', 'Not found');
  if (row.status === 'accepted' || row.status === 'revoked')
    throw conflict(`invitation_${row.status}`, `This invitation was ${row.status}; send a new one instead.`);
  const expiresAt = new Date(Date.now() + INVITATION_LINK_SECONDS * 1000);
  ctx.db.update(invitations).set({ expiresAt, status: 'pending' }).where(eq(invitations.id, id)).run();
  await sendInvitation(ctx, { ...row, expiresAt, status: 'pending' }, inviter);
  return listInvitations(ctx, row.campaignId).find((i) => i.id === id)!;
}

export function revokeInvitation(ctx: AppContext, id: string, actorId: string): Invitation {
  const row = invitationById(ctx, id);
  if (!row) throw new ApiError(404, 'not_found', 'Not found');
  if (row.status === 'accepted') throw conflict('invitation_accepted', 'This invitation was already accepted; remove the member instead.');
  ctx.db.transaction(() => {
    ctx.db.update(invitations).set({ status: 'revoked' }).where(eq(invitations.id, id)).run();
    forgetInvitationLinks(ctx.db, id);
  });
  audit(ctx.db, { campaignId: row.campaignId, actorId, action: 'invitation.revoked', target: id });
  return listInvitations(ctx, row.campaignId).find((i) => i.id === id)!;
}

/**
 * Where an invitation's link lands once better-auth has signed the person in: joins the campaign
 * with the invited role, if the invitation is still open and meant for this address.
 */
export function acceptInvitation(
  ctx: AppContext,
  id: string,
  signedIn: { id: string; email: string },
): { campaignId: string } | { problem: string } {
  const row = invitationById(ctx, id);
  if (!row || row.email !== signedIn.email.toLowerCase()) return { problem: 'not-yours' };
  if (row.status === 'accepted') return row.acceptedBy === signedIn.id ? { campaignId: row.campaignId } : { problem: 'used' };
  if (row.status === 'revoked') return { problem: 'revoked' };
  if (statusOf(row) === 'expired') return { problem: 'expired' };
  ctx.db.transaction((tx) => {
    tx.insert(memberships)
      .values({ campaignId: row.campaignId, userId: signedIn.id, role: row.role })
      .onConflictDoUpdate({ target: [memberships.campaignId, memberships.userId], set: { role: row.role } })
      .run();
    tx.update(invitations).set({ status: 'accepted', acceptedAt: new Date(), acceptedBy: signedIn.id }).where(eq(invitations.id, id)).run();
    tx.update(user).set({ emailVerified: true }).where(eq(user.id, signedIn.id)).run();
    audit(tx, { campaignId: row.campaignId, actorId: signedIn.id, action: 'invitation.accepted', target: id, detail: { role: row.role } });
  });
  ctx.live.membershipChanged(row.campaignId, signedIn.id);
  return { campaignId: row.campaignId };
}

function leadCount(ctx: AppContext, campaignId: string): number {
  return (
    ctx.db
      .select({ n: count() })
      .from(memberships)
      .where(and(eq(memberships.campaignId, campaignId), eq(memberships.role, 'lead')))
      .get()?.n ?? 0
  );
}

function membership(ctx: AppContext, campaignId: string, userId: string) {
  const row = ctx.db
    .select()
    .from(memberships)
    .where(and(eq(memberships.campaignId, campaignId), eq(memberships.userId, userId)))
    .get();
  if (!row) throw new ApiError(404, 'not_found', 'Not found');
  return row;
}

/** A campaign always keeps at least one lead. */
export function changeRole(ctx: AppContext, campaignId: string, userId: string, actorId: string, body: unknown) {
  const { role } = memberUpdateSchema.parse(body);
  const current = membership(ctx, campaignId, userId);
  if (current.role === 'lead' && role !== 'lead' && leadCount(ctx, campaignId) <= 1) {
    throw conflict('last_lead', 'A campaign keeps at least one lead: make someone else lead first.');
  }
  ctx.db
    .update(memberships)
    .set({ role })
    .where(and(eq(memberships.campaignId, campaignId), eq(memberships.userId, userId)))
    .run();
  audit(ctx.db, { campaignId, actorId, action: 'member.role', target: userId, detail: { from: current.role, to: role } });
  ctx.live.membershipChanged(campaignId, userId);
}

export function removeMember(ctx: AppContext, campaignId: string, userId: string, actorId: string) {
  const current = membership(ctx, campaignId, userId);
  if (current.role === 'lead' && leadCount(ctx, campaignId) <= 1) {
    throw conflict('last_lead', 'A campaign keeps at least one lead: make someone else lead first.');
  }
  ctx.db
    .delete(memberships)
    .where(and(eq(memberships.campaignId, campaignId), eq(memberships.userId, userId)))
    .run();
  audit(ctx.db, { campaignId, actorId, action: 'member.removed', target: userId, detail: { role: current.role } });
  ctx.live.membershipChanged(campaignId, userId);
}

/**
 * The site administrator creates a campaign and names its first lead: an existing account joins
 * as lead at once, anyone else is invited by mail.
 */
export async function createCampaign(ctx: AppContext, admin: Actor, body: unknown): Promise<{ campaignId: string; leadInvited: boolean }> {
  const { leadEmail, leadName, ...fields } = campaignCreateSchema.parse(body);
  const email = leadEmail.toLowerCase();
  const existing = ctx.db
    .select({ id: user.id })
    .from(user)
    .where(sql`lower(${user.email}) = ${email}`)
    .get();
  const campaign = ctx.db.insert(campaigns).values(fields).returning().get();
  audit(ctx.db, {
    campaignId: campaign.id,
    actorId: admin.id,
    action: 'campaign.created',
    target: campaign.id,
    detail: { leadEmail: email },
  });
  if (existing) {
    ctx.db.insert(memberships).values({ campaignId: campaign.id, userId: existing.id, role: 'lead' }).run();
    return { campaignId: campaign.id, leadInvited: false };
  }
  await invite(ctx, campaign.id, admin, { email, role: 'lead', ...(leadName ? { name: leadName } : {}) });
  return { campaignId: campaign.id, leadInvited: true };
}

export function updateCampaign(ctx: AppContext, campaignId: string, actorId: string, body: unknown) {
  const input = campaignUpdateSchema.parse(body);
  ctx.db
    .update(campaigns)
    .set({ ...input, updatedAt: new Date() })
    .where(eq(campaigns.id, campaignId))
    .run();
  audit(ctx.db, { campaignId, actorId, action: 'campaign.updated', target: campaignId, detail: input });
}
