/** Digest mails: a member's subscription to a campaign's digest, and the digests a lead sees sent. */
import { z } from 'zod';

import { mailStatusSchema } from './mail';
import { observationKinds } from './core';

export const digestFrequencies = ['off', 'after-each-dive', 'daily'] as const;
export type DigestFrequency = (typeof digestFrequencies)[number];

/** What started a digest: a dive on deck, the daily 07:00 in the campaign's zone, or a lead. */
export const digestTriggers = ['after-dive', 'daily', 'manual'] as const;
export type DigestTrigger = (typeof digestTriggers)[number];
