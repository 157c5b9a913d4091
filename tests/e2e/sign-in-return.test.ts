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

describe('signing in from a deep link', () => {
  it('lands on the page the link pointed to, not on the campaign list', async () => {
    const screen = await openBrowser(viewports.phone);
    try {
      const page = screen.page;
      await page.goto(`${server.url}/account`);
      await page.getByTestId('sign-in-email').fill('biologist@bathynote.test');
      await page.getByTestId('sign-in-password').fill('bathynote-demo');
      await page.getByTestId('sign-in-password').press('Enter');
      await page.getByTestId('sign-out').waitFor();
      expect(new URL(page.url()).pathname).toBe('/account');
      expect(screen.errors).toEqual([]);
    } finally {
      await screen.close();
    }
  });
});
