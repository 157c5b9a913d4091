import { and, eq } from 'drizzle-orm';

import type { Db } from '@/db/client';
import { campaigns, dives, user } from '@/db/schema';

export const emails = {
  admin: 'admin@bathynote.test',
  lead: 'lead@bathynote.test',
  archaeologist: 'archaeologist@bathynote.test',
  biologist: 'biologist@bathynote.test',
  pilot: 'pilot@bathynote.test',
  guest: 'guest@bathynote.test',
  outsider: 'outsider@bathynote.test',
} as const;

export function demoIds(db: Db) {
  const c2026 = db.select().from(campaigns).where(eq(campaigns.name, 'Varn Shoal 2026')).get()!;
  const c2024 = db.select().from(campaigns).where(eq(campaigns.name, 'Varn Shoal 2024')).get()!;
  const dive = (campaignId: string, number: string) =>
    db
      .select()
      .from(dives)
      .where(and(eq(dives.campaignId, campaignId), eq(dives.number, number)))
      .get()!;
  const userId = (email: string) => db.select().from(user).where(eq(user.email, email)).get()!.id;
  return {
    campaign2026: c2026.id,
    campaign2024: c2024.id,
    dive2026: dive(c2026.id, 'VS-02').id,
    dive2024: dive(c2024.id, 'VS24-01').id,
    userId,
  };
}
