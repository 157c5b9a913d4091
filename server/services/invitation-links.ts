import { eq } from 'drizzle-orm';

import type { Db } from '../../db/client';
import { invitations } from '../../db/schema';
import { invitationLinks, storedLinkKey } from '../auth';

/** The problem page's reasons for an invitation link that no longer signs anyone in. */
export type RefusedLinkReason = 'used' | 'revoked' | 'expired' | 'replaced';

/**
 * Why the sign-in service refused an invitation's link, told from the invitation its token names
 * (tokens start with the invitation's id): accepted (the link was used), revoked, expired, or
 * still open with a newer mail's link in its place. Undefined when the token names no invitation
 * or is still stored (the refusal was about something else).
 */
export function refusedLinkReason(db: Db, token: string): RefusedLinkReason | undefined {
  const dot = token.indexOf('.');
  if (dot <= 0) return undefined;
  const id = token.slice(0, dot);
  const row = db
    .select({ status: invitations.status, expiresAt: invitations.expiresAt })
    .from(invitations)
    .where(eq(invitations.id, id))
    .get();
  if (!row) return undefined;
  if (row.status === 'accepted') return 'used';
  if (row.status === 'revoked') return 'revoked';
  if (row.status === 'expired' || row.expiresAt <= new Date()) return 'expired';
  const links = invitationLinks(db, id);
  if (links.includes(`magic-link:${storedLinkKey(token)}`)) return undefined;
  // Still open, and this link gone: a newer mail's link replaced it, or it was opened once already.
  return links.length > 0 ? 'replaced' : 'used';
}
