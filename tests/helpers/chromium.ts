import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

import { chromium, type BrowserContext, type Page } from 'playwright-core';

export function chromiumPath(): string {
  return process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
}

export const INSTALL_HINT =
  'Chromium is needed for the browser tests: install it with `sudo apt-get install -y chromium`, or set CHROMIUM_PATH to a Chromium binary.';

export function assertChromium(): void {
  if (!existsSync(chromiumPath())) throw new Error(`${INSTALL_HINT} (looked for ${chromiumPath()})`);
}

export const viewports = {
  phone: { width: 390, height: 844 },
  wide: { width: 1440, height: 900 },
} as const;

/** `errors` collects uncaught exceptions of the page, which a test should end without. */
export type Browser = { context: BrowserContext; page: Page; errors: string[]; close: () => Promise<void> };

/** A fresh Chromium profile; the flags keep it off a network this machine does not have. `device`: a touch phone. */
export async function openBrowser(
  viewport: { width: number; height: number },
  device: { hasTouch?: boolean; isMobile?: boolean } = {},
): Promise<Browser> {
  const dir = mkdtempSync(path.join(tmpdir(), 'bathynote-chromium-'));
  const context = await chromium.launchPersistentContext(dir, {
    executablePath: chromiumPath(),
    viewport,
    ...device,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  const page = context.pages()[0] ?? (await context.newPage());
  const errors: string[] = [];
  context.on('weberror', (e) => errors.push(e.error().message));
  return {
    context,
    page,
    errors,
    close: async () => {
      await context.close();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** Signs in on the sign-in screen as a person would (demo password), and waits for their campaigns. */
export async function signInAs(page: Page, url: string, email: string, password = 'bathynote-demo'): Promise<void> {
  await page.goto(url);
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill(password);
  await page.getByTestId('sign-in-password').press('Enter');
  await page.getByTestId('campaign-list').waitFor();
}

/** Calls the API as the page's signed-in person (with the page's own cookie and origin). */
export function pageApi<T>(page: Page, path: string, method = 'GET', body?: unknown): Promise<T> {
  return page.evaluate(
    async ({ path, method, body }) => {
      const res = await fetch(path, {
        method,
        headers: body ? { 'content-type': 'application/json' } : {},
        body: body ? JSON.stringify(body) : undefined,
      });
      return (await res.json()) as T;
    },
    { path, method, body },
  );
}
