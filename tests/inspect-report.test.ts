/**
 * The report's profile tool (issue 19 part 4) in headless Chromium: dragging on the map draws the
 * profile along any line, and the profile downloads as CSV. Skipped, with the reason in the test
 * name, when /usr/bin/chromium is absent. The input is the synthetic ramp of the report tests
 * (tests/report-fixtures.ts, thickness = 100 + x + 1000·y), so every expected value is computed
 * here from that formula, independently of the report code.
 */
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium, type Browser } from 'playwright-core';
import { renderMapReport } from '../src/report/index.js';
import { makeMapInput, rampThickness } from './report-fixtures.js';

const chromiumPath = '/usr/bin/chromium';
const hasChromium = existsSync(chromiumPath);
const outDir = join(tmpdir(), `lamella-inspect-report-${process.pid}`);

describe.skipIf(!hasChromium)(`report profile tool in headless Chromium${hasChromium ? '' : ` (skipped: ${chromiumPath} not found)`}`, () => {
  let browser: Browser;
  beforeAll(async () => {
    mkdirSync(outDir, { recursive: true });
    browser = await chromium.launch({ executablePath: chromiumPath, args: ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'] });
  });
  afterAll(async () => {
    await browser?.close();
    rmSync(outDir, { recursive: true, force: true });
  });

  it('a drag draws the line; the CSV holds the thickness of each sampled pixel', async () => {
    const W = 64;
    const H = 40;
    const file = join(outDir, 'ramp.html');
    writeFileSync(file, renderMapReport(await makeMapInput({ originalWidth: W, originalHeight: H, step: 1, kind: 'ramp' })));
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 }, acceptDownloads: true });
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(String(e)));
    await page.goto(pathToFileURL(file).href, { waitUntil: 'load' });
    const img = page.locator('.stage.map img');
    await img.evaluate((el) => el.scrollIntoView({ block: 'center' }));
    const box = (await img.boundingBox())!;
    const at = (x: number, y: number): [number, number] => [box.x + ((x + 0.5) / W) * box.width, box.y + ((y + 0.5) / H) * box.height];
    await page.mouse.move(...at(5, 4));
    await page.mouse.down();
    await page.mouse.move(...at(20, 15), { steps: 4 });
    await page.mouse.move(...at(45, 30), { steps: 4 });
    await page.mouse.up();
    expect(await page.textContent('#profile-what')).toBe('line (5, 4) to (45, 30) px');
    const lineAttrs = await page.locator('.stage.map .profile-line').evaluate((el) => ['x1', 'y1', 'x2', 'y2'].map((k) => Number(el.getAttribute(k))));
    expect(lineAttrs).toEqual([5.5, 4.5, 45.5, 30.5]);
    await page.locator('#profile-csv').scrollIntoViewIfNeeded();
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('#profile-csv')]);
    const csvPath = join(outDir, 'profile.csv');
    await download.saveAs(csvPath);
    const rows = readFileSync(csvPath, 'utf8').trim().split('\n');
    expect(rows[0]).toBe('distance_px,x_px,y_px,thickness_nm,confidence');
    const length = Math.hypot(40, 26);
    expect(rows).toHaveLength(Math.ceil(length) + 2);
    const n = Math.ceil(length);
    for (const [k, row] of rows.slice(1).entries()) {
      const [d, x, y, t] = row.split(',').map((c) => (c === '' ? NaN : Number(c)));
      // Sample k of n lies at k/n of the line, in the pixel it falls in.
      expect(d).toBeCloseTo((k / n) * length, 3);
      expect(x).toBe(Math.round(5 + (k / n) * 40));
      expect(y).toBe(Math.round(4 + (k / n) * 26));
      const truth = rampThickness(x, y);
      if (Number.isFinite(truth)) expect(t).toBeCloseTo(truth, 1);
      else expect(t).toBeNaN();
    }
    // A click still sets a column.
    await img.evaluate((el) => el.scrollIntoView({ block: 'center' }));
    const again = (await img.boundingBox())!;
    await page.mouse.click(again.x + (12.5 / W) * again.width, again.y + again.height / 2);
    expect(await page.textContent('#profile-what')).toBe('column x = 12 px');
    expect(errors).toEqual([]);
    await page.close();
  }, 60_000);
});
