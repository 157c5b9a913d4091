import type { z } from 'zod';
import { and, count, desc, eq, sql } from 'drizzle-orm';

import type { Executor } from '../../db/client';
import { campaigns, invitations, mailQueue, memberships, user } from '../../db/schema';
import {
  type campaignCreateSchema,
  type campaignUpdateSchema,
  type invitationCreateSchema,
  type memberUpdateSchema,
  type CampaignRole,
  type Invitation,
  type InvitationCreate,
} from '../../lib/schemas';
import { forgetInvitationLinks, INVITATION_LINK_SECONDS, invitationLinks } from '../auth';
import type { AppContext } from '../context';
import { ApiError, conflict } from '../errors';
import { audit } from './audit';
import { subscribeGuest } from './digests';
import { cancelQueuedMail, latestMailOf, queueMail, type MailHandler, type MailRow } from './mail-queue';
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

/** Guests ashore get a digest after each dive unless they turn it off. */
const GUEST_DIGEST_NOTE =
  'You will also get a digest mail after each dive, with the entries logged on it. Change it or turn it off on the campaign’s Digest screen, or with the unsubscribe link in any digest.';

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
  const mail = latestMailOf(
    ctx.db,
    rows.map((r) => r.inv.id),
  );
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
    mail: mail.get(inv.id) ?? null,
  }));
}

const invitationById = (ctx: AppContext, id: string) => ctx.db.select().from(invitations).where(eq(invitations.id, id)).get();

export function invitationCampaign(ctx: AppContext, id: string): string | undefined {
  return invitationById(ctx, id)?.campaignId;
}

/** The mail that carries an invitation; its sign-in link is made when it is sent. */
function queueInvitationMail(tx: Executor, row: InvitationRow, inviter: Actor, name: string | undefined) {
  const campaign = tx.select({ name: campaigns.name }).from(campaigns).where(eq(campaigns.id, row.campaignId)).get();
  queueMail(tx, {
    kind: 'invitation',
    ref: row.id,
    campaignId: row.campaignId,
    to: row.email,
    toName: name ?? null,
    subject: `${inviter.name} invites you to ${campaign?.name ?? 'a campaign'} in Bathynote`,
    payload: { inviter: inviter.name, ...(name ? { name } : {}) },
  });
}

/**
 * Sends a queued invitation mail: better-auth makes a one-time sign-in link (kept hashed) and the
 * postbox hands it to this mail. Following the link signs the person in and lands on the accept
 * route. The link is made only now, at sending, because better-auth's API cannot join the
 * transaction that queued the mail.
 */
export function invitationMailHandler(ctx: AppContext): MailHandler {
  return async (mailRow: MailRow, send) => {
    const row = mailRow.ref ? invitationById(ctx, mailRow.ref) : undefined;
    if (!row) return { cancel: 'The invitation no longer exists.' };
    if (row.status !== 'pending') return { cancel: `The invitation was ${row.status} before its mail went out.` };
    if (row.expiresAt <= new Date()) return { cancel: 'The invitation expired before its mail went out; resend it for a new link.' };
    const campaign = ctx.db.select({ name: campaigns.name }).from(campaigns).where(eq(campaigns.id, row.campaignId)).get();
    const { inviter, name } = mailRow.payload as { inviter: string; name?: string };
    const base = ctx.env.PUBLIC_URL;
    const callbackURL = `${base}/api/invitations/${row.id}/accept`;
    // A resend replaces the earlier link, once the new mail is out: only the newest mail's link
    // works, and a mail that could not be sent leaves the earlier one working.
    const earlier = invitationLinks(ctx.db, row.id);
    let delivered = false;
    try {
      await ctx.postbox.expect(
        row.email,
        row.id,
        async (url) => {
          const mail = renderMail('invitation', mailRow.subject, {
            greeting: name ? ` ${name}` : '',
            inviter,
            campaign: campaign?.name ?? 'the campaign',
            role: roleNames[row.role],
            roleHelp: roleHelp[row.role],
            digestNote: row.role === 'guest' ? GUEST_DIGEST_NOTE : null,
            url,
            expires: row.expiresAt.toISOString().slice(0, 16).replace('T', ' '),
          });
          await send({ to: row.email, toName: name, ...mail });
          delivered = true;
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
      if (!delivered) throw new Error('No sign-in link was made for the invitation.');
    } catch (err) {
      // The link made for this attempt reached nobody: drop it, keep the earlier ones.
      const made = invitationLinks(ctx.db, row.id).filter((k) => !earlier.includes(k));
      if (made.length > 0) forgetInvitationLinks(ctx.db, row.id, made);
      throw err;
    }
    ctx.db.transaction((tx) => {
      const now = tx.select({ status: invitations.status }).from(invitations).where(eq(invitations.id, row.id)).get();
      // Withdrawn while the mail was on its way: no link of it may work.
      if (now?.status === 'revoked') forgetInvitationLinks(ctx.db, row.id);
      else forgetInvitationLinks(ctx.db, row.id, earlier);
      tx.update(invitations).set({ sentAt: new Date() }).where(eq(invitations.id, row.id)).run();
    });
  };
}

/** Checks and writes an invitation with its mail, inside the caller's transaction. */
function openInvitation(tx: Executor, campaignId: string, inviter: Actor, input: InvitationCreate & { role: CampaignRole }): InvitationRow {
  const email = input.email.toLowerCase();
  const member = tx
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
  const open = tx
    .select()
    .from(invitations)
    .where(and(eq(invitations.campaignId, campaignId), eq(invitations.email, email), eq(invitations.status, 'pending')))
    .all()
    .find((i) => i.expiresAt > now);
  if (open) throw conflict('already_invited', `${email} already has an open invitation; resend it from the team list.`);
  const row = tx
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
  queueInvitationMail(tx, row, inviter, input.name);
  audit(tx, { campaignId, actorId: inviter.id, action: 'invitation.sent', target: row.id, detail: { email, role: input.role } });
  return row;
}

/**
 * Writes the invitation and queues its mail in one transaction: the invitation stands even while
 * the mail server is unreachable, and the answer's `mail` says where its mail is.
 */
export type InvitationInput = z.output<typeof invitationCreateSchema>;
export type CampaignCreateInput = z.output<typeof campaignCreateSchema>;
export type CampaignUpdateInput = z.output<typeof campaignUpdateSchema>;
export type MemberUpdateInput = z.output<typeof memberUpdateSchema>;

export function invite(ctx: AppContext, campaignId: string, inviter: Actor, input: InvitationInput): Invitation {
  const row = ctx.db.transaction((tx) => openInvitation(tx, campaignId, inviter, input));
  ctx.mail.kick();
  return listInvitations(ctx, campaignId).find((i) => i.id === row.id)!;
}

/**
 * A new link (and a new expiry) for an open or expired invitation, or a failed mail sent again.
 * The old link stops working once the new mail is out.
 */
export function resendInvitation(ctx: AppContext, id: string, inviter: Actor): Invitation {
  const row = invitationById(ctx, id);
  if (!row) throw new ApiError(404, 'not_found', 'Not found');
  if (row.status === 'accepted' || row.status === 'revoked')
    throw conflict(`invitation_${row.status}`, `This invitation was ${row.status}; send a new one instead.`);
  const expiresAt = new Date(Date.now() + INVITATION_LINK_SECONDS * 1000);
  ctx.db.transaction((tx) => {
    const name = invitationName(tx, id);
    tx.update(invitations).set({ expiresAt, status: 'pending' }).where(eq(invitations.id, id)).run();
    cancelQueuedMail(tx, id, 'Replaced by a newer mail.');
    queueInvitationMail(tx, { ...row, expiresAt, status: 'pending' }, inviter, name);
  });
  ctx.mail.kick();
  return listInvitations(ctx, row.campaignId).find((i) => i.id === id)!;
}

/** The name the first mail greeted the person with, kept for the mails sent again. */
function invitationName(tx: Executor, id: string): string | undefined {
  const first = tx.select({ payload: mailQueue.payload }).from(mailQueue).where(eq(mailQueue.ref, id)).orderBy(mailQueue.createdAt).get();
  const name = (first?.payload as { name?: unknown } | undefined)?.name;
  return typeof name === 'string' ? name : undefined;
}

export function revokeInvitation(ctx: AppContext, id: string, actorId: string): Invitation {
  const row = invitationById(ctx, id);
  if (!row) throw new ApiError(404, 'not_found', 'Not found');
  if (row.status === 'accepted') throw conflict('invitation_accepted', 'This invitation was already accepted; remove the member instead.');
  ctx.db.transaction((tx) => {
    tx.update(invitations).set({ status: 'revoked' }).where(eq(invitations.id, id)).run();
    cancelQueuedMail(tx, id, 'The invitation was withdrawn.');
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
    // Guests ashore follow the campaign through the digest: after each dive unless they change it.
    if (row.role === 'guest') subscribeGuest(tx, row.campaignId, signedIn.id);
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
export function changeRole(ctx: AppContext, campaignId: string, userId: string, actorId: string, { role }: MemberUpdateInput) {
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
 * as lead at once, anyone else is invited by mail. The campaign, the lead's invitation and its
 * mail are one transaction, so a campaign is never left without its lead's invitation.
 */
export function createCampaign(
  ctx: AppContext,
  admin: Actor,
  { leadEmail, leadName, ...fields }: CampaignCreateInput,
): { campaignId: string; leadInvitation: Invitation | null } {
  const email = leadEmail.toLowerCase();
  const { campaignId, invited } = ctx.db.transaction((tx) => {
    const existing = tx
      .select({ id: user.id })
      .from(user)
      .where(sql`lower(${user.email}) = ${email}`)
      .get();
    const campaign = tx.insert(campaigns).values(fields).returning().get();
    audit(tx, {
      campaignId: campaign.id,
      actorId: admin.id,
      action: 'campaign.created',
      target: campaign.id,
      detail: { leadEmail: email },
    });
    if (existing) {
      tx.insert(memberships).values({ campaignId: campaign.id, userId: existing.id, role: 'lead' }).run();
      return { campaignId: campaign.id, invited: null };
    }
    const invitation = openInvitation(tx, campaign.id, admin, { email, role: 'lead', ...(leadName ? { name: leadName } : {}) });
    return { campaignId: campaign.id, invited: invitation.id };
  });
  if (!invited) return { campaignId, leadInvitation: null };
  ctx.mail.kick();
  return { campaignId, leadInvitation: listInvitations(ctx, campaignId).find((i) => i.id === invited)! };
}

export function updateCampaign(ctx: AppContext, campaignId: string, actorId: string, input: CampaignUpdateInput) {
  ctx.db
    .update(campaigns)
    .set({ ...input, updatedAt: new Date() })
    .where(eq(campaigns.id, campaignId))
    .run();
  audit(ctx.db, { campaignId, actorId, action: 'campaign.updated', target: campaignId, detail: input });
}
