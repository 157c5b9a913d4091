import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';

import { openBrowser, signInAs, viewports, type Browser } from '../helpers/chromium';
import { choose, diveScreenDrawn } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;

beforeAll(async () => {
  server = await startServerProcess();
});
afterAll(async () => {
  await server?.stop();
});

const signIn = (page: Page, email: string) => signInAs(page, server.url, email);

async function openTeam(page: Page) {
  await page.getByTestId('campaign-list').getByText('Varn Shoal 2026').click();
  await page.getByTestId('campaign-team').click();
  await page.getByTestId('member-list').waitFor();
}

const guestEmail = 'ines.morrow@bathynote.test';

describe('a guest scientist joins by invitation', () => {
  let link = '';
  let guest: Browser | undefined;
  afterAll(async () => {
    await guest?.close();
  });

  it('lets the lead invite a guest at a wide screen, and says so when the address is already a member', async () => {
    const lead = await openBrowser(viewports.wide);
    try {
      const { page } = lead;
      await signIn(page, 'lead@bathynote.test');
      await openTeam(page);
      await page.getByTestId('invite-email').fill(guestEmail);
      await page.getByTestId('invite-role-guest').click();
      expect(await page.getByTestId('invite-role-help').textContent()).toContain('Reads the whole campaign');
      await page.getByTestId('invite-role-pilot').click();
      expect(await page.getByTestId('invite-role-help').textContent()).toContain('telemetry logs');
      await page.getByTestId('invite-role-guest').click();
      await page.getByTestId('invite-name').fill('Ines Morrow');
      await page.getByTestId('invite-submit').click();

      const row = page.getByTestId(`invitation-${guestEmail}`);
      await row.waitFor();
      expect(await row.getByTestId('invitation-status').textContent()).toBe('Pending');
      expect(await row.textContent()).toContain('Guest');
      expect(await row.textContent()).toContain('Invited by Ada Lumen');
      expect(await page.getByTestId('invite-email').inputValue()).toBe('');

      await page.getByTestId('invite-email').fill('biologist@bathynote.test');
      await page.getByTestId('invite-submit').click();
      const refused = page.getByTestId('invite-error');
      await refused.waitFor();
      expect(await refused.textContent()).toContain('already a member');
      expect(await page.getByTestId('invitation-biologist@bathynote.test').count()).toBe(0);
      expect(lead.errors).toEqual([]);
    } finally {
      await lead.close();
    }
  });

  it('shows the site administrator the invitation in the outbox, with its page in a sandboxed frame', async () => {
    const admin = await openBrowser(viewports.phone);
    try {
      const { page } = admin;
      await signIn(page, 'admin@bathynote.test');
      await page.getByTestId('nav-admin').click();
      await page.getByTestId('admin-campaigns').getByText('Lead: Ada Lumen').first().waitFor();
      await page.getByTestId('user-guest@bathynote.test').getByTestId('user-disable').waitFor();
      await page.getByTestId('admin-outbox').click();

      const item = page
        .getByTestId('outbox-list')
        .locator('[data-testid^="mail-"]', { hasText: 'Ada Lumen invites you to Varn Shoal 2026 in Bathynote' })
        .filter({ hasText: guestEmail });
      await item.first().click();
      const text = (await page.getByTestId('mail-text').textContent()) ?? '';
      expect(text).toContain('Hello Ines Morrow');
      const found = /(http:\/\/\S+\/api\/auth\/magic-link\/verify\?\S+)/.exec(text);
      expect(found, text).not.toBeNull();
      link = found![1]!;

      const frame = page.getByTestId('mail-html');
      expect(await frame.getAttribute('sandbox')).toBe('');
      const join = page.frameLocator('[data-testid="mail-html"]').getByRole('link', { name: 'Join Varn Shoal 2026' });
      expect(await join.getAttribute('href')).toBe(link);
      expect(await page.getByTestId('mail-headers').textContent()).toContain(guestEmail);

      // A new campaign's form shows no example value in grey inside a field, where it would read as
      // filled in: the examples are in the hints under the fields.
      await page.goBack();
      await page.getByTestId('new-campaign').filter({ visible: true }).click();
      const form = page.getByTestId('new-campaign-form').filter({ visible: true });
      await form.waitFor();
      expect(await form.locator('input, textarea').count()).toBeGreaterThan(5);
      expect(await form.locator('input[placeholder]:not([placeholder=""]), textarea[placeholder]:not([placeholder=""])').count()).toBe(0);
      expect(await form.getByTestId('new-campaign-datumLat-hint').textContent()).toContain('for example 36.1450');
      expect(admin.errors).toEqual([]);
    } finally {
      await admin.close();
    }
  });

  it('opens the link on a phone, lands in the campaign with a welcome, and logs an annotation on a dive', async () => {
    expect(link).not.toBe('');
    guest = await openBrowser(viewports.phone);
    const { page } = guest;
    await page.goto(link);
    const welcome = page.getByTestId('welcome-notice');
    await welcome.waitFor();
    expect(await welcome.textContent()).toContain('You joined Varn Shoal 2026 as a guest.');
    expect(new URL(page.url()).search).toBe('?welcome=1');

    await page.getByTestId('dive-VS-02').click();
    await diveScreenDrawn(page, 'VS-02');
    await page.getByTestId('new-observation').click();
    await page.getByTestId('observation-form').waitFor();
    await choose(page.getByTestId('field-kind-biology'));
    const title = 'Brittle stars on the amphora shoulder, seen from ashore';
    await page.getByTestId('field-title').fill(title);
    // The time as the Now button gives it: a dive that is over starts its entries with no time.
    await page.getByTestId('time-now').click();
    await page.getByTestId('save-observation').click();
    await page.getByTestId('dive-log').locator('[data-testid^="observation-"]').getByText(title).waitFor();
    expect(guest.errors).toEqual([]);
  });

  it('explains, when the same link is opened again, that it works once', async () => {
    expect(guest).toBeDefined();
    const { page } = guest!;
    await page.goto(link);
    await page.getByTestId('invitation-problem').waitFor();
    expect(new URL(page.url()).pathname).toBe('/invitation-problem');
    const body = (await page.getByTestId('invitation-problem').textContent()) ?? '';
    expect(body).toContain('works once');
    expect(body).toContain('ask your campaign lead');
    await page.getByTestId('invitation-problem-signed-in').getByText(guestEmail, { exact: false }).waitFor();
    expect(guest!.errors).toEqual([]);
  });

  it('lets the lead make the guest a scientist, and keeps the campaign a lead', async () => {
    const lead = await openBrowser(viewports.wide);
    try {
      const { page } = lead;
      await signIn(page, 'lead@bathynote.test');
      await openTeam(page);
      const newcomer = page.getByTestId(`member-${guestEmail}`);
      expect(await newcomer.getByTestId('member-role-label').textContent()).toBe('Guest');
      expect(
        await page.getByTestId('invitations').locator('[data-testid^="past-invitation-"]', { hasText: guestEmail }).textContent(),
      ).toContain('Accepted');
      await newcomer.getByTestId('member-role-scientist').click();
      await newcomer.getByTestId('member-role-label').getByText('Scientist', { exact: true }).waitFor();
      await page.getByTestId('toast').getByText('Ines Morrow is now a scientist.').waitFor();

      const me = page.getByTestId('member-lead@bathynote.test');
      await me.getByTestId('member-role-scientist').click();
      await me.getByTestId('member-role-confirm').click();
      const refused = me.getByTestId('member-error');
      await refused.waitFor();
      expect(await refused.textContent()).toContain('always keeps at least one lead');
      expect(await me.getByTestId('member-role-label').textContent()).toBe('Lead');
      expect(await me.getByTestId('member-role-lead').getAttribute('aria-checked')).toBe('true');

      // The change holds on the server, not only on this screen.
      await page.reload();
      await page.getByTestId(`member-${guestEmail}`).getByTestId('member-role-label').getByText('Scientist', { exact: true }).waitFor();
      expect(lead.errors).toEqual([]);
    } finally {
      await lead.close();
    }
  });
});
