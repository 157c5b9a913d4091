/**
 * "E-mail me a sign-in link" for people who already belong to a campaign (an invited person with
 * no password, someone who forgot theirs). The answer never says whether the address is known: a
 * link is mailed only to a member, and every request gets the same answer. Requests are limited
 * per address and per client, so the form can neither flood a mailbox nor probe many addresses.
 */
import { eq, sql } from 'drizzle-orm';

import { memberships, user } from '../../db/schema';
import { INVITATION_LINK_SECONDS, windowCounter } from '../auth';
import type { AppContext } from '../context';
import { ApiError } from '../errors';
import { renderMail } from './mail-templates';
import { queueMail, type MailHandler } from './mail-queue';

/** Links asked for one address: a few in a quarter of an hour. */
const PER_ADDRESS = { window: 15 * 60, max: 3 };

export const SIGN_IN_LINK_ANSWER = {
  ok: true,
  message: 'If this address belongs to a member of a campaign, a sign-in link is on its way. It works once.',
} as const;

export function signInLinkRequests(ctx: AppContext) {
  const counter = windowCounter();
  const perClient = { window: 60, max: ctx.env.AUTH_RATE_LIMIT };
  return async (email: string, client: string, retryAfter: (seconds: number) => void): Promise<typeof SIGN_IN_LINK_ANSWER> => {
    const address = email.trim().toLowerCase();
    for (const [key, rule] of [
      [`client:${client}`, perClient],
      [`address:${address}`, PER_ADDRESS],
    ] as const) {
      const verdict = await counter.consume(key, rule);
      if (!verdict.allowed) {
        retryAfter(verdict.retryAfter ?? rule.window);
        throw new ApiError(429, 'rate_limited', 'Too many sign-in links asked for; wait a while and try again.');
      }
    }
    const member = ctx.db
      .select({ id: user.id, name: user.name, email: user.email })
      .from(user)
      .innerJoin(memberships, eq(memberships.userId, user.id))
      .where(sql`lower(${user.email}) = ${address}`)
      .get();
    if (member) {
      ctx.db.transaction((tx) =>
        queueMail(tx, {
          kind: 'sign-in-link',
          ref: member.id,
          to: member.email,
          toName: member.name,
          subject: 'Your Bathynote sign-in link',
          payload: {},
        }),
      );
      ctx.mail.kick();
    }
    return SIGN_IN_LINK_ANSWER;
  };
}

/** Makes the link when the mail goes out (better-auth's one-time link, kept hashed), for a person still a member. */
export function signInLinkMailHandler(ctx: AppContext): MailHandler {
  return async (row, send) => {
    const member = row.ref
      ? ctx.db
          .select({ email: user.email, name: user.name })
          .from(user)
          .innerJoin(memberships, eq(memberships.userId, user.id))
          .where(eq(user.id, row.ref))
          .get()
      : undefined;
    if (!member) return { cancel: 'The person is no longer a member of any campaign.' };
    const base = ctx.env.PUBLIC_URL;
    const expires = new Date(Date.now() + INVITATION_LINK_SECONDS * 1000).toISOString().slice(0, 16).replace('T', ' ');
    let delivered = false;
    await ctx.postbox.expect(
      member.email,
      'signin',
      async (url) => {
        await send({
          to: member.email,
          toName: member.name,
          ...renderMail('sign-in-link', row.subject, { greeting: ` ${member.name}`, url, expires }),
        });
        delivered = true;
      },
      () =>
        ctx.auth.api.signInMagicLink({
          body: { email: member.email, callbackURL: `${base}/`, errorCallbackURL: `${base}/invitation-problem` },
          headers: new Headers({ origin: base }),
        }),
    );
    if (!delivered) throw new Error('No sign-in link was made.');
  };
}
