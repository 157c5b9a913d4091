import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { jpegWithExif } from '../fixtures/photos/make';
import { openBrowser, signInAs, viewports, type Browser } from '../helpers/chromium';
import { buildE2eFixtures } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;
let entry: { id: string; diveId: string; title: string };
/** Another of the biologist's entries on the same dive, for the photos dropped in on a wide screen. */
let dropTarget: { id: string; diveId: string; title: string };

beforeAll(async () => {
  server = await startServerProcess();
  // The biologist's first two biology entries on a finished dive of the tests' own.
  const fixtures = await buildE2eFixtures(server.url, { entries: true });
  const [first, second] = Object.entries(fixtures.entries)
    .filter(([, e]) => e.by === 'biologist')
    .map(([title, e]) => ({ id: e.id, diveId: fixtures.finished.id, title }));
  expect(first).toBeDefined();
  expect(second).toBeDefined();
  [entry, dropTarget] = [first!, second!];
});
afterAll(async () => {
  await server?.stop();
});

const signIn = (page: Page, email: string) => signInAs(page, server.url, email);

/**
 * Drags files over an element the way a browser does when they come from the desktop: one
 * DataTransfer carrying real File objects, through dragenter and dragover; `drop` lets them go.
 */
async function dragFilesOver(page: Page, testId: string, files: { name: string; mimeType: string; buffer: Buffer }[]) {
  const dataTransfer = await page.evaluateHandle(
    (list) => {
      const dt = new DataTransfer();
      for (const f of list) {
        const bytes = Uint8Array.from(atob(f.base64), (c) => c.charCodeAt(0));
        dt.items.add(new File([bytes], f.name, { type: f.mimeType }));
      }
      return dt;
    },
    files.map((f) => ({ name: f.name, mimeType: f.mimeType, base64: f.buffer.toString('base64') })),
  );
  const zone = page.getByTestId(testId);
  await zone.dispatchEvent('dragenter', { dataTransfer });
  await zone.dispatchEvent('dragover', { dataTransfer });
  return {
    drop: async () => {
      await zone.dispatchEvent('drop', { dataTransfer });
      await dataTransfer.dispose();
    },
  };
}

const TRANSPARENT = 'rgba(0, 0, 0, 0)';

/** The image elements of a locator have all loaded real pixels. */
async function imagesLoaded(page: Page, testId: string): Promise<number[]> {
  return page
    .getByTestId(testId)
    .locator('img')
    .evaluateAll((imgs) => imgs.map((i) => (i as HTMLImageElement).naturalWidth));
}

describe('photos on an entry', () => {
  let browser: Browser;
  afterAll(async () => {
    await browser?.close();
  });

  it('lets the biologist attach frame grabs on a phone, watch them upload and find them in the dive gallery', async () => {
    browser = await openBrowser(viewports.phone);
    const { page } = browser;
    await signIn(page, 'biologist@bathynote.test');
    await page.goto(`${server.url}/observations/${entry.id}`);
    const photos = page.getByTestId('observation-photos');
    await photos.waitFor();
    expect(await photos.getByTestId('photo-count').textContent()).toBe('none yet');

    const grabs = await Promise.all([
      jpegWithExif({ dateTimeOriginal: '2026:05:13 20:31:12', subSec: '400' }, { width: 1600, height: 900 }),
      jpegWithExif({ dateTimeOriginal: '2026:05:13 20:31:40' }, { width: 1600, height: 900 }),
    ]);
    // The library picker opens the browser's file chooser, which the test answers.
    const [chooser] = await Promise.all([page.waitForEvent('filechooser'), page.getByTestId('add-photos').click()]);
    expect(chooser.isMultiple()).toBe(true);
    await chooser.setFiles([
      { name: 'grab-2031-12.jpg', mimeType: 'image/jpeg', buffer: grabs[0] },
      { name: 'grab-2031-40.jpg', mimeType: 'image/jpeg', buffer: grabs[1] },
    ]);

    await expect.poll(() => page.getByTestId('upload-done').count(), { timeout: 30_000 }).toBe(2);
    const progress = await page.getByTestId('upload-progress').evaluateAll((bars) => bars.map((b) => b.getAttribute('aria-valuenow')));
    expect(progress).toEqual(['100', '100']);

    const strip = page.getByTestId('photo-strip');
    await expect.poll(() => strip.getByTestId('photo-thumb').count(), { timeout: 15_000 }).toBe(2);
    await expect.poll(() => imagesLoaded(page, 'photo-strip')).toEqual([expect.any(Number), expect.any(Number)]);
    await expect.poll(async () => (await imagesLoaded(page, 'photo-strip')).every((w) => w > 0 && w <= 320)).toBe(true);
    expect(await photos.getByTestId('photo-count').textContent()).toBe('2 photos');
    expect(await strip.getByText('Taken 2026-05-13 20:31:12Z').count()).toBe(1);

    // The entry takes its time from the first photo.
    await strip.getByTestId('photo-use-time').first().click();
    await expect.poll(() => page.getByTestId('fact-time').textContent(), { timeout: 15_000 }).toBe('2026-05-13 20:31:12.400Z');

    // A caption for the first photo.
    await strip.getByTestId('photo-edit').first().click();
    await page.getByTestId('photo-caption-field').fill('Iron-oxidising mat, frame grab');
    await page.getByTestId('photo-save').click();
    await strip.getByText('Iron-oxidising mat, frame grab').waitFor();

    await page.getByTestId('entry-gallery-link').click();
    const gallery = page.getByTestId('gallery');
    await gallery.waitFor();
    expect(new URL(page.url()).pathname).toBe(`/dives/${entry.diveId}/gallery`);
    await expect.poll(() => gallery.locator('[data-testid^="gallery-photo-"]').count()).toBe(2);
    expect(await page.getByTestId('gallery-total').textContent()).toBe('2 photos');

    // Filters: no operations photo on this dive, both under biology.
    await page.getByTestId('gallery-kind-operations').click();
    await page.getByTestId('empty').getByText('No photos').waitFor();
    await page.getByTestId('gallery-kind-biology').click();
    await expect.poll(() => gallery.locator('[data-testid^="gallery-photo-"]').count()).toBe(2);
    expect(browser.errors).toEqual([]);
  });

  it('steps through the gallery viewer with the keyboard on a wide screen, full images only when asked', async () => {
    const wide = await openBrowser(viewports.wide);
    try {
      const { page } = wide;
      await signIn(page, 'guest@bathynote.test');
      await page.goto(`${server.url}/dives/${entry.diveId}/gallery`);
      const tiles = page.getByTestId('gallery').locator('[data-testid^="gallery-photo-"]');
      await expect.poll(() => tiles.count()).toBe(2);

      await tiles.first().click();
      const viewer = page.getByTestId('photo-viewer');
      await viewer.waitFor();
      expect(await viewer.getByTestId('viewer-counter').textContent()).toBe('1 / 2');
      expect(await viewer.getByTestId('viewer-caption').textContent()).toBe('Iron-oxidising mat, frame grab');
      await viewer.getByTestId('viewer-display').waitFor({ state: 'attached' });

      await page.keyboard.press('ArrowRight');
      await expect.poll(() => viewer.getByTestId('viewer-counter').textContent()).toBe('2 / 2');
      // At the last photo ArrowRight does nothing. The click after it is handled after it, so once
      // the click has shown its effect the counter says what the key did.
      await page.keyboard.press('ArrowRight');

      // On a thin link: thumbnails only, until the reader asks for the full image.
      await viewer.getByTestId('viewer-thumbnails-only').click();
      await viewer.getByTestId('viewer-load-full').waitFor();
      expect(await viewer.getByTestId('viewer-counter').textContent()).toBe('2 / 2');
      expect(await viewer.getByTestId('viewer-display').count()).toBe(0);
      const thumbSrc = await viewer.getByTestId('viewer-thumb').getAttribute('src');
      expect(thumbSrc).toMatch(/size=thumb$/);
      await page.keyboard.press('ArrowLeft');
      await expect.poll(() => viewer.getByTestId('viewer-counter').textContent()).toBe('1 / 2');
      expect(await viewer.getByTestId('viewer-display').count()).toBe(0);
      await viewer.getByTestId('viewer-load-full').click();
      await viewer.getByTestId('viewer-display').waitFor({ state: 'attached' });
      expect(await viewer.getByTestId('viewer-display').getAttribute('src')).toMatch(/size=display$/);
      await expect
        .poll(() => viewer.getByTestId('viewer-display').evaluate((i) => (i as HTMLImageElement).naturalWidth))
        .toBeGreaterThan(320);

      await page.keyboard.press('Escape');
      await viewer.waitFor({ state: 'detached' });

      // The setting is kept on this device.
      await page.reload();
      await page.getByTestId('gallery').waitFor();
      await page.getByTestId('gallery').locator('[data-testid^="gallery-photo-"]').first().click();
      await page.getByTestId('photo-viewer').getByTestId('viewer-load-full').waitFor();
      expect(await page.getByTestId('photo-viewer').getByTestId('viewer-display').count()).toBe(0);
      expect(wide.errors).toEqual([]);
    } finally {
      await wide.close();
    }
  });

  it('takes a photo dropped on the entry on a wide screen, and shows it and its caption live to a guest watching the dive', async () => {
    const author = await openBrowser(viewports.wide);
    const guest = await openBrowser(viewports.wide);
    try {
      const divePage = `${server.url}/dives/${dropTarget.diveId}?entry=${dropTarget.id}`;
      await signIn(guest.page, 'guest@bathynote.test');
      await guest.page.goto(divePage);
      const seen = guest.page.getByTestId('detail-pane').getByTestId('observation-photos');
      await seen.waitFor();
      expect(await seen.getByTestId('photo-count').textContent()).toBe('none yet');
      // Only the author and the lead may add photos: the guest gets no place to drop them.
      expect(await guest.page.getByTestId('photo-drop-zone').count()).toBe(0);
      await guest.page.getByTestId('live-status-live').waitFor({ timeout: 30_000 });

      const { page } = author;
      await signIn(page, 'biologist@bathynote.test');
      await page.goto(divePage);
      const photos = page.getByTestId('detail-pane').getByTestId('observation-photos');
      await photos.waitFor();
      await photos.getByText('Or drop photos here.', { exact: false }).waitFor();
      const grab = await jpegWithExif({ dateTimeOriginal: '2026:05:13 21:02:05' }, { width: 1600, height: 900 });
      const zone = page.getByTestId('photo-drop-zone');
      const outline = () => zone.evaluate((el) => getComputedStyle(el).outlineColor);
      expect(await outline()).toBe(TRANSPARENT);
      const drag = await dragFilesOver(page, 'photo-drop-zone', [{ name: 'dropped-grab-2102.jpg', mimeType: 'image/jpeg', buffer: grab }]);
      // The zone shows that it takes the files while they are over it.
      await expect.poll(outline).not.toBe(TRANSPARENT);
      await drag.drop();
      await expect.poll(outline).toBe(TRANSPARENT);

      await expect.poll(() => page.getByTestId('upload-done').count(), { timeout: 30_000 }).toBe(1);
      const strip = photos.getByTestId('photo-strip');
      await expect.poll(() => strip.getByTestId('photo-thumb').count(), { timeout: 15_000 }).toBe(1);
      await expect
        .poll(async () => (await imagesLoaded(page, 'photo-strip')).every((w) => w > 0 && w <= 320), { timeout: 15_000 })
        .toBe(true);
      expect(await photos.getByTestId('photo-count').textContent()).toBe('1 photo');
      expect(await strip.getByText('Taken 2026-05-13 21:02:05Z').count()).toBe(1);

      // A file dropped beside the zone is ignored, rather than opened by the browser in place of the app.
      const strayOpened = await page.evaluate(() => {
        const dt = new DataTransfer();
        dt.items.add(new File([new Uint8Array([0xff, 0xd8, 0xff])], 'stray.jpg', { type: 'image/jpeg' }));
        const drop = new DragEvent('drop', { dataTransfer: dt, bubbles: true, cancelable: true });
        return document.body.dispatchEvent(drop);
      });
      expect(strayOpened).toBe(false);
      expect(await page.getByTestId('upload-done').count()).toBe(1);

      // The guest sees it arrive without reloading: in the entry beside the log, and on its card.
      await expect.poll(() => seen.getByTestId('photo-count').textContent(), { timeout: 30_000 }).toBe('1 photo');
      await expect.poll(() => seen.getByTestId('photo-thumb').count(), { timeout: 15_000 }).toBe(1);
      await expect
        .poll(async () => (await imagesLoaded(guest.page, 'photo-strip')).every((w) => w > 0 && w <= 320), { timeout: 15_000 })
        .toBe(true);
      await guest.page.getByTestId(`observation-${dropTarget.id}`).getByText('1 photo').waitFor({ timeout: 15_000 });

      // A caption written by the author reaches the guest the same way.
      await strip.getByTestId('photo-edit').click();
      await page.getByTestId('photo-caption-field').fill('Bacterial mat beside the sternpost, dropped in');
      await page.getByTestId('photo-save').click();
      await strip.getByText('Bacterial mat beside the sternpost, dropped in').waitFor();
      await seen.getByText('Bacterial mat beside the sternpost, dropped in').waitFor({ timeout: 30_000 });

      expect(author.errors).toEqual([]);
      expect(guest.errors).toEqual([]);
    } finally {
      await Promise.all([author.close(), guest.close()]);
    }
  });
});
