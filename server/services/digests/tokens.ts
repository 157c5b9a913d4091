import { createHmac, timingSafeEqual } from 'node:crypto';

/**
 * The signed link that turns one subscription's digest off without signing in (RFC 8058 one-click).
 * It names the campaign, the person and the subscription's current nonce, signed with the server's
 * secret; unsubscribing draws a new nonce, so a link works once and an older digest's link no longer
 * does after the person subscribes again.
 */
export type UnsubscribeClaim = { campaignId: string; userId: string; nonce: string };

const mac = (secret: string, body: string) => createHmac('sha256', secret).update(`bathynote-unsubscribe:${body}`).digest('base64url');

export function unsubscribeToken(secret: string, claim: UnsubscribeClaim): string {
  const body = Buffer.from(JSON.stringify([claim.campaignId, claim.userId, claim.nonce])).toString('base64url');
  return `${body}.${mac(secret, body)}`;
}

/** The claim of a token whose signature holds, or null for a forged, altered or malformed one. */
export function readUnsubscribeToken(secret: string, token: string): UnsubscribeClaim | null {
  const [body, signature, ...rest] = token.split('.');
  if (!body || !signature || rest.length > 0) return null;
  const expected = Buffer.from(mac(secret, body));
  const given = Buffer.from(signature);
  if (expected.length !== given.length || !timingSafeEqual(expected, given)) return null;
  try {
    const value: unknown = JSON.parse(Buffer.from(body, 'base64url').toString('utf8'));
    if (!Array.isArray(value) || value.length !== 3 || !value.every((v) => typeof v === 'string' && v.length > 0)) return null;
    const [campaignId, userId, nonce] = value as [string, string, string];
    return { campaignId, userId, nonce };
  } catch {
    // The signature held but the body is not ours: refuse it like a forged one.
    return null;
  }
}
