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
  for (const [i, size] of ['phone', 'wide'].entries()) {
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

/** Clicks at a point of the original photo, mapped onto the image as the viewer shows it (scaled to fit). */
async function clickOnPhoto(page: Page, at: [number, number]) {
  const box = await page.getByTestId('measure-stage').boundingBox();
  if (!box) throw new Error('the measuring surface is not on screen');
  const scale = Math.min(box.width / W, box.height / H);
  const left = box.x + (box.width - W * scale) / 2;
  const top = box.y + (box.height - H * scale) / 2;
  await page.mouse.click(left + at[0] * scale, top + at[1] * scale);
}

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
});
