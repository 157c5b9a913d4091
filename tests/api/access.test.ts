/**
 * Every API route against every kind of caller. "ok" means the caller got past authorisation:
 * any answer but 401, 403 and 404 (most requests here carry empty bodies on purpose, so an allowed
 * caller gets a 400 and nothing changes). A route the app serves without a row here fails.
 */
import sharp from 'sharp';
import type { Express } from 'express';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { createApp } from '@/server/app';
import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { openSse } from '../helpers/sse';
import { startTestServer, type TestServer } from '../helpers/test-server';

type Actor = 'admin' | 'lead' | 'scientist' | 'pilot' | 'guest' | 'other' | 'anonymous';
type Expect = 'ok' | 401 | 403 | 404 | 303;
const actors: Actor[] = ['admin', 'lead', 'scientist', 'pilot', 'guest', 'other', 'anonymous'];

/** The caller of each kind: "scientist" is the biologist, who wrote the entries used below. */
const emailOf: Record<Exclude<Actor, 'anonymous'>, string> = {
  admin: emails.admin,
  lead: emails.lead,
  scientist: emails.biologist,
  pilot: emails.pilot,
  guest: emails.guest,
  other: emails.outsider, // made a member of the 2024 campaign only, below
};

let t: TestServer;
let ids: Fixtures;
const f = {} as Record<'observation' | 'photo' | 'invitation' | 'quickMark' | 'tag' | 'substrate' | 'spareMember' | 'mail', string>;

let shade = 0;
/** A small PNG, a different one each time (the same file twice on one entry is kept once). */
async function png(): Promise<Buffer> {
  shade++;
  return sharp({ create: { width: 8, height: 8, channels: 3, background: { r: shade % 256, g: 80, b: 120 } } })
    .png()
    .toBuffer();
}

async function freshObservation(): Promise<string> {
  const res = await (
    await t.signIn(emails.biologist)
  )
    .post(`/api/dives/${ids.dive}/observations`)
    .send({ kind: 'biology', title: 'Access fixture' });
  return res.body.id as string;
}

async function freshPhoto(observationId: string): Promise<string> {
  const res = await (
    await t.signIn(emails.biologist)
  )
    .post(`/api/observations/${observationId}/photos`)
    .attach('photo', await png(), { filename: 'frame.png', contentType: 'image/png' });
  expect(res.status).toBe(201);
  return res.body.photos[0].id as string;
}

/** A measurement by the entry's author on the 8 × 8 fixture photo (laser dots across its diagonal). */
async function freshMeasurement(): Promise<string> {
  const res = await (await t.signIn(emails.biologist)).post(`/api/photos/${f.photo}/measurements`).send({
    spacingCm: 10,
    laser: [
      [0, 0],
      [8, 8],
    ],
    kind: 'length',
    points: [
      [0, 4],
      [8, 4],
    ],
  });
  expect(res.status).toBe(201);
  return res.body.id as string;
}

beforeAll(async () => {
  t = await startTestServer({ env: { AUTH_RATE_LIMIT: '500' } });
  ids = await buildFixtures(t);
  t.ctx.db.$client
    .prepare('insert into memberships (campaign_id, user_id, role, created_at) values (?, ?, ?, ?)')
    .run(ids.otherCampaign, ids.userId(emails.outsider), 'scientist', Date.now());
  f.observation = await freshObservation();
  f.photo = await freshPhoto(f.observation);
  const lead = await t.signIn(emails.lead);
  f.invitation = (
    await lead.post(`/api/campaigns/${ids.campaign}/invitations`).send({ email: 'access-fixture@bathynote.test', role: 'guest' })
  ).body.id;
  f.quickMark = (await lead.post(`/api/campaigns/${ids.campaign}/quick-marks`).send({ label: 'Fixture', kind: 'biology' })).body.id;
  f.tag = (await lead.get(`/api/campaigns/${ids.campaign}/tags`)).body[0].id;
  f.substrate = (await lead.get(`/api/campaigns/${ids.campaign}/substrates`)).body.items[0].id;
  f.spareMember = ids.userId(emails.archaeologist);
  f.mail = t.ctx.db.$client.prepare('select id from mail_queue where ref = ?').pluck().get(f.invitation) as string;
});
afterAll(() => t.close());

const R = (admin: Expect, lead: Expect, scientist: Expect, pilot: Expect, guest: Expect, other: Expect, anonymous: Expect) => ({
  admin,
  lead,
  scientist,
  pilot,
  guest,
  other,
  anonymous,
});
const readers = R('ok', 'ok', 'ok', 'ok', 'ok', 404, 401);
const leadOnly = R(403, 'ok', 403, 403, 403, 404, 401);
const leadAndPilot = R(403, 'ok', 403, 'ok', 403, 404, 401);
const members = R(403, 'ok', 'ok', 'ok', 'ok', 404, 401);
const authorAndLead = R(403, 'ok', 'ok', 403, 403, 404, 401);
const signedIn = R('ok', 'ok', 'ok', 'ok', 'ok', 'ok', 401);
const siteAdmin = R('ok', 403, 403, 403, 403, 403, 401);

type Row = {
  expect: Record<Actor, Expect>;
  path: () => string | Promise<string>;
  body?: unknown;
  /** Requests that change something get a fresh target for each allowed caller. */
  fresh?: boolean;
};

const c = () => ids.campaign;

let handoverId: string | undefined;
/** A handover note whose incoming watch is the scientist and the pilot. */
function fixtureHandover(): string {
  if (handoverId) return handoverId;
  handoverId = crypto.randomUUID();
  const members = [emails.biologist, emails.pilot].map((e) => ({ id: ids.userId(e), name: e }));
  const incoming = { name: 'Fixture watch', start: '2026-05-14T08:00:00.000Z', end: '2026-05-14T12:00:00.000Z', members };
  const content = { entries: { total: 0, byKind: {}, latest: [] }, openItems: [], dive: null };
  t.ctx.db.$client
    .prepare('insert into handovers (id, campaign_id, change_at, incoming, content, created_at) values (?, ?, ?, ?, ?, ?)')
    .run(handoverId, ids.campaign, Date.parse(incoming.start), JSON.stringify(incoming), JSON.stringify(content), Date.now());
  return handoverId;
}
const d = () => ids.dive;

const table: Record<string, Row> = {
  'GET /api/health': { expect: R('ok', 'ok', 'ok', 'ok', 'ok', 'ok', 'ok'), path: () => '/api/health' },
  'GET /api/me': { expect: signedIn, path: () => '/api/me' },
  'POST /api/me/password': { expect: signedIn, path: () => '/api/me/password', body: {} },
  'POST /api/auth/sign-in/magic-link': {
    expect: R('ok', 'ok', 'ok', 'ok', 'ok', 'ok', 'ok'),
    path: () => '/api/auth/sign-in/magic-link',
    body: {},
  },
  'GET /api/campaigns': { expect: signedIn, path: () => '/api/campaigns' },
  'GET /api/search': { expect: signedIn, path: () => '/api/search?q=access' },
  'GET /api/search/export.csv': { expect: signedIn, path: () => '/api/search/export.csv?q=access' },
  'POST /api/campaigns': { expect: siteAdmin, path: () => '/api/campaigns', body: {} },
  'GET /api/campaigns/:campaignId': { expect: readers, path: () => `/api/campaigns/${c()}` },
  'PATCH /api/campaigns/:campaignId': { expect: leadOnly, path: () => `/api/campaigns/${c()}`, body: { datumLat: 'x' } },
  'GET /api/campaigns/:campaignId/members': { expect: readers, path: () => `/api/campaigns/${c()}/members` },
  'PATCH /api/campaigns/:campaignId/members/:userId': {
    expect: leadOnly,
    path: () => `/api/campaigns/${c()}/members/${f.spareMember}`,
    body: { role: 'owner' },
  },
  'DELETE /api/campaigns/:campaignId/members/:userId': {
    expect: leadOnly,
    fresh: true,
    path: () => {
      const id = crypto.randomUUID();
      t.ctx.db.$client
        .prepare("insert into user (id, name, email, email_verified, created_at, updated_at, role) values (?, 'Spare', ?, 1, ?, ?, 'user')")
        .run(id, `${id}@bathynote.test`, Date.now(), Date.now());
      t.ctx.db.$client
        .prepare("insert into memberships (campaign_id, user_id, role, created_at) values (?, ?, 'guest', ?)")
        .run(c(), id, Date.now());
      return `/api/campaigns/${c()}/members/${id}`;
    },
  },
  'GET /api/campaigns/:campaignId/invitations': { expect: leadOnly, path: () => `/api/campaigns/${c()}/invitations` },
  'POST /api/campaigns/:campaignId/invitations': { expect: leadOnly, path: () => `/api/campaigns/${c()}/invitations`, body: {} },
  'POST /api/invitations/:invitationId/resend': { expect: leadOnly, path: () => `/api/invitations/${f.invitation}/resend` },
  'DELETE /api/invitations/:invitationId': { expect: leadOnly, path: () => `/api/invitations/${f.invitation}` },
  'GET /api/invitations/:invitationId/accept': {
    expect: R(303, 303, 303, 303, 303, 303, 303),
    path: () => `/api/invitations/${f.invitation}/accept`,
  },
  'GET /api/campaigns/:campaignId/tags': { expect: readers, path: () => `/api/campaigns/${c()}/tags` },
  'POST /api/campaigns/:campaignId/tags': { expect: leadOnly, path: () => `/api/campaigns/${c()}/tags`, body: {} },
  'PATCH /api/tags/:tagId': { expect: leadOnly, path: () => `/api/tags/${f.tag}`, body: {} },
  'GET /api/campaigns/:campaignId/quick-marks': { expect: readers, path: () => `/api/campaigns/${c()}/quick-marks` },
  'POST /api/campaigns/:campaignId/quick-marks': { expect: leadOnly, path: () => `/api/campaigns/${c()}/quick-marks`, body: {} },
  'PATCH /api/quick-marks/:quickMarkId': { expect: leadOnly, path: () => `/api/quick-marks/${f.quickMark}`, body: { kind: 'geology' } },
  'DELETE /api/quick-marks/:quickMarkId': { expect: leadOnly, path: () => `/api/quick-marks/${f.quickMark}` },
  'GET /api/campaigns/:campaignId/substrates': { expect: readers, path: () => `/api/campaigns/${c()}/substrates` },
  'POST /api/campaigns/:campaignId/substrates': { expect: leadOnly, path: () => `/api/campaigns/${c()}/substrates`, body: {} },
  'PATCH /api/substrates/:substrateId': { expect: leadOnly, path: () => `/api/substrates/${f.substrate}`, body: {} },
  'GET /api/campaigns/:campaignId/checklist': { expect: readers, path: () => `/api/campaigns/${c()}/checklist` },
  'POST /api/campaigns/:campaignId/checklist': { expect: leadOnly, path: () => `/api/campaigns/${c()}/checklist`, body: {} },
  'GET /api/campaigns/:campaignId/names': { expect: readers, path: () => `/api/campaigns/${c()}/names?q=a` },
  'GET /api/campaigns/:campaignId/taxa': { expect: readers, path: () => `/api/campaigns/${c()}/taxa` },
  'GET /api/dives/:diveId/taxa': { expect: readers, path: () => `/api/dives/${d()}/taxa` },
  'GET /api/dives/:diveId/report': { expect: readers, path: () => `/api/dives/${d()}/report` },
  'GET /api/campaigns/:campaignId/reports/:date': { expect: readers, path: () => `/api/campaigns/${c()}/reports/2026-05-14` },
  'GET /api/campaigns/:campaignId/samples': { expect: readers, path: () => `/api/campaigns/${c()}/samples` },
  'GET /api/dives/:diveId/samples': { expect: readers, path: () => `/api/dives/${d()}/samples` },
  'GET /api/campaigns/:campaignId/watches': { expect: readers, path: () => `/api/campaigns/${c()}/watches` },
  'PUT /api/campaigns/:campaignId/watches': { expect: leadOnly, path: () => `/api/campaigns/${c()}/watches`, body: { watches: 'x' } },
  'GET /api/campaigns/:campaignId/handovers': { expect: readers, path: () => `/api/campaigns/${c()}/handovers` },
  'POST /api/handovers/:handoverId/acknowledge': {
    // The note's incoming watch is the scientist and the pilot; a lead may acknowledge for them.
    expect: R(403, 'ok', 'ok', 'ok', 403, 404, 401),
    path: () => `/api/handovers/${fixtureHandover()}/acknowledge`,
  },
  'POST /api/handovers/:handoverId/mail': { expect: leadOnly, path: () => `/api/handovers/${fixtureHandover()}/mail` },
  'GET /api/campaigns/:campaignId/samples/next-number': { expect: readers, path: () => `/api/campaigns/${c()}/samples/next-number` },
  'GET /api/campaigns/:campaignId/finds/next-number': { expect: readers, path: () => `/api/campaigns/${c()}/finds/next-number` },
  'GET /api/campaigns/:campaignId/export/summary': { expect: readers, path: () => `/api/campaigns/${c()}/export/summary` },
  'GET /api/campaigns/:campaignId/export/darwin-core.zip': { expect: readers, path: () => `/api/campaigns/${c()}/export/darwin-core.zip` },
  'GET /api/campaigns/:campaignId/export/finds.csv': { expect: readers, path: () => `/api/campaigns/${c()}/export/finds.csv` },
  'GET /api/campaigns/:campaignId/export/observations.geojson': {
    expect: readers,
    path: () => `/api/campaigns/${c()}/export/observations.geojson`,
  },
  'GET /api/campaigns/:campaignId/export/observations.csv': {
    expect: readers,
    path: () => `/api/campaigns/${c()}/export/observations.csv`,
  },
  'GET /api/campaigns/:campaignId/dives': { expect: readers, path: () => `/api/campaigns/${c()}/dives` },
  'POST /api/campaigns/:campaignId/dives': { expect: leadAndPilot, path: () => `/api/campaigns/${c()}/dives`, body: {} },
  'GET /api/dives/:diveId': { expect: readers, path: () => `/api/dives/${d()}` },
  'PATCH /api/dives/:diveId': { expect: leadAndPilot, path: () => `/api/dives/${d()}`, body: {} },
  'POST /api/dives/:diveId/phases': { expect: leadAndPilot, path: () => `/api/dives/${d()}/phases`, body: {} },
  'GET /api/dives/:diveId/stream': { expect: readers, path: () => `/api/dives/${d()}/stream` },
  'GET /api/dives/:diveId/observations': { expect: readers, path: () => `/api/dives/${d()}/observations` },
  'POST /api/dives/:diveId/observations': { expect: members, path: () => `/api/dives/${d()}/observations`, body: {} },
  'GET /api/dives/:diveId/photos': { expect: readers, path: () => `/api/dives/${d()}/photos` },
  'POST /api/dives/:diveId/telemetry': { expect: leadAndPilot, path: () => `/api/dives/${d()}/telemetry`, body: {} },
  'GET /api/dives/:diveId/telemetry': { expect: readers, path: () => `/api/dives/${d()}/telemetry` },
  'GET /api/dives/:diveId/at': { expect: readers, path: () => `/api/dives/${d()}/at?t=2026-05-13T20:00:00.000Z` },
  'GET /api/dives/:diveId/summary': { expect: readers, path: () => `/api/dives/${d()}/summary` },
  'GET /api/observations/:id': { expect: readers, path: () => `/api/observations/${f.observation}` },
  'PATCH /api/observations/:id': { expect: authorAndLead, path: () => `/api/observations/${f.observation}`, body: {} },
  'DELETE /api/observations/:id': {
    expect: authorAndLead,
    fresh: true,
    path: () => freshObservation().then((id) => `/api/observations/${id}`),
  },
  'POST /api/observations/:id/restore': { expect: leadOnly, path: () => `/api/observations/${f.observation}/restore` },
  'GET /api/observations/:id/revisions': { expect: readers, path: () => `/api/observations/${f.observation}/revisions` },
  'PUT /api/observations/:id/identification': {
    expect: R(403, 'ok', 'ok', 403, 403, 404, 401),
    path: () => `/api/observations/${f.observation}/identification`,
    body: {},
  },
  // The biologist wrote the entry, so she may not verify its identification herself.
  'POST /api/observations/:id/identification/verify': {
    expect: R(403, 'ok', 403, 403, 403, 404, 401),
    path: () => `/api/observations/${f.observation}/identification/verify`,
    body: {},
  },
  'PUT /api/observations/:id/find': {
    expect: R(403, 'ok', 'ok', 403, 403, 404, 401),
    path: () => `/api/observations/${f.observation}/find`,
    body: {},
  },
  'PUT /api/observations/:id/sample': {
    expect: authorAndLead,
    path: () => `/api/observations/${f.observation}/sample`,
    body: {},
  },
  'POST /api/observations/:id/custody': {
    expect: R(403, 'ok', 'ok', 'ok', 403, 404, 401),
    path: () => `/api/observations/${f.observation}/custody`,
    body: {},
  },
  'POST /api/observations/:id/photos': { expect: authorAndLead, path: () => `/api/observations/${f.observation}/photos`, body: {} },
  'GET /api/photos/:photoId': { expect: readers, path: () => `/api/photos/${f.photo}?size=thumb` },
  'PATCH /api/photos/:photoId': { expect: authorAndLead, path: () => `/api/photos/${f.photo}`, body: { position: -5 } },
  'DELETE /api/photos/:photoId': {
    expect: authorAndLead,
    fresh: true,
    path: () => freshPhoto(f.observation).then((id) => `/api/photos/${id}`),
  },
  'POST /api/photos/:photoId/measurements': { expect: authorAndLead, path: () => `/api/photos/${f.photo}/measurements`, body: {} },
  'GET /api/photos/:photoId/measurements': { expect: readers, path: () => `/api/photos/${f.photo}/measurements` },
  'GET /api/observations/:id/measurements': { expect: readers, path: () => `/api/observations/${f.observation}/measurements` },
  // The maker (the entry's author here) and a lead may remove a measurement.
  'DELETE /api/measurements/:measurementId': {
    expect: authorAndLead,
    fresh: true,
    path: () => freshMeasurement().then((id) => `/api/measurements/${id}`),
  },
  'GET /api/dev/outbox': { expect: siteAdmin, path: () => '/api/dev/outbox' },
  'GET /api/admin/mail': { expect: siteAdmin, path: () => '/api/admin/mail' },
  'POST /api/admin/mail/:mailId/retry': { expect: siteAdmin, path: () => `/api/admin/mail/${f.mail}/retry` },
  'GET /api/campaigns/:campaignId/subscription': { expect: members, path: () => `/api/campaigns/${c()}/subscription` },
  'PUT /api/campaigns/:campaignId/subscription': { expect: members, path: () => `/api/campaigns/${c()}/subscription`, body: {} },
  'GET /api/campaigns/:campaignId/digests': { expect: leadOnly, path: () => `/api/campaigns/${c()}/digests` },
  'POST /api/campaigns/:campaignId/digests': { expect: leadOnly, path: () => `/api/campaigns/${c()}/digests`, body: {} },
  // Anyone may post a one-click unsubscribe; a link that is not a signed one finds nothing.
  'POST /api/unsubscribe/:token': { expect: R(404, 404, 404, 404, 404, 404, 404), path: () => '/api/unsubscribe/not-a-token' },
  // A shore mirror's stream of every dive's events: only the holder of MIRROR_KEY finds it; no person does.
  'GET /api/mirror/stream': { expect: R(404, 404, 404, 404, 404, 404, 404), path: () => '/api/mirror/stream' },
};

function servedRoutes(app: Express): string[] {
  const out: string[] = [];
  const stack = (app as unknown as { router: { stack: Layer[] } }).router.stack;
  type Layer = { route?: { path: string; methods: Record<string, boolean> }; handle?: { stack?: Layer[] } };
  const visit = (layers: Layer[], prefix: string) => {
    for (const layer of layers) {
      if (layer.route) {
        for (const m of Object.keys(layer.route.methods)) {
          if (m !== '_all') out.push(`${m.toUpperCase()} ${layer.route.path.startsWith('/api') ? '' : prefix}${layer.route.path}`);
        }
      } else if (layer.handle?.stack) visit(layer.handle.stack, '/api');
    }
  };
  visit(stack, '');
  return out.sort();
}

async function call(actor: Actor, method: string, path: string, body: unknown): Promise<number> {
  if (path.endsWith('/stream')) {
    const headers: Record<string, string> = actor === 'anonymous' ? {} : { cookie: await t.sessionCookie(emailOf[actor]) };
    const stream = openSse(`${t.url}${path}`, headers);
    const status = await stream.status;
    stream.close();
    return status;
  }
  const agent = actor === 'anonymous' ? t.anonymous() : await t.signIn(emailOf[actor]);
  const req = agent[method.toLowerCase() as 'get' | 'post' | 'patch' | 'put' | 'delete'](path).redirects(0);
  const res = body === undefined ? await req : await req.send(body as object);
  return res.status;
}

describe('access to every route', () => {
  it('has a row for every route the app serves', () => {
    // better-auth's own routes are covered by the sign-in and team tests.
    const served = [...new Set(servedRoutes(createApp(t.ctx)).filter((r) => !r.endsWith(' /api/auth/*splat')))];
    expect(served.filter((r) => !(r in table))).toEqual([]);
    expect(Object.keys(table).filter((r) => !served.includes(r))).toEqual([]);
  });

  for (const [route, row] of Object.entries(table)) {
    it(`${route}`, async () => {
      const [method] = route.split(' ') as [string];
      const got: Record<string, number> = {};
      // Callers who are refused go first, so that a change made by an allowed one cannot hide a refusal.
      const ordered = [...actors].sort((a, b) => Number(row.expect[a] === 'ok') - Number(row.expect[b] === 'ok'));
      let shared: string | undefined;
      for (const actor of ordered) {
        const path = row.fresh || !shared ? await row.path() : shared;
        shared ??= path;
        got[actor] = await call(actor, method, path, row.body);
      }
      // 'ok' means past the access check: the route may still refuse the body (400) or the state (409), never fail (5xx).
      const seen = Object.fromEntries(
        actors.map((a) => [a, row.expect[a] === 'ok' ? (got[a]! < 500 && ![401, 403, 404].includes(got[a]!) ? 'ok' : got[a]) : got[a]]),
      );
      expect(seen).toEqual(row.expect);
    });
  }
});
