/**
 * The HTML reports in headless Chromium (playwright-core): they load from a file:// URL with no
 * console errors and no request beyond the file itself and data: URIs, every image decodes, the
 * charts carry axis labels, the pointer readout shows the value stored for the pixel under the
 * pointer (full-resolution and downsampled grids), and the page is not blank.
 * Skipped, with the reason in the test name, when /usr/bin/chromium is absent (CI installs it).
 * Inputs are synthetic (tests/report-fixtures.ts); expected readouts are computed here from the
 * fixture's defining formula (thickness = 100 + x + 1000·y), independently of the report code.
 */
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium, type Browser, type Page } from 'playwright-core';
import { renderMapReport, renderSeriesReport } from '../src/report/index.js';
import { makeMapInput, makeSeriesInput, rampConfidence, rampThickness } from './report-fixtures.js';

const chromiumPath = '/usr/bin/chromium';
const hasChromium = existsSync(chromiumPath);
if (!hasChromium) console.warn(`report browser tests skipped: ${chromiumPath} not found (install Debian's chromium)`);
const outDir = join(process.env.LAMELLA_REPORT_SHOTS ?? tmpdir(), `lamella-report-${process.pid}`);

interface Loaded { page: Page; requests: string[]; errors: string[]; url: string }

describe.skipIf(!hasChromium)(`reports in headless Chromium${hasChromium ? '' : ` (skipped: ${chromiumPath} not found)`}`, () => {
  let browser: Browser;
  beforeAll(async () => {
    mkdirSync(outDir, { recursive: true });
    browser = await chromium.launch({ executablePath: chromiumPath, args: ['--headless', '--no-sandbox', '--disable-gpu',
      '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'] });
  });
  afterAll(async () => { await browser?.close(); });

  async function load(name: string, html: string, width = 1280): Promise<Loaded> {
    const file = join(outDir, name);
    writeFileSync(file, html);
    const url = pathToFileURL(file).href;
    const page = await browser.newPage({ viewport: { width, height: 900 } });
    const requests: string[] = [];
    const errors: string[] = [];
    page.on('request', (r) => requests.push(r.url()));
    page.on('console', (m) => { if (m.type() === 'error' || m.type() === 'warning') errors.push(m.text()); });
    page.on('pageerror', (e) => errors.push(String(e)));
    await page.goto(url, { waitUntil: 'load' });
    return { page, requests, errors, url };
  }

  function expectOffline(loaded: Loaded): void {
    const outside = loaded.requests.filter((u) => u !== loaded.url && !u.startsWith('data:'));
    expect(outside).toEqual([]);
    expect(loaded.errors).toEqual([]);
  }

  async function expectImagesDecoded(page: Page): Promise<number> {
    const sizes = await page.$$eval('img', (imgs) => imgs.map((i) => (i as unknown as { naturalWidth: number }).naturalWidth));
    expect(sizes.length).toBeGreaterThan(0);
    for (const w of sizes) expect(w).toBeGreaterThan(0);
    return sizes.length;
  }

  async function pointAt(page: Page, selector: string, x: number, y: number, W: number, H: number): Promise<Record<string, string>> {
    await page.locator(selector).evaluate((el) => el.scrollIntoView({ block: 'center' }));
    const box = await page.locator(selector).boundingBox();
    if (!box) throw new Error(`no box for ${selector}`);
    await page.mouse.move(box.x + ((x + 0.5) / W) * box.width, box.y + ((y + 0.5) / H) * box.height);
    const readout: Record<string, string> = {};
    for (const k of ['x', 'y', 'thickness', 'confidence', 'cell', 'status']) readout[k] = (await page.textContent(`#readout-${k}`)) ?? '';
    return readout;
  }

  it('renderMapReport() at full resolution: offline, images decode, charts labelled, readout equals the stored pixel value', async () => {
    const W = 64;
    const H = 40;
    const input = await makeMapInput({ originalWidth: W, originalHeight: H, step: 1, kind: 'ramp', title: 'ramp <&> test' });
    const loaded = await load('map-ramp.html', renderMapReport(input));
    const { page } = loaded;
    expect(await expectImagesDecoded(page)).toBe(2);
    expect(await page.locator('svg.chart').count()).toBeGreaterThanOrEqual(2);
    const labels = await page.$$eval('svg .axis-label', (els) => els.map((e) => e.textContent));
    expect(labels).toContain('Thickness (nm)');
    expect(labels).toContain('Pixels (count)');
    expect(await page.title()).toContain('ramp <&> test');
    for (const [x, y] of [[0, 0], [10, 5], [63, 39], [31, 20], [62, 1]]) {
      for (const stage of ['.stage.map img', '.stage.photo img']) {
        const r = await pointAt(page, stage, x, y, W, H);
        expect(r.x).toBe(String(x));
        expect(r.y).toBe(String(y));
        // The readout rounds to 0.1 nm (the map's own precision is no finer).
        expect(r.thickness).toBe(`${(100 + x + 1000 * y).toFixed(1)} nm`);
        expect(r.confidence).toBe(rampConfidence(x, y).toFixed(2));
        expect(r.cell).toBe('full resolution');
        expect(r.status).toBe('');
      }
    }
    const nan = await pointAt(page, '.stage.map img', 3, 2, W, H);
    expect(Number.isNaN(rampThickness(3, 2))).toBe(true);
    expect(nan.thickness).toBe('no estimate');
    expect(nan.status).toContain('too dark'); // status code 1 = PixelStatus.dark in src/map/types.ts
    // clicking moves the profile to that column
    const box = (await page.locator('.stage.map img').boundingBox())!;
    await page.mouse.click(box.x + (20.5 / W) * box.width, box.y + box.height / 2);
    expect(await page.textContent('#profile-column')).toBe('20');
    // pointing along the profile chart reads that column at the row under the pointer
    const plot = page.locator('#profile-chart g.plot');
    const attrs = await plot.evaluate((el) => ['x0', 'x1', 'left', 'width'].map((k) => Number(el.getAttribute(`data-${k}`))));
    const [x0, x1, left, width] = attrs;
    await page.locator('#profile-chart').evaluate((el) => el.scrollIntoView({ block: 'center' }));
    const chartBox = (await page.locator('#profile-chart').boundingBox())!;
    const viewWidth = 580; // viewBox width of the profile chart
    const row = 17;
    const sx = left + ((row + 0.2 - x0) / (x1 - x0)) * width; // profile samples sit at integer rows
    await page.mouse.move(chartBox.x + (sx / viewWidth) * chartBox.width, chartBox.y + chartBox.height / 2);
    expect(await page.textContent('#readout-x')).toBe('20');
    expect(await page.textContent('#readout-y')).toBe(String(row));
    expect(await page.textContent('#readout-thickness')).toBe(`${(100 + 20 + 1000 * row).toFixed(1)} nm`);
    // hovering a thin-region row highlights its outline on the map
    await page.hover('tr[data-region="1"]');
    expect(await page.getAttribute('.marks .region[data-region="1"]', 'class')).toContain('highlight');
    expectOffline(loaded);
    await page.close();
  });

  it('renderMapReport() with a downsampled grid: readout shows the cell value of the original pixel and says so', async () => {
    const W = 250;
    const H = 170;
    const step = 4;
    const input = await makeMapInput({ originalWidth: W, originalHeight: H, step, kind: 'ramp' });
    const loaded = await load('map-ramp-step4.html', renderMapReport(input));
    const { page } = loaded;
    expect(await page.textContent('.downsample-note')).toContain('downsampled by 4');
    for (const [x, y] of [[0, 0], [7, 9], [249, 169], [130, 61]]) {
      const r = await pointAt(page, '.stage.map img', x, y, W, H);
      const x0 = Math.floor(x / step) * step;
      const y0 = Math.floor(y / step) * step;
      expect(r.x).toBe(String(x));
      expect(r.y).toBe(String(y));
      expect(r.thickness).toBe(`${(100 + x0 + 1000 * y0).toFixed(1)} nm`);
      expect(r.cell).toContain(`grid cell ${x0 / step}, ${y0 / step}`);
    }
    expectOffline(loaded);
    await page.close();
  });

  it('renderMapReport() of the demo scenario is not blank (screenshot has many distinct colours)', async () => {
    const input = await makeMapInput({ originalWidth: 480, originalHeight: 360, step: 1, kind: 'demo' });
    const loaded = await load('map-demo.html', renderMapReport(input));
    const { page } = loaded;
    await expectImagesDecoded(page);
    await pointAt(page, '.stage.map img', 150, 200, 480, 360);
    await page.evaluate('window.scrollTo(0, 0)');
    const shot = await page.screenshot({ fullPage: true, path: join(outDir, 'map-demo.png') });
    expect(await distinctColours(shot)).toBeGreaterThan(500);
    expectOffline(loaded);
    await page.close();
  });

  it('renderSeriesReport(): offline, thumbnails decode, time charts labelled, slider steps through frames', async () => {
    const input = await makeSeriesInput(24, true);
    const loaded = await load('series-demo.html', renderSeriesReport(input));
    const { page } = loaded;
    expect(await expectImagesDecoded(page)).toBe(24 + 2);
    const labels = await page.$$eval('svg .axis-label', (els) => els.map((e) => e.textContent));
    expect(labels).toContain('Time (s)');
    expect(labels).toContain('Thin fraction (%)');
    expect(await page.locator('#drainage-chart .series').count()).toBe(4);
    expect(await page.textContent('#frame-name')).toBe('frame_023<&>.jpg');
    await page.locator('#frame-slider').fill('5');
    expect(await page.textContent('#frame-name')).toBe('frame_005<&>.jpg');
    expect(await page.textContent('#frame-time')).toBe('50.0 s');
    expect(await page.locator('img[data-frame-index="5"]').isVisible()).toBe(true);
    expect(await page.locator('img[data-frame-index="23"]').isVisible()).toBe(false);
    const markerX = await page.getAttribute('#drainage-chart .frame-marker', 'x1');
    expect(Number(markerX)).toBeGreaterThan(64);
    await page.evaluate('window.scrollTo(0, 0)');
    const shot = await page.screenshot({ fullPage: true, path: join(outDir, 'series-demo.png') });
    expect(await distinctColours(shot)).toBeGreaterThan(500);
    expectOffline(loaded);
    await page.close();
  });
});

async function distinctColours(png: Buffer): Promise<number> {
  const { data, info } = await sharp(png).removeAlpha().raw().toBuffer({ resolveWithObject: true });
  const seen = new Set<number>();
  for (let i = 0; i < info.width * info.height * 3; i += 3) seen.add((data[i] << 16) | (data[i + 1] << 8) | data[i + 2]);
  return seen.size;
}
