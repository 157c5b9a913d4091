/** Digest mails: subscriptions, the composer, queueing with the mail, the daily schedule. */
export { composeDigest, describeFilters, DIGEST_MAX_BYTES, newComposeCache } from './compose';
export { createDigestScheduler, type DigestScheduler } from './scheduler';
export { dailySlot } from './schedule';
export { digestMailHandler, listDigests, queueDigests, type DigestDeps } from './send';
export { getSubscription, putSubscription, subscribeGuest, unsubscribe } from './subscriptions';
export { readUnsubscribeToken, unsubscribeToken } from './tokens';
