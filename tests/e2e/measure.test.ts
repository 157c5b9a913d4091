import type { Page } from 'playwright-core';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { openBrowser, pageApi, signInAs, viewports, type Browser } from '../helpers/chromium';
import { buildE2eFixtures, type E2eFixtures } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

// A generated frame: two laser dots 400 px apart (10 cm, so 0.025 cm per pixel) and a bar
// 1000 px long, so the bar is 25 cm (worked here: 1000 · 10 / 400).
const W = 1600;
const H = 1000;
const dots: [number, number][] = [
  [500, 300],
  [900, 300],
];
const barEnds: [number, number][] = [
  [300, 700],
  [1300, 700],
];
const barCm = 25;

async function laserFrame(shade: number): Promise<Buffer> {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}">
    <rect width="${W}" height="${H}" fill="rgb(${shade},40,60)"/>
    ${dots.map(([x, y]) => `<circle cx="${x}" cy="${y}" r="6" fill="#ff2020"/>`).join('')}
    <rect x="${barEnds[0]![0]}" y="${barEnds[0]![1] - 6}" width="${barEnds[1]![0] - barEnds[0]![0]}" height="12" fill="#f0f0f0"/>
  </svg>`;
  return sharp(Buffer.from(svg)).png().toBuffer();
}

let server: ServerProcess;
let fixtures: E2eFixtures;
const entries: { id: string; photoId: string }[] = [];

beforeAll(async () => {
  server = await startServerProcess();
  fixtures = await buildE2eFixtures(server.url, { campaignName: 'Measure test 2026', prefix: 'MS-' });
  const bio = fixtures.as.biologist;
  for (const [i, size] of ['phone', 'wide', 'touch phone', 'zoomed'].entries()) {
    const entry = await bio.call<{ id: string }>(
      `/api/dives/${fixtures.finished.id}/observations`,
      'POST',
      { kind: 'biology', title: `Sea pen to measure (${size})`, observedAt: '2026-05-13T20:30:00.000Z' },
      201,
    );
    const up = await bio.upload<{ photos: { id: string }[] }>(
      `/api/observations/${entry.id}/photos`,
      'photo',
      'laser-frame.png',
      await laserFrame(20 + i),
      201,
    );
    entries.push({ id: entry.id, photoId: up.photos[0]!.id });
  }
});
afterAll(async () => {
  await server?.stop();
});

/**
 * Where a point of the original photo is on the screen, the photo shown scaled to fit and zoomed
 * `zoom` times about its middle (worked here: the middle stays at the middle of the surface).
 */
async function onScreen(page: Page, at: readonly [number, number], zoom = 1) {
  const box = await page.getByTestId('measure-stage').boundingBox();
  if (!box) throw new Error('the measuring surface is not on screen');
  const scale = Math.min(box.width / W, box.height / H) * zoom;
  return { x: box.x + box.width / 2 + (at[0] - W / 2) * scale, y: box.y + box.height / 2 + (at[1] - H / 2) * scale, scale };
}

/** Clicks at a point of the original photo, mapped onto the image as the viewer shows it. */
async function clickOnPhoto(page: Page, at: [number, number], zoom = 1) {
  const p = await onScreen(page, at, zoom);
  await page.mouse.click(p.x, p.y);
}

async function openMeasuring(page: Page, entryId: string, tap = false) {
  await signInAs(page, server.url, 'biologist@bathynote.test');
  await page.goto(`${server.url}/observations/${entryId}`);
  const thumb = page.getByTestId('photo-strip').getByTestId('photo-thumb').first();
  await (tap ? thumb.tap() : thumb.click());
  const viewer = page.getByTestId('photo-viewer');
  await viewer.waitFor();
  await (tap ? viewer.getByTestId('viewer-measure').tap() : viewer.getByTestId('viewer-measure').click());
  await viewer.getByTestId('measure-stage').waitFor();
  return viewer;
}

const basisPx = async (page: Page) => Number(/±([\d.]+) px/.exec((await page.getByTestId('measure-basis').textContent()) ?? '')?.[1]);

type Kept = { items: { value: number; uncertainty: number; placementPx: number; spacingCm: number; points: number[][] }[] };

const shown = async (page: Page) => {
  const text = (await page.getByTestId('measure-result').textContent()) ?? '';
  const m = /^Length ([\d.]+) ± ([\d.]+) cm$/.exec(text);
  if (!m) throw new Error(`unexpected result "${text}"`);
  return { value: Number(m[1]), uncertainty: Number(m[2]) };
};

describe('measuring on a photo with the laser scale', () => {
  for (const [i, size] of (['phone', 'wide'] as const).entries()) {
    it(`measures the bar's known length at ${size} size`, async () => {
      const browser: Browser = await openBrowser(viewports[size]);
      try {
        const { page } = browser;
        const entry = entries[i]!;
        await signInAs(page, server.url, 'biologist@bathynote.test');
        await page.goto(`${server.url}/observations/${entry.id}`);
        await page.getByTestId('photo-strip').getByTestId('photo-thumb').first().click();
        const viewer = page.getByTestId('photo-viewer');
        await viewer.waitFor();
        await viewer.getByTestId('viewer-measure').click();
        await viewer.getByTestId('measure-stage').waitFor();
        expect(await viewer.getByTestId('measure-warning').textContent()).toMatch(/plane of the two laser dots.*Lens distortion/s);
        expect(await viewer.getByTestId('measure-spacing').inputValue()).toBe('10');

        for (const dot of dots) await clickOnPhoto(page, dot);
        for (const end of barEnds) await clickOnPhoto(page, end);
        const first = await shown(page);
        const firstText = await page.getByTestId('measure-result').textContent();
        // Worked here: 1000 px at 10 cm / 400 px. The shown uncertainty must cover where the clicks landed.
        expect(first.uncertainty).toBeGreaterThan(0);
        expect(Math.abs(first.value - barCm)).toBeLessThanOrEqual(first.uncertainty);

        // Shift+→ moves the bar's far end 10 px of the photo: 0.25 cm longer (worked here: 10 · 0.025).
        await viewer.getByTestId('measure-stage').focus();
        await page.keyboard.press('Shift+ArrowRight');
        const nudged = await shown(page);
        expect(nudged.value - first.value).toBeGreaterThan(0.14);
        expect(nudged.value - first.value).toBeLessThan(0.36);
        await page.keyboard.press('Shift+ArrowLeft');
        expect((await shown(page)).value).toBe(first.value);

        await viewer.getByTestId('measure-save').click();
        await viewer.getByTestId('measure-saved').waitFor();
        const kept = await pageApi<{ items: { value: number; uncertainty: number; unit: string; laser: number[][] }[] }>(
          page,
          `/api/photos/${entry.photoId}/measurements`,
        );
        expect(kept.items).toHaveLength(1);
        expect(kept.items[0]!.unit).toBe('cm');
        expect(Math.abs(kept.items[0]!.value - barCm)).toBeLessThanOrEqual(kept.items[0]!.uncertainty);
        // The dots landed in the photo's original pixels, within a screen pixel of where they are drawn.
        for (const [k, dot] of dots.entries()) {
          expect(Math.abs(kept.items[0]!.laser[k]![0]! - dot[0])).toBeLessThan(8);
          expect(Math.abs(kept.items[0]!.laser[k]![1]! - dot[1])).toBeLessThan(8);
        }

        // With the keyboard alone, on the same laser dots: Enter places a point at the cursor (where the
        // last one was), Enter again a second one there, and ten Shift+← take it 100 px of the photo
        // left: 2.5 cm (worked here: 100 · 10 / 400).
        const stage = viewer.getByTestId('measure-stage');
        await stage.focus();
        await page.keyboard.press('Enter');
        await page.keyboard.press('Enter');
        for (let k = 0; k < 10; k++) await page.keyboard.press('Shift+ArrowLeft');
        const typed = await shown(page);
        expect(Math.abs(typed.value - 2.5)).toBeLessThanOrEqual(typed.uncertainty);
        await page.keyboard.press('ArrowLeft');
        expect((await shown(page)).value).toBeGreaterThan(typed.value);
        await viewer.getByTestId('measure-done').click();
        await viewer.getByTestId('viewer-show-measurements').waitFor();
        await viewer.getByTestId('viewer-close').click();
        await viewer.waitFor({ state: 'detached' });
        const listed = page.getByTestId('entry-measurements');
        await listed.waitFor();
        expect(await listed.getByTestId('entry-measurement-value').textContent()).toBe(firstText);
        expect(await listed.textContent()).toContain('Cleo Varga'); // the demo's biologist, who measured
        expect(browser.errors).toEqual([]);
      } finally {
        await browser.close();
      }
    });
  }

  it('measures by tapping on a touch phone, and a dragged point moves the length', async () => {
    const browser = await openBrowser(viewports.phone, { hasTouch: true, isMobile: true });
    try {
      const { page } = browser;
      const entry = entries[2]!;
      const viewer = await openMeasuring(page, entry.id, true);
      for (const at of [...dots, ...barEnds]) {
        const p = await onScreen(page, at);
        await page.touchscreen.tap(p.x, p.y);
      }
      const tapped = await shown(page);
      expect(Math.abs(tapped.value - barCm)).toBeLessThanOrEqual(tapped.uncertainty);

      // A finger drags the bar's far end 100 px of the photo left: 2.5 cm shorter (worked here: 100 · 10 / 400).
      const from = await onScreen(page, barEnds[1]!);
      const cdp = await browser.context.newCDPSession(page);
      const touch = (type: 'touchStart' | 'touchMove' | 'touchEnd', x = 0, y = 0) =>
        cdp.send('Input.dispatchTouchEvent', { type, touchPoints: type === 'touchEnd' ? [] : [{ x, y }] });
      await touch('touchStart', from.x, from.y);
      for (let k = 1; k <= 5; k++) await touch('touchMove', from.x - (k * 100 * from.scale) / 5, from.y);
      await touch('touchEnd');
      const dragged = await shown(page);
      expect(Math.abs(tapped.value - dragged.value - 2.5)).toBeLessThan(0.15);
      // The drag moved the point; it placed no new one.
      expect(await viewer.getByTestId('measure-hint').textContent()).toBe('Add points along a curved body, or save.');

      await viewer.getByTestId('measure-save').tap();
      await viewer.getByTestId('measure-saved').waitFor();
      const kept = await pageApi<Kept>(page, `/api/photos/${entry.photoId}/measurements`);
      expect(kept.items).toHaveLength(1);
      expect(kept.items[0]!.points).toHaveLength(2);
      expect(Math.abs(kept.items[0]!.value - (barCm - 2.5))).toBeLessThanOrEqual(kept.items[0]!.uncertainty + 0.15);

      // Two fingers spread from 60 to 120 px apart: the photo is zoomed 2× (worked here: 120 / 60).
      const box = (await viewer.getByTestId('measure-stage').boundingBox())!;
      const [mx, my] = [box.x + box.width / 2, box.y + box.height / 2];
      const fingers = (half: number) => [
        { x: mx - half, y: my, id: 1 },
        { x: mx + half, y: my, id: 2 },
      ];
      await cdp.send('Input.dispatchTouchEvent', { type: 'touchStart', touchPoints: fingers(30) });
      for (const half of [40, 50, 60]) await cdp.send('Input.dispatchTouchEvent', { type: 'touchMove', touchPoints: fingers(half) });
      await cdp.send('Input.dispatchTouchEvent', { type: 'touchEnd', touchPoints: [] });
      expect(Number.parseFloat((await viewer.getByTestId('measure-zoom').textContent()) ?? '')).toBeCloseTo(2, 1);
      // A pinch places no point: the two laser dots kept after saving are all that is marked.
      expect(await viewer.getByTestId('measure-drawing').locator('circle').count()).toBe(2);
      expect(browser.errors).toEqual([]);
    } finally {
      await browser.close();
    }
  });

  it('starts from the dive’s laser spacing, and points placed zoomed in carry a smaller uncertainty', async () => {
    const lead = fixtures.as.lead;
    // The lead sets the dive's spacing on its settings screen.
    const settings = await openBrowser(viewports.phone);
    try {
      const { page } = settings;
      await signInAs(page, server.url, 'lead@bathynote.test');
      await page.goto(`${server.url}/dives/${fixtures.finished.id}/settings`);
      await page.getByTestId('dive-laser-spacing').fill('0');
      await page.getByTestId('dive-laser-spacing-save').click();
      await page.getByText('Give 1 to 500 cm, or leave it empty').waitFor();
      await page.getByTestId('dive-laser-spacing').fill('20');
      await page.getByTestId('dive-laser-spacing-save').click();
      await page.getByTestId('dive-laser-spacing-saved').waitFor();
      expect((await pageApi<{ laserSpacingCm: number | null }>(page, `/api/dives/${fixtures.finished.id}`)).laserSpacingCm).toBe(20);
      expect(settings.errors).toEqual([]);
    } finally {
      await settings.close();
    }
    const browser = await openBrowser(viewports.wide);
    try {
      const { page } = browser;
      const entry = entries[3]!;
      const viewer = await openMeasuring(page, entry.id);
      expect(await viewer.getByTestId('measure-spacing').inputValue()).toBe('20');
      expect(await viewer.getByTestId('measure-spacing-source').textContent()).toBe('Set for this dive');
      // This frame's lasers are 10 cm apart: the spacing is changed for this measurement alone.
      await viewer.getByTestId('measure-spacing').fill('10');
      expect(await viewer.getByTestId('measure-spacing-source').textContent()).toBe('For this measurement');

      for (const at of [...dots, ...barEnds]) await clickOnPhoto(page, at);
      const whole = await shown(page);
      const wholePx = await basisPx(page);
      expect(Math.abs(whole.value - barCm)).toBeLessThanOrEqual(whole.uncertainty);

      // Zoomed in twice as far, every point placed anew is placed twice as finely (worked here: ±px ÷ 2).
      await viewer.getByTestId('measure-clear').click();
      await viewer.getByTestId('measure-zoom-in').click();
      expect(await viewer.getByTestId('measure-zoom').textContent()).toBe('2×');
      for (const at of [...dots, ...barEnds]) await clickOnPhoto(page, at, 2);
      const zoomed = await shown(page);
      expect(Math.abs(zoomed.value - barCm)).toBeLessThanOrEqual(zoomed.uncertainty);
      expect(await basisPx(page)).toBeCloseTo(wholePx / 2, 2);
      expect(zoomed.uncertainty).toBeLessThan(whole.uncertainty * 0.7);

      // Zooming alone moves no point and makes none finer; + and - on the keyboard, and the wheel, zoom.
      const stage = viewer.getByTestId('measure-stage');
      await stage.focus();
      await page.keyboard.press('+');
      expect(await viewer.getByTestId('measure-zoom').textContent()).toBe('4×');
      await page.keyboard.press('-');
      expect(await viewer.getByTestId('measure-zoom').textContent()).toBe('2×');
      const middle = await onScreen(page, [W / 2, H / 2], 2);
      await page.mouse.move(middle.x, middle.y);
      await page.mouse.wheel(0, -200);
      await expect.poll(async () => Number.parseFloat((await viewer.getByTestId('measure-zoom').textContent()) ?? '')).toBeGreaterThan(2);
      await page.mouse.wheel(0, 200);
      await expect.poll(async () => viewer.getByTestId('measure-zoom').textContent()).toBe('2×');
      expect(await shown(page)).toEqual(zoomed);

      // The mouse drags the far end 40 px of the photo right: 1 cm longer (worked here: 40 · 10 / 400).
      const end = await onScreen(page, barEnds[1]!, 2);
      await page.mouse.move(end.x, end.y);
      await page.mouse.down();
      await page.mouse.move(end.x + 20 * end.scale, end.y, { steps: 3 });
      await page.mouse.move(end.x + 40 * end.scale, end.y, { steps: 3 });
      await page.mouse.up();
      const longer = await shown(page);
      expect(Math.abs(longer.value - zoomed.value - 1)).toBeLessThan(0.1);

      // Zoomed in 8 times, the keys take the far end 200 px of the photo right and back; the view follows it.
      await stage.focus();
      await page.keyboard.press('+');
      await page.keyboard.press('+');
      expect(await viewer.getByTestId('measure-zoom').textContent()).toBe('8×');
      const farEnd = viewer.getByTestId('measure-drawing').locator('circle').nth(3);
      const inView = async () => {
        const [dot, surface] = [await farEnd.boundingBox(), await stage.boundingBox()];
        const [cx, cy] = [dot!.x + dot!.width / 2, dot!.y + dot!.height / 2];
        return cx > surface!.x && cx < surface!.x + surface!.width && cy > surface!.y && cy < surface!.y + surface!.height;
      };
      for (let k = 0; k < 20; k++) await page.keyboard.press('Shift+ArrowRight');
      expect(await inView()).toBe(true);
      expect((await shown(page)).value).toBeGreaterThan(longer.value + 4);
      for (let k = 0; k < 20; k++) await page.keyboard.press('Shift+ArrowLeft');
      expect(await inView()).toBe(true);
      expect(await shown(page)).toEqual(longer);

      await viewer.getByTestId('measure-save').click();
      await viewer.getByTestId('measure-saved').waitFor();
      const kept = await pageApi<Kept>(page, `/api/photos/${entry.photoId}/measurements`);
      expect(kept.items).toHaveLength(1);
      expect(kept.items[0]!.spacingCm).toBe(10);
      expect(kept.items[0]!.placementPx).toBeCloseTo(wholePx / 2, 2);
      expect(kept.items[0]!.uncertainty).toBeCloseTo(longer.uncertainty, 1);
      expect(browser.errors).toEqual([]);
    } finally {
      await browser.close();
      const now = await lead.call<{ version: number }>(`/api/dives/${fixtures.finished.id}`);
      await lead.call(`/api/dives/${fixtures.finished.id}`, 'PATCH', { version: now.version, laserSpacingCm: null });
    }
  });
});
