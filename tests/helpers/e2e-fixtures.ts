/**
 * The browser tests' own campaign, dives and entries, made through the HTTP API of the server
 * under test as people make them: the site administrator creates the campaign with the demo's
 * lead, the lead invites the others and each joins through the link in their invitation mail,
 * then the lead sets up tags and quick marks, plans the dives and marks their phases, the pilot
 * imports a telemetry log and every entry is logged by its author. Nothing is read from the
 * demo's campaigns, so the demo can change freely; only the demo's people (part of the contract)
 * are used.
 */
import type { Locator, Page } from 'playwright-core';

import { emails } from './demo';
import { fixtureDivePhases, fixtureEntries, fixtureTelemetryCsv, fixtureVocabulary } from './fixtures';

export type Person = keyof typeof emails;
type Member = Exclude<Person, 'outsider'>;

/** A person's own session against the server, outside any browser. */
export type ApiSession = {
  email: string;
  /** Sends a JSON body (or none) and answers the status and the parsed body; throws unless `expect` matches. */
  call: <T = unknown>(path: string, method?: string, body?: unknown, expect?: number) => Promise<T>;
  /** Sends a file as multipart field `field`. */
  upload: <T = unknown>(path: string, field: string, name: string, bytes: string | Buffer, expect?: number) => Promise<T>;
};

const cookiesOf = (res: Response) =>
  res.headers
    .getSetCookie()
    .map((c) => c.split(';')[0]!)
    .filter((c) => !c.endsWith('='));

function sessionWith(url: string, email: string, cookie: string): ApiSession {
  const send = async <T>(path: string, init: RequestInit, expect: number | undefined): Promise<T> => {
    const res = await fetch(`${url}${path}`, { ...init, headers: { ...init.headers, cookie, origin: url } });
    const text = await res.text();
    const ok = expect === undefined ? res.ok : res.status === expect;
    if (!ok) throw new Error(`${init.method ?? 'GET'} ${path} as ${email}: ${res.status} ${text}`);
    return (text ? JSON.parse(text) : undefined) as T;
  };
  return {
    email,
    call: (path, method = 'GET', body, expect) =>
      send(
        path,
        { method, ...(body === undefined ? {} : { body: JSON.stringify(body), headers: { 'content-type': 'application/json' } }) },
        expect,
      ),
    upload: (path, field, name, bytes, expect) => {
      const form = new FormData();
      form.append(field, new Blob([typeof bytes === 'string' ? bytes : new Uint8Array(bytes)]), name);
      return send(path, { method: 'POST', body: form }, expect);
    },
  };
}

/** Signs in with a password, as the sign-in screen does. */
export async function apiSignIn(url: string, email: string, password = 'bathynote-demo'): Promise<ApiSession> {
  const res = await fetch(`${url}/api/auth/sign-in/email`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: url },
    body: JSON.stringify({ email, password }),
  });
  if (!res.ok) throw new Error(`sign-in as ${email}: ${res.status} ${await res.text()}`);
  return sessionWith(url, email, cookiesOf(res).join('; '));
}

type CaughtMail = { to: string; subject: string; text: string };

/** The newest caught mail to `to` whose subject holds `subject`, waited for (the mail queue sends it shortly after the change). */
export async function caughtMail(admin: ApiSession, to: string, subject: string, after: Set<string> = new Set()): Promise<CaughtMail> {
  const deadline = Date.now() + 20_000;
  for (;;) {
    const mails = await admin.call<CaughtMail[]>('/api/dev/outbox');
    const found = mails.find((m) => m.to.includes(to) && m.subject.includes(subject) && !after.has(m.text));
    if (found) return found;
    if (Date.now() > deadline) throw new Error(`no mail to ${to} about "${subject}" within 20 s`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

/** The sign-in link in a mail's text. */
export function linkIn(mail: CaughtMail): string {
  const found = /(https?:\/\/\S+\/api\/auth\/magic-link\/verify\?\S+)/.exec(mail.text);
  if (!found) throw new Error(`no sign-in link in the mail "${mail.subject}"`);
  return found[1]!;
}

/** Opens a mailed sign-in link outside a browser, following its redirects with the cookies it sets, and keeps the session. */
async function followLink(url: string, email: string, link: string): Promise<ApiSession> {
  const jar = new Map<string, string>();
  let next = link;
  for (let hop = 0; hop < 5; hop++) {
    const res = await fetch(next, {
      redirect: 'manual',
      headers: { cookie: [...jar].map(([k, v]) => `${k}=${v}`).join('; ') },
    });
    for (const c of cookiesOf(res)) {
      const at = c.indexOf('=');
      jar.set(c.slice(0, at), c.slice(at + 1));
    }
    const location = res.headers.get('location');
    if (res.status < 300 || res.status >= 400 || !location) break;
    next = new URL(location, next).href;
    if (!next.includes('/api/')) break;
  }
  if (next.includes('invitation-problem')) throw new Error(`the invitation link for ${email} led to ${next}`);
  return sessionWith(url, email, [...jar].map(([k, v]) => `${k}=${v}`).join('; '));
}

export type FixtureDive = { id: string; number: string };

export type E2eFixtures = {
  campaign: string;
  campaignName: string;
  /** Planned and run on 2026-05-13 (`fixtureDivePhases`): launched, on bottom, off bottom, on deck. */
  finished: FixtureDive;
  /** Launched a little under three hours ago and on the bottom since, not yet back on deck; absent unless asked for. */
  underWay?: FixtureDive;
  /** The finished dive's entries (`fixtureEntries`) by title, when asked for. */
  entries: Record<string, { id: string; by: Member }>;
  /** The find number registered on the finished dive's first archaeology entry. */
  findNumber: string;
  /** Each member's session (the site administrator's too). */
  as: Record<Member, ApiSession>;
  userId: (email: string) => Promise<string>;
};

export type E2eFixtureOptions = {
  /** The campaign's name; no demo campaign's name may contain it, nor it one of theirs. */
  campaignName?: string;
  /** The dives' number prefix (`EX-` gives EX-01, EX-02). */
  prefix?: string;
  /** The pilot imports `fixtureTelemetryCsv()` for the finished dive before the entries are logged. */
  telemetry?: boolean;
  /** Log `fixtureEntries` on the finished dive (with an identification and a find). */
  entries?: boolean;
  /** Also a dive under way, second in number; with `underWayEntries`, the same entries on it, within its own hours. */
  underWay?: boolean;
  underWayEntries?: boolean;
};

const members: [Member, 'scientist' | 'pilot' | 'guest'][] = [
  ['archaeologist', 'scientist'],
  ['biologist', 'scientist'],
  ['pilot', 'pilot'],
  ['guest', 'guest'],
];

/** The quick marks the lead defines for the tests, each logging an entry titled with its label. */
export const fixtureQuickMarks = [
  { label: 'Coral', kind: 'biology', tags: ['coral'] },
  { label: 'Fish', kind: 'biology', tags: ['fish'] },
] as const;

/** The tests' vocabulary: the API tests' one and a few more the browser tests type. */
export const e2eVocabulary = [...fixtureVocabulary, 'concretion'];

export async function buildE2eFixtures(url: string, options: E2eFixtureOptions = {}): Promise<E2eFixtures> {
  const campaignName = options.campaignName ?? 'Test campaign 2026';
  const prefix = options.prefix ?? 'EX-';
  const admin = await apiSignIn(url, emails.admin);
  const lead = await apiSignIn(url, emails.lead);

  const campaign = (
    await admin.call<{ id: string }>(
      '/api/campaigns',
      'POST',
      {
        name: campaignName,
        siteName: 'Test site',
        datumLat: 36.145,
        datumLon: -7.432,
        timeZone: 'Europe/Lisbon',
        leadEmail: emails.lead,
      },
      201,
    )
  ).id;
  await lead.call(`/api/campaigns/${campaign}`, 'PATCH', { allowFreeTags: true });

  // Everyone else joins through the link in their invitation mail, as an invited person does.
  const subject = `invites you to ${campaignName}`;
  for (const [person, role] of members) await lead.call(`/api/campaigns/${campaign}/invitations`, 'POST', { email: emails[person], role });
  const as = { admin, lead } as Record<Member, ApiSession>;
  for (const [person] of members) {
    as[person] = await followLink(url, emails[person], linkIn(await caughtMail(admin, emails[person], subject)));
    await as[person].call(`/api/campaigns/${campaign}`);
  }

  for (const name of e2eVocabulary) await lead.call(`/api/campaigns/${campaign}/tags`, 'POST', { name });
  for (const mark of fixtureQuickMarks)
    await lead.call(`/api/campaigns/${campaign}/quick-marks`, 'POST', { ...mark, tags: [...mark.tags] });

  const plan = async (number: string, phases: [string, Date][]) => {
    const dive = await lead.call<{ id: string }>(`/api/campaigns/${campaign}/dives`, 'POST', {
      number,
      objectives: 'A dive of the tests',
      plannedMaxDepth: 650,
      plannedStartAt: phases[0]![1].toISOString(),
    });
    for (const [phase, at] of phases) await as.pilot.call(`/api/dives/${dive.id}/phases`, 'POST', { phase, at: at.toISOString() });
    return { id: dive.id, number };
  };
  const { launch, onBottom, offBottom, onDeck } = fixtureDivePhases;
  const finished = await plan(`${prefix}01`, [
    ['launch', launch],
    ['on-bottom', onBottom],
    ['off-bottom', offBottom],
    ['on-deck', onDeck],
  ]);
  if (options.telemetry)
    await as.pilot.upload(`/api/dives/${finished.id}/telemetry`, 'file', 'fixture-log.csv', fixtureTelemetryCsv(), 201);

  const entries: E2eFixtures['entries'] = {};
  let findNumber = '';
  if (options.entries) {
    for (const e of fixtureEntries) {
      const author = as[e.by as Member];
      const made = await author.call<{ id: string; version: number }>(`/api/dives/${finished.id}/observations`, 'POST', e.body, 201);
      entries[e.body.title] = { id: made.id, by: e.by as Member };
      if (e.identification)
        await author.call(`/api/observations/${made.id}/identification`, 'PUT', {
          version: made.version,
          scientificName: e.identification,
        });
      if (!findNumber && e.body.kind === 'archaeology') {
        findNumber = 'EX-F-001';
        await author.call(`/api/observations/${made.id}/find`, 'PUT', {
          version: made.version,
          findNumber,
          objectType: 'amphora',
          state: 'in-situ',
        });
      }
    }
  }

  let underWay: FixtureDive | undefined;
  if (options.underWay) {
    // Its entries keep the finished dive's pattern, moved to this dive's own hours.
    const shift = Date.now() - 150 * 60_000 - onBottom.getTime();
    underWay = await plan(`${prefix}02`, [
      ['launch', new Date(launch.getTime() + shift)],
      ['on-bottom', new Date(onBottom.getTime() + shift)],
    ]);
    if (options.underWayEntries)
      for (const e of fixtureEntries)
        await as[e.by as Member].call(
          `/api/dives/${underWay.id}/observations`,
          'POST',
          { ...e.body, observedAt: new Date(Date.parse(e.body.observedAt!) + shift).toISOString() },
          201,
        );
  }

  const userId = async (email: string) => {
    const list = await lead.call<{ userId: string; email: string }[]>(`/api/campaigns/${campaign}/members`);
    const found = list.find((m) => m.email === email);
    if (!found) throw new Error(`${email} is not a member of ${campaignName}`);
    return found.userId;
  };
  return { campaign, campaignName, finished, underWay, entries, findNumber, as, userId };
}

/**
 * Picks one choice of a group (a radio segment, `aria-checked`; a tab, `aria-selected`) and
 * sees it chosen. A screen drawn before its data arrives re-renders as the data comes in, and a click
 * taken in between can be lost; it is given once more, as a person would. Picking a choice that is
 * already chosen keeps it chosen, so the second click never undoes the first. Not for toggles.
 */
export async function choose(choice: Locator, attribute: 'aria-checked' | 'aria-selected' = 'aria-checked'): Promise<void> {
  await choice.click();
  if ((await choice.getAttribute(attribute)) !== 'true') await choice.click();
  await choice.and(choice.page().locator(`[${attribute}="true"]`)).waitFor();
}

/**
 * Waits for a dive's screen to be drawn from the dive's data: its title names the dive. Its
 * buttons (Log entry, Summary, Taxa) are there before the data, and on a phone the entry button
 * is drawn anew once the dive is known, so a click before that can be lost.
 */
export async function diveScreenDrawn(page: Page, number: string): Promise<void> {
  await page.getByRole('heading', { name: `Dive ${number}`, exact: true }).waitFor();
}
