import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { openBrowser, viewports } from '../helpers/chromium';
import { apiSignIn, caughtMail, linkIn } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;

beforeAll(async () => {
  server = await startServerProcess();
});
afterAll(async () => {
  await server?.stop();
});

/** The lead invites `email` as a guest to one of their campaigns: the link of the mail it gets, and the campaign. */
async function invite(email: string, name: string) {
  const admin = await apiSignIn(server.url, 'admin@bathynote.test');
  const lead = await apiSignIn(server.url, 'lead@bathynote.test');
  const [campaign] = await lead.call<{ id: string; name: string }[]>('/api/campaigns');
  await lead.call(`/api/campaigns/${campaign!.id}/invitations`, 'POST', { email, role: 'guest', name }, 201);
  return { admin, campaign: campaign!, link: linkIn(await caughtMail(admin, email, `invites you to ${campaign!.name}`)) };
}

describe('a person who joined by an invitation link', () => {
  it('sets a first password without a current one, signs out and signs in with it', async () => {
    const invitee = 'ilse.marr@bathynote.test';
    const { link, campaign } = await invite(invitee, 'Ilse Marr');
    const screen = await openBrowser(viewports.phone);
    try {
      const page = screen.page;
      // Signed in by the invitation's link, with no password on the account.
      await page.goto(link);
      await page.getByTestId('welcome-notice').waitFor();
      await page.goto(`${server.url}/account`);
      await page.getByTestId('set-password-form').waitFor();
      expect(await page.getByTestId('change-password').count()).toBe(0);

      await page.getByTestId('password-new').fill('a-first-password-at-sea');
      await page.getByTestId('password-repeat').fill('a-first-password-at-sea');
      await page.getByTestId('password-set').click();
      await page.getByTestId('change-password').waitFor();

      await page.getByTestId('sign-out').click();
      await page.getByTestId('sign-in-email').fill(invitee);
      await page.getByTestId('sign-in-password').fill('a-first-password-at-sea');
      await page.getByTestId('sign-in-password').press('Enter');
      // Signed out by hand, nothing was opened to return to: the campaign list, with the invitee's campaign.
      await page.getByTestId('campaign-list').getByText(campaign.name).waitFor();
      expect(screen.errors).toEqual([]);
    } finally {
      await screen.close();
    }
  });
});

describe('an invited person with no password, signed out', () => {
  it('asks the sign-in screen for a link, on a phone, and signs in through the mailed link', async () => {
    const invitee = 'noor.vell@bathynote.test';
    const { admin, campaign, link: invitation } = await invite(invitee, 'Noor Vell');

    const screen = await openBrowser(viewports.phone);
    try {
      const page = screen.page;
      // Joined by the invitation's link, then signed out: no password to sign in with.
      await page.goto(invitation);
      await page.getByTestId('welcome-notice').waitFor();
      await page.goto(`${server.url}/account`);
      await page.getByTestId('set-password-form').waitFor();
      await page.getByTestId('sign-out').click();
      await page.getByTestId('sign-in-email').waitFor();

      // An address that belongs to no member gets the same answer, and no mail.
      await page.getByTestId('sign-in-email').fill('nobody.here@bathynote.test');
      await page.getByTestId('sign-in-link').click();
      const sent = page.getByTestId('sign-in-link-sent');
      await sent.waitFor();
      const answer = await sent.textContent();

      await page.getByTestId('sign-in-email').fill(invitee);
      await page.getByTestId('sign-in-link').click();
      await expect.poll(() => sent.textContent()).toBe(answer);
      const mail = await caughtMail(admin, invitee, 'sign-in link');
      const mailsToNobody = (await admin.call<{ to: string }[]>('/api/dev/outbox')).filter((m) => m.to.includes('nobody.here'));
      expect(mailsToNobody).toEqual([]);

      await page.goto(linkIn(mail));
      await page.getByTestId('campaign-list').getByText(campaign.name).waitFor();
      const me = await page.evaluate(async () => ((await (await fetch('/api/me')).json()) as { user: { email: string } }).user.email);
      expect(me).toBe(invitee);
      // Still without a password, the account offers to set one.
      await page.goto(`${server.url}/account`);
      await page.getByTestId('set-password-form').waitFor();
      expect(screen.errors).toEqual([]);
    } finally {
      await screen.close();
    }
  });
});
