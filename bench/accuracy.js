// Accuracy benchmark of `lamella map` (npm run bench:accuracy).
// Renders invented scenes with the forward model (lamella render's library function), perturbs
// them as real photos are (unknown exposure, flare, sensor noise, JPEG, tungsten and fluorescent
// light, tilt), maps them and compares with the truth. The truth is invented data; the forward
// model itself is checked against outside references in the optics and colour tests.
// Targets per scene (issue): median ≤ 3 nm, p95 ≤ 15 nm, gross (> 50 nm) ≤ 1 %,
// coverage ≥ 97 % of the pixels thinner than 1,500 nm.
// Field scenes (issue 13; bench/field-scenes.js, also invented): the film in its surroundings as
// photos are taken — a frame before a dark cloth, a wafer on a chuck or a bench with tweezers, a
// glint, photos of no film, a series whose film bursts, one whose black film grows, a uniform
// coating — mapped with default options (series frames chained as `lamella series` chains them)
// and scored by bench/field-score.js.
// Light scenes (issue 14; bench/light-scenes.js, also invented): uneven light (35 % fall-off × 25 %
// vignetting), a camera picture style (contrast S-curve, saturation ×1.25), and both with a dark
// background, a frame or holder and a glint, for a soap film (D65) and an oxide wafer (F11),
// mapped with default options: in-film gross ≤ 1 %, p95 ≤ 15 nm, coverage ≥ 95 %, no false thin
// region, outside the film ≤ 1 % with a thickness; the fitted exposure field against the true
// light. Clean and field scenes also report whether the fitted field stays flat within ±2 %.
// `--clean`, `--field`, `--light` run only that group (they combine); no flag runs all three.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { resolveLight } from '../dist/colour/index.js';
import sharp from 'sharp';
import { mapPhotoFile } from '../dist/map/mapPhoto.js';
import { PixelStatus } from '../dist/map/types.js';
import { resolveStack } from '../dist/optics/index.js';
import { renderPhoto } from '../dist/render/index.js';
import { FIELD_SCENES, blackFilmGrowingSeries, burstingSeries, mapOptionsFor, truthFractions } from './field-scenes.js';
import { DEFAULT_CHUNK_FRAMES } from '../dist/series/runSeries.js';
import { TARGETS, anchorScore, exposureFieldScore, fieldFlatRow, filmSceneTargets, insideFilmScore, lightSceneTargets, notAFilmScore, ruptureFrame } from './field-score.js';
import { LIGHT_SCENES } from './light-scenes.js';

const W = 480;
const H = 360;

function field(fn) {
  const out = new Float32Array(W * H);
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) out[y * W + x] = fn(x, y);
  return out;
}

/** A vertical soap film on a wire frame, draining: black film at the top, gravity wedge, swirls. */
function drainingFilm(x, y) {
  const top = 0.12 * H + 8 * Math.sin(x / 37);
  if (y < top) return 6;
  const t = (y - top) / (H - top);
  let h = 25 + 1350 * Math.pow(t, 1.35);
  // marginal-regeneration swirls: thinner patches rising along the side borders
  for (const [cx, cy, r, depth] of [[40, 0.35 * H, 22, 0.45], [W - 45, 0.5 * H, 26, 0.4], [60, 0.75 * H, 30, 0.3]]) {
    const d2 = ((x - cx) ** 2 + (y - cy) ** 2) / (r * r);
    h *= 1 - depth * Math.exp(-d2);
  }
  return h;
}

/** A bubble cap seen from above: thicker towards the rim, three thin spots with their rings. */
function bubbleCap(x, y) {
  const r2 = ((x - W / 2) ** 2 + (y - H / 2) ** 2) / ((0.55 * W) ** 2);
  let h = 180 + 950 * r2;
  for (const [cx, cy, r] of [[0.3 * W, 0.4 * H, 14], [0.62 * W, 0.35 * H, 10], [0.55 * W, 0.7 * H, 18]]) {
    const d2 = ((x - cx) ** 2 + (y - cy) ** 2) / (r * r);
    h = h - (h - 20) * Math.exp(-d2);
  }
  return h;
}

/** A thermal-oxide wafer: bowl-shaped thickness with etched rectangular steps. */
function oxideWafer(x, y) {
  const r2 = ((x - W / 2) ** 2 + (y - H / 2) ** 2) / ((0.6 * W) ** 2);
  let h = 420 + 160 * r2;
  if (x > 0.15 * W && x < 0.38 * W && y > 0.2 * H && y < 0.45 * H) h -= 150;
  if (x > 0.55 * W && x < 0.85 * W && y > 0.55 * H && y < 0.8 * H) h -= 300;
  return h;
}

const scenes = [
  { name: 'draining soap film, daylight (D65), exposure 7.5, JPEG 90', stack: 'soap-film', light: 'D65', angleDeg: 0, exposure: 7.5, flare: 0.012, noise: 0.003, quality: 90, thinBelowNm: 50, fn: drainingFilm },
  { name: 'draining soap film, tungsten (A), 25° tilt, exposure 5.5, JPEG 85', stack: 'soap-film', light: 'A', angleDeg: 25, exposure: 5.5, flare: 0.02, noise: 0.004, quality: 85, thinBelowNm: 50, fn: drainingFilm },
  { name: 'bubble cap with thin spots, fluorescent (F11), exposure 9, JPEG 95', stack: 'soap-film', light: 'F11', angleDeg: 0, exposure: 9, flare: 0.008, noise: 0.003, quality: 95, thinBelowNm: 50, fn: bubbleCap },
  { name: 'oxide wafer, bowl + etched steps, fluorescent (F2), exposure 1.4, JPEG 90', stack: 'oxide-on-silicon', light: 'F2', angleDeg: 0, exposure: 1.4, flare: 0.015, noise: 0.003, quality: 90, thinBelowNm: null, fn: oxideWafer },
  { name: 'oxide wafer, tungsten (A), 25° tilt, exposure 1.2, JPEG 85', stack: 'oxide-on-silicon', light: 'A', angleDeg: 25, exposure: 1.2, flare: 0.02, noise: 0.004, quality: 85, thinBelowNm: null, fn: oxideWafer },
];

export async function benchAccuracy() {
  const dir = mkdtempSync(join(tmpdir(), 'lamella-accuracy-'));
  const rows = [];
  try {
    for (const scene of scenes) {
      const truth = field(scene.fn);
      const stack = resolveStack(scene.stack);
      const angleRad = (scene.angleDeg * Math.PI) / 180;
      const rendered = renderPhoto(truth, W, H, {
        stack, light: resolveLight(scene.light), angleRad, exposure: scene.exposure, flare: scene.flare,
        noiseSigma: scene.noise, seed: 7,
      });
      const path = join(dir, `${rows.length}.jpg`);
      // JPEG as cameras write it: 4:2:0 chroma subsampling (colour at half resolution).
      writeFileSync(path, await sharp(Buffer.from(rendered.data), { raw: { width: W, height: H, channels: 3 } })
        .jpeg({ quality: scene.quality, chromaSubsampling: '4:2:0' }).toBuffer());
      const started = performance.now();
      const result = await mapPhotoFile(path, {
        stack, angleRad, light: scene.light, thinBelowNm: scene.thinBelowNm, maxThicknessNm: 2000,
      });
      const ms = performance.now() - started;
      const fieldScore = exposureFieldScore({ film: new Uint8Array(W * H).fill(1), edge: new Uint8Array(W * H), truthNm: truth, thinBelowNm: scene.thinBelowNm, width: W, height: H }, result);
      rows.push({ scene: scene.name, ms, ...score(truth, result, scene.thinBelowNm), field: fieldScore });
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  return rows;
}

function score(truth, result, thinBelowNm) {
  const errors = [];
  let eligible = 0;
  let covered = 0;
  let gross = 0;
  let thinTruth = 0;
  let thinBoth = 0;
  let thinEither = 0;
  for (let i = 0; i < truth.length; i++) {
    const t = truth[i];
    const s = result.status[i];
    if (t < 1500) eligible++;
    const predictedThin = s === PixelStatus.dark || (s === PixelStatus.ok && thinBelowNm !== null && result.thicknessNm[i] < thinBelowNm);
    const trueThin = thinBelowNm !== null && t < thinBelowNm;
    if (trueThin) thinTruth++;
    if (trueThin && predictedThin) thinBoth++;
    if (trueThin || predictedThin) thinEither++;
    if (s === PixelStatus.dark) {
      if (t < 1500 && t <= result.darkLimitNm + 10) covered++;
      continue;
    }
    if (s !== PixelStatus.ok) continue;
    if (t < 1500) covered++;
    const e = Math.abs(result.thicknessNm[i] - t);
    errors.push(e);
    if (e > 50) gross++;
  }
  errors.sort((a, b) => a - b);
  const q = (p) => (errors.length ? errors[Math.min(errors.length - 1, Math.floor(p * errors.length))] : NaN);
  return {
    medianNm: q(0.5),
    p95Nm: q(0.95),
    gross: errors.length ? gross / errors.length : NaN,
    coverage: eligible ? covered / eligible : NaN,
    thinOverlap: thinTruth ? thinBoth / thinEither : null,
    exposure: result.fitted.exposure,
  };
}

function pass(row) {
  return row.medianNm <= 3 && row.p95Nm <= 15 && row.gross <= 0.01 && row.coverage >= 0.97 && row.field.flatPass;
}

const NOT_A_FILM = new Set(['greyCard', 'colourTarget', 'noise']);

/** Writes a field scene's photo (and, for the ceiling run, its true film as a mask) and maps it. */
async function mapFieldScene(dir, scene, extra = {}) {
  const path = join(dir, scene.fileName);
  writeFileSync(path, scene.photo);
  const started = performance.now();
  const result = await mapPhotoFile(path, mapOptionsFor(scene, { filmArea: 'auto', ...extra }));
  return { result, ms: performance.now() - started };
}

/**
 * Maps a field series as `lamella series` does: each frame with the previous frame's map, fitted
 * photo formation and pixel statuses (its film area) as priors, restarting at chunk boundaries.
 * Returns what the scores read and the film found per frame ('F' / '-').
 */
async function mapFieldSeries(dir, series) {
  const results = [];
  let found = '';
  let ms = 0;
  let previous = null;
  for (const [i, frame] of series.frames.entries()) {
    const chained = previous && i % DEFAULT_CHUNK_FRAMES !== 0 ? { prior: previous.thicknessNm, fitStart: previous.fitted, priorStatus: previous.status } : {};
    const mapped = await mapFieldScene(dir, frame, chained);
    ms += mapped.ms;
    found += mapped.result.filmArea ? (mapped.result.filmArea.found ? 'F' : '-') : '?';
    results.push({ filmArea: mapped.result.filmArea, status: mapped.result.status, stats: mapped.result.stats });
    previous = mapped.result;
  }
  return { results, found, ms };
}

/** The engine's ceiling on a film scene: the true film given as --mask, film area 'whole'. */
async function mapWithTrueMask(dir, scene) {
  const maskPath = join(dir, `${scene.name}.mask.png`);
  const mask = new Uint8Array(scene.film.length);
  for (let p = 0; p < mask.length; p++) mask[p] = scene.film[p] ? 255 : 0;
  writeFileSync(maskPath, await sharp(Buffer.from(mask), { raw: { width: scene.width, height: scene.height, channels: 1 } }).png().toBuffer());
  return (await mapFieldScene(dir, scene, { maskPath, filmArea: 'whole' })).result;
}

/**
 * Field scenes of issue 13, each mapped with default options (film area auto). Returns one
 * record per scene: { scene, ms, rows: [{ target, value, pass }], ceiling?: string }.
 */
export async function benchFieldScenes({ ceiling = true } = {}) {
  const dir = mkdtempSync(join(tmpdir(), 'lamella-field-'));
  const out = [];
  try {
    for (const [name, make] of Object.entries(FIELD_SCENES)) {
      const scene = await make();
      if (NOT_A_FILM.has(name)) {
        const { result, ms } = await mapFieldScene(dir, scene);
        const s = notAFilmScore(result);
        const regions = result.thinRegions.length;
        out.push({
          scene: `${name}: ${scene.description}`, ms,
          rows: [{ target: 'no film found, or film area < 1 %', value: `found ${s.found}, film area ${(100 * s.areaFraction).toFixed(1)} %, ${regions} thin regions`, pass: s.pass }],
        });
        continue;
      }
      if (name === 'uniformCoating') {
        const rows = [];
        let ms = 0;
        for (const variant of scene.variants) {
          const mapped = await mapFieldScene(dir, scene, variant.mapOptions);
          ms += mapped.ms;
          const median = insideFilmScore(scene, mapped.result).medianNm;
          rows.push({ target: `median error ≤ 5 nm with ${variant.name}`, value: `${median.toFixed(2)} nm`, pass: median <= TARGETS.coatingMedianMaxNm });
          if (variant.mapOptions.anchors) {
            const a = anchorScore(scene, mapped.result, variant.mapOptions.anchors[0]);
            rows.push({ target: 'anchor pixel within 5 nm', value: `${Number.isNaN(a.mappedNm) ? 'no estimate' : `${a.mappedNm.toFixed(2)} nm`} for ${a.givenNm} nm`, pass: a.pass });
          }
        }
        out.push({ scene: `${name}: ${scene.description}`, ms, rows });
        continue;
      }
      const { result, ms } = await mapFieldScene(dir, scene);
      const record = { scene: `${name}: ${scene.description}`, ms, rows: [...filmSceneTargets(scene, result), fieldFlatRow(scene, result)] };
      if (ceiling) {
        const c = insideFilmScore(scene, await mapWithTrueMask(dir, scene));
        record.ceiling = `with the true film as --mask: median ${c.medianNm.toFixed(2)} nm · p95 ${c.p95Nm.toFixed(2)} nm · gross ${(100 * c.gross).toFixed(2)} % · coverage ${(100 * c.coverage).toFixed(2)} %`;
      }
      out.push(record);
    }
    const series = await burstingSeries();
    const burst = await mapFieldSeries(dir, series);
    const rupture = ruptureFrame(burst.results);
    out.push({
      scene: `burstingSeries: ${series.frames.length} frames of the draining frame, film gone from frame ${series.ruptureIndex}, mapped as a series (invented)`, ms: burst.ms,
      rows: [{ target: 'rupture frame exact', value: `first frame without film ${rupture ?? 'none'}, truth ${series.ruptureIndex}; film found per frame ${burst.found}`, pass: rupture === series.ruptureIndex }],
    });
    const growing = await blackFilmGrowingSeries(5, 14);
    const grown = await mapFieldSeries(dir, growing);
    let worstThin = 0;
    grown.results.forEach((r, i) => {
      const truth = truthFractions(growing.frames[i]).thinFraction;
      const got = r.stats.thin_fraction;
      worstThin = Math.max(worstThin, got === null || got === undefined ? Infinity : Math.abs(got - truth));
    });
    out.push({
      scene: `blackFilmGrowingSeries: ${growing.frames.length} frames, black film growing from 5 % to 77 % of the frame's height, mapped as a series (invented)`, ms: grown.ms,
      rows: [
        { target: 'film found in every frame', value: `film found per frame ${grown.found}`, pass: !grown.found.includes('-') },
        { target: 'thin fraction within 0.02 in every frame', value: `worst ${worstThin.toFixed(3)}`, pass: worstThin <= TARGETS.thinFractionErrorMax },
      ],
    });
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  return out;
}

/**
 * Light scenes of issue 14, each mapped with default options (film area auto). Returns one record
 * per scene: { scene, ms, rows: [{ target, value, pass }] } (pass null: reported, not a target).
 */
export async function benchLightScenes() {
  const dir = mkdtempSync(join(tmpdir(), 'lamella-light-'));
  const out = [];
  try {
    for (const [name, make] of Object.entries(LIGHT_SCENES)) {
      const scene = await make();
      const { result, ms } = await mapFieldScene(dir, scene);
      const rows = lightSceneTargets(scene, result);
      const e = result.exposureField;
      rows.push({
        target: 'fitted exposure field',
        value: e ? `gain ${e.gainMin.toFixed(3)}–${e.gainMax.toFixed(3)} over the film, ${e.rounds} round(s)` : 'none (one exposure)',
        pass: null,
      });
      out.push({ scene: `${name}: ${scene.description}`, ms, rows });
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  return out;
}

/** Prints records of benchFieldScenes() / benchLightScenes(): PASS when every target row passes. */
function printRecords(records) {
  for (const record of records) {
    const targets = record.rows.filter((r) => r.pass !== null);
    console.log(`${targets.every((r) => r.pass) ? 'PASS' : 'MISS'}  ${record.scene} · ${record.ms.toFixed(0)} ms`);
    for (const r of record.rows) console.log(`      ${r.pass === null ? 'info' : r.pass ? 'PASS' : 'MISS'}  ${r.target}: ${r.value}`);
    if (record.ceiling) console.log(`      (${record.ceiling})`);
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const groups = ['--clean', '--field', '--light'].filter((g) => process.argv.includes(g));
  const run = (/** @type {string} */ group) => groups.length === 0 || groups.includes(group);
  if (run('--clean')) {
    const rows = await benchAccuracy();
    console.log('Accuracy of lamella map on invented scenes (targets: median ≤ 3 nm, p95 ≤ 15 nm, gross ≤ 1 %, coverage ≥ 97 %)');
    for (const r of rows) {
      console.log(
        `${pass(r) ? 'PASS' : 'MISS'}  ${r.scene}\n      median ${r.medianNm.toFixed(2)} nm · p95 ${r.p95Nm.toFixed(2)} nm · gross ${(100 * r.gross).toFixed(2)} % · coverage ${(100 * r.coverage).toFixed(2)} %` +
          `${r.thinOverlap === null ? '' : ` · thin-region overlap (IoU) ${(100 * r.thinOverlap).toFixed(1)} %`} · fitted exposure ×${r.exposure.toFixed(2)} · ${r.ms.toFixed(0)} ms` +
          `\n      field flat within ±2 %: ${r.field.fitted ? `max |gain − 1| ${(100 * r.field.flatDeviation).toFixed(2)} %` : 'n/a (no field fitted)'} (${r.field.flatPass ? 'PASS' : 'MISS'})`,
      );
    }
  }
  if (run('--field')) {
    console.log('\nField scenes (issue 13; invented, default options; pixels on blended film edges left out of both sides)');
    printRecords(await benchFieldScenes());
  }
  if (run('--light')) {
    console.log('\nLight scenes (issue 14; invented, default options): uneven light, a camera picture style, both in a field scene');
    printRecords(await benchLightScenes());
  }
}
