import { eq } from 'drizzle-orm';

import type { Db } from '@/db/client';
import { campaigns, dives, memberships, tags, user } from '@/db/schema';
import type { CampaignRole, ObservationCreate } from '@/lib/schemas';
import { emails } from './demo';
import type { TestServer } from './test-server';

/**
 * The tests' own campaigns, dives and entries, built beside whatever the demo holds so that the
 * demo can change freely. Only the demo's sign-ins are used (they are part of the contract): the
 * people below take the same roles here as there.
 */
export type Fixtures = {
  /** The lead, both scientists, the pilot and the guest are members. */
  campaign: string;
  campaignName: string;
  /** A dive of `campaign` with its four phases and `fixtureEntries.length` entries. */
  dive: string;
  /** A second campaign: the lead, both scientists and the pilot; the guest is not a member. */
  otherCampaign: string;
  otherDive: string;
  userId: (email: string) => string;
};

/** The phases of the fixture dives (UTC). */
export const fixtureDivePhases = {
  launch: new Date('2026-05-13T17:40:00.000Z'),
  onBottom: new Date('2026-05-13T18:08:00.000Z'),
  offBottom: new Date('2026-05-13T22:40:00.000Z'),
  onDeck: new Date('2026-05-13T23:05:00.000Z'),
};

export const fixtureVocabulary = ['microbial-mat', 'coral', 'sponge', 'fish', 'amphora', 'hull', 'cargo', 'sample', 'current', 'mosaic'];

type Entry = { by: keyof typeof emails; body: ObservationCreate; identification?: string };
const entry = (
  by: Entry['by'],
  kind: ObservationCreate['kind'],
  title: string,
  minute: number,
  entryTags: string[],
  depth?: number,
): Entry => ({
  by,
  body: {
    kind,
    title,
    observedAt: new Date(fixtureDivePhases.onBottom.getTime() + minute * 60_000).toISOString(),
    tags: entryTags,
    ...(depth === undefined ? {} : { depth }),
  },
});

/** Twenty entries by five people, of every kind, some with a typed depth, one with an unverified identification. */
export const fixtureEntries: Entry[] = [
  entry('biologist', 'biology', 'White mat on the frames', 5, ['microbial-mat', 'hull'], 598.4),
  entry('archaeologist', 'archaeology', 'Amphora on its side', 12, ['amphora', 'cargo']),
  entry('pilot', 'environment', 'Current from the north-east', 19, ['current']),
  entry('biologist', 'biology', 'Sponge on the sternpost', 26, ['sponge'], 604.1),
  entry('lead', 'archaeology', 'Bow outline on the video', 33, ['hull']),
  entry('guest', 'biology', 'Fish in the cargo hold', 40, ['fish']),
  entry('archaeologist', 'archaeology', 'Second amphora, toe only', 47, ['amphora']),
  entry('pilot', 'operations', 'Mosaic line started', 54, ['mosaic']),
  { ...entry('biologist', 'biology', 'Coral on the rudder', 61, ['coral'], 611.0), identification: 'Madrepora oculata' },
  entry('archaeologist', 'archaeology', 'Stack of bowls', 68, ['cargo']),
  entry('biologist', 'biology', 'Push core of the mat', 75, ['microbial-mat', 'sample']),
  entry('pilot', 'environment', 'Visibility down to 3 m', 82, []),
  entry('lead', 'operations', 'Holding station for the survey', 89, []),
  entry('archaeologist', 'archaeology', 'Timber with treenails', 96, ['hull'], 602.7),
  entry('guest', 'biology', 'Squat lobster in a crevice', 103, []),
  entry('biologist', 'biology', 'Sponge field off the stern', 110, ['sponge', 'coral']),
  entry('pilot', 'operations', 'Laser scaler checked', 117, []),
  entry('archaeologist', 'archaeology', 'Amphora neck in the sediment', 124, ['amphora']),
  entry('biologist', 'biology', 'Fish over the wreck', 131, ['fish'], 590.2),
  entry('lead', 'environment', 'Current slackening', 138, ['current']),
];

const members: [keyof typeof emails, CampaignRole][] = [
  ['lead', 'lead'],
  ['archaeologist', 'scientist'],
  ['biologist', 'scientist'],
  ['pilot', 'pilot'],
  ['guest', 'guest'],
];

function makeCampaign(db: Db, name: string, people: typeof members, userId: (email: string) => string) {
  const campaign = db
    .insert(campaigns)
    .values({ name, siteName: 'Test site', datumLat: 36.145, datumLon: -7.432, timeZone: 'Europe/Lisbon', allowFreeTags: true })
    .returning()
    .get();
  for (const [key, role] of people)
    db.insert(memberships)
      .values({ campaignId: campaign.id, userId: userId(emails[key]), role })
      .run();
  for (const tag of fixtureVocabulary) db.insert(tags).values({ campaignId: campaign.id, name: tag }).run();
  const dive = db
    .insert(dives)
    .values({
      campaignId: campaign.id,
      number: 'T-01',
      objectives: 'Test dive',
      plannedMaxDepth: 650,
      plannedStartAt: fixtureDivePhases.launch,
      launchAt: fixtureDivePhases.launch,
      onBottomAt: fixtureDivePhases.onBottom,
      offBottomAt: fixtureDivePhases.offBottom,
      onDeckAt: fixtureDivePhases.onDeck,
    })
    .returning()
    .get();
  return { campaign: campaign.id, dive: dive.id };
}

/**
 * A vehicle log of the fixture dive, every 5 s from launch to on deck: down at 20 m/min to 600 m,
 * a slow swell of ±3 m on the bottom, up at 25 m/min. Invented for the tests, like the entries.
 */
export function fixtureTelemetryCsv(): string {
  const { launch, onBottom, offBottom, onDeck } = fixtureDivePhases;
  const lines = ['time,depth_m,lat,lon,temperature_c'];
  for (let ms = launch.getTime(); ms <= onDeck.getTime(); ms += 5000) {
    const depth =
      ms < onBottom.getTime()
        ? (600 * (ms - launch.getTime())) / (onBottom.getTime() - launch.getTime())
        : ms < offBottom.getTime()
          ? 600 + 3 * Math.sin((ms - onBottom.getTime()) / 600_000)
          : 600 * (1 - (ms - offBottom.getTime()) / (onDeck.getTime() - offBottom.getTime()));
    const k = (ms - launch.getTime()) / 5000;
    lines.push(
      `${new Date(ms).toISOString()},${depth.toFixed(2)},${(36.145 + k * 1e-6).toFixed(7)},${(-7.432 + k * 1e-6).toFixed(7)},${(10.8 + depth / 6000).toFixed(3)}`,
    );
  }
  return `${lines.join('\n')}\n`;
}

/**
 * Two campaigns of the tests' own, and the fixture entries logged on the first one's dive through
 * the API by their authors; with `telemetry`, the pilot first imports `fixtureTelemetryCsv()` for
 * that dive, so the entries are stamped from it. Needs the demo's people (a server started with
 * the seed).
 */
export async function buildFixtures(t: TestServer, options: { telemetry?: boolean } = {}): Promise<Fixtures> {
  const db = t.ctx.db;
  const userId = (email: string) => {
    const row = db.select({ id: user.id }).from(user).where(eq(user.email, email)).get();
    if (!row) throw new Error(`no account ${email}: start the test server with the demo's people`);
    return row.id;
  };
  const campaignName = 'Test campaign 2026';
  const main = makeCampaign(db, campaignName, members, userId);
  const other = makeCampaign(
    db,
    'Other test campaign 2024',
    members.filter(([key]) => key !== 'guest'),
    userId,
  );
  if (options.telemetry) {
    const res = await (
      await t.signIn(emails.pilot)
    )
      .post(`/api/dives/${main.dive}/telemetry`)
      .attach('file', Buffer.from(fixtureTelemetryCsv()), 'fixture-log.csv');
    if (res.status !== 201) throw new Error(`fixture telemetry: ${res.status} ${JSON.stringify(res.body)}`);
  }
  const log = async (diveId: string, { by, body }: Entry) => {
    const res = await (await t.signIn(emails[by])).post(`/api/dives/${diveId}/observations`).send(body);
    if (res.status !== 201) throw new Error(`fixture entry "${body.title}": ${res.status} ${JSON.stringify(res.body)}`);
    return res.body as { id: string; version: number };
  };
  for (const e of fixtureEntries) {
    const made = await log(main.dive, e);
    if (e.identification) {
      const res = await (
        await t.signIn(emails[e.by])
      )
        .put(`/api/observations/${made.id}/identification`)
        .send({ version: made.version, scientificName: e.identification });
      if (res.status !== 200) throw new Error(`fixture identification: ${res.status} ${JSON.stringify(res.body)}`);
    }
  }
  await log(other.dive, entry('archaeologist', 'archaeology', 'Anchor stock', 20, []));
  return { campaign: main.campaign, campaignName, dive: main.dive, otherCampaign: other.campaign, otherDive: other.dive, userId };
}
