/**
 * What people type is cleaned at the contract's edge: one-line fields lose control characters,
 * line breaks (folded to spaces) and bidirectional overrides and isolates, and come out in Unicode
 * NFC; a title of nothing but invisible characters is refused; notes keep their line breaks and
 * lose the other control characters. Checked through the API, back out of the dive log, and in a
 * mail that carries a typed name.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { caughtMailSchema, observationPageSchema, observationSchema } from '@/lib/schemas';
import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: Fixtures;

beforeAll(async () => {
  t = await startTestServer();
  ids = await buildFixtures(t);
});
afterAll(() => t.close());

/** "e" and a combining acute accent (U+0301): NFC makes them one "é" (U+00E9). */
const DECOMPOSED_E_ACUTE = 'e\u0301';
/** RIGHT-TO-LEFT OVERRIDE: "invoice\u202Egpj.exe" shows as "invoiceexe.jpg". */
const RLO = '\u202e';

async function logEntry(body: Record<string, unknown>) {
  return (await t.signIn(emails.biologist)).post(`/api/dives/${ids.dive}/observations`).send({ kind: 'biology', ...body });
}

async function fromDiveLog(id: string) {
  const page = observationPageSchema.parse(
    (await (await t.signIn(emails.guest)).get(`/api/dives/${ids.dive}/observations`).query({ limit: 200 })).body,
  );
  return page.items.find((o) => o.id === id)!;
}

describe('one-line text', () => {
  it('stores a title in NFC without control characters, line breaks or bidirectional overrides', async () => {
    const typed = `  Caf${DECOMPOSED_E_ACUTE}\u0000 sighting\u0007\r\nnear invoice${RLO}gpj.exe\u2066\u2069 \u200b`;
    const res = await logEntry({ title: typed });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const clean = 'Café sighting near invoicegpj.exe';
    expect(observationSchema.parse(res.body).title).toBe(clean);
    expect((await fromDiveLog(res.body.id)).title).toBe(clean);
    expect(clean.normalize('NFC')).toBe(clean);

    const edited = await (
      await t.signIn(emails.biologist)
    )
      .patch(`/api/observations/${res.body.id}`)
      .send({ version: res.body.version, title: `Line one\nline two\u202a\u2067` });
    expect(edited.status, JSON.stringify(edited.body)).toBe(200);
    expect((await fromDiveLog(res.body.id)).title).toBe('Line one line two');
  });

  it('refuses a title of nothing but invisible characters with the usual 400', async () => {
    for (const title of ['\u200b\u2066\u00a0\u202e', '\r\n\u0007\u0000', '\ufeff \u200d\u2060']) {
      const res = await logEntry({ title });
      expect(res.status, JSON.stringify(title)).toBe(400);
      expect(res.body.error.code).toBe('validation_failed');
      expect(res.body.error.issues.map((i: { path: string }) => i.path)).toContain('title');
    }
  });

  it('cleans a campaign name before it goes into an invitation mail', async () => {
    const lead = await t.signIn(emails.lead);
    const renamed = await lead.patch(`/api/campaigns/${ids.campaign}`).send({ name: `Shoal\r\nBcc: someone@example.org ${RLO}2026` });
    expect(renamed.status, JSON.stringify(renamed.body)).toBe(200);
    expect(renamed.body.name).toBe('Shoal Bcc: someone@example.org 2026');
    const invited = await lead
      .post(`/api/campaigns/${ids.campaign}/invitations`)
      .send({ email: 'typed-name@bathynote.test', role: 'guest' });
    expect(invited.status, JSON.stringify(invited.body)).toBe(201);
    await t.ctx.mail.settled();
    const mails = ((await (await t.signIn(emails.admin)).get('/api/dev/outbox')).body as unknown[]).map((m) => caughtMailSchema.parse(m));
    const mail = mails.find((m) => m.to.includes('typed-name@bathynote.test'))!;
    expect(mail.subject).toContain('Shoal Bcc: someone@example.org 2026');
    expect(mail.subject).not.toMatch(/[\r\n\u202a-\u202e\u2066-\u2069]/);
    expect(Object.keys(mail.headers).map((h) => h.toLowerCase())).not.toContain('bcc');
  });
});

describe('notes', () => {
  it('keep their line breaks and lose NUL and the other control characters', async () => {
    const res = await logEntry({
      title: 'Note test',
      note: `first line\r\nsecond\u0000 line\u0007\u001b[31m\n\n\tthird${DECOMPOSED_E_ACUTE}`,
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const detail = (await (await t.signIn(emails.guest)).get(`/api/observations/${res.body.id}`)).body as { note: string };
    expect(detail.note).toBe('first line\nsecond line[31m\n\n\tthirdé');
  });
});
