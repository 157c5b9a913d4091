import path from 'node:path';

import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { openBrowser, viewports } from '../helpers/chromium';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;

beforeAll(async () => {
  server = await startServerProcess();
});
afterAll(async () => {
  await server?.stop();
});

describe('a person who joined by an invitation link', () => {
  it('sets a first password without a current one, signs out and signs in with it', async () => {
    const screen = await openBrowser(viewports.phone);
    try {
      const page = screen.page;
      await page.goto(`${server.url}/account`);
      await page.getByTestId('sign-in-email').fill('guest@bathynote.test');
      await page.getByTestId('sign-in-password').fill('bathynote-demo');
      await page.getByTestId('sign-in-password').press('Enter');
      await page.getByTestId('sign-out').waitFor();

      // As after an invitation link: signed in, with no password on the account.
      const db = new Database(path.join(server.dir, 'bathynote.db'));
      db.prepare(
        "update account set password = null where provider_id = 'credential' and user_id = (select id from user where email = 'guest@bathynote.test')",
      ).run();
      db.close();
      await page.reload();
      await page.getByTestId('set-password-form').waitFor();
      expect(await page.getByTestId('change-password').count()).toBe(0);

      await page.getByTestId('password-new').fill('a-first-password-at-sea');
      await page.getByTestId('password-repeat').fill('a-first-password-at-sea');
      await page.getByTestId('password-set').click();
      await page.getByTestId('change-password').waitFor();

      await page.getByTestId('sign-out').click();
      await page.getByTestId('sign-in-email').fill('guest@bathynote.test');
      await page.getByTestId('sign-in-password').fill('a-first-password-at-sea');
      await page.getByTestId('sign-in-password').press('Enter');
      await page.getByTestId('sign-out').waitFor();
      expect(screen.errors).toEqual([]);
    } finally {
      await screen.close();
    }
  });
});
