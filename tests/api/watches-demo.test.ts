/**
 * The demo's watch plan: a fresh demo shows who is on watch at any hour, and its first handover
 * note is the one at the next change of watch after seeding.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { handoverListSchema, watchPlanSchema } from '@/lib/schemas';
import { planIssues } from '@/lib/watches';
import { demoIds, emails } from '../helpers/demo';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: ReturnType<typeof demoIds>;

beforeAll(async () => {
  t = await startTestServer({ demoWatchPlan: true });
  // Only the ticks the test makes.
  t.ctx.handovers.stop();
  ids = demoIds(t.ctx.db);
});
afterAll(() => t.close());

describe('the demo’s watch plan', () => {
  it('covers the whole day with three teams of demo people, four hours on and eight off', async () => {
    const res = await (await t.signIn(emails.guest)).get(`/api/campaigns/${ids.campaign2026}/watches`);
    expect(res.status).toBe(200);
    const plan = watchPlanSchema.parse(res.body);
    expect(plan.timeZone).toBe('Europe/Lisbon');
    expect(plan.watches.map((w) => `${w.start}-${w.end}`)).toEqual([
      '00:00-04:00',
      '04:00-08:00',
      '08:00-12:00',
      '12:00-16:00',
      '16:00-20:00',
      '20:00-00:00',
    ]);
    expect(planIssues(plan.watches.map((w) => ({ ...w, memberIds: w.members.map((m) => m.id) })))).toEqual([]);
    // The same team stands the watch twelve hours on; the guest ashore stands none.
    const team = (i: number) => plan.watches[i]!.members.map((m) => m.name).join(', ');
    for (let i = 0; i < 3; i++) expect(team(i + 3)).toBe(team(i));
    expect(new Set([0, 1, 2].map(team)).size).toBe(3);
    const standers = new Set(plan.watches.flatMap((w) => w.members.map((m) => m.id)));
    expect(standers.has(ids.userId(emails.guest))).toBe(false);
    expect(standers.size).toBe(4);
    // Someone is on watch whatever the hour.
    expect(plan.onWatch).not.toBeNull();
    expect(plan.onWatch!.members.length).toBeGreaterThan(0);
    // The 2024 campaign is over and has no plan.
    const old = watchPlanSchema.parse((await (await t.signIn(emails.lead)).get(`/api/campaigns/${ids.campaign2024}/watches`)).body);
    expect(old.watches).toEqual([]);
  });

  it('writes no note for the changes before it was seeded, and one at the next change', async () => {
    const now = new Date();
    expect(t.ctx.handovers.tick(now)).toBe(0);
    const plan = watchPlanSchema.parse((await (await t.signIn(emails.lead)).get(`/api/campaigns/${ids.campaign2026}/watches`)).body);
    const next = new Date(plan.nextChangeAt!);
    expect(next.getTime() - now.getTime()).toBeLessThanOrEqual(5 * 3_600_000);
    expect(t.ctx.handovers.tick(next)).toBe(1);
    const list = handoverListSchema.parse((await (await t.signIn(emails.guest)).get(`/api/campaigns/${ids.campaign2026}/handovers`)).body);
    expect(list.items.map((h) => h.changeAt)).toEqual([next.toISOString()]);
    expect(list.items[0]!.incoming?.members.length).toBeGreaterThan(0);
  });
});
