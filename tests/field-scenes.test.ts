/**
 * Checks of the field-scene generator (bench/field-scenes.js): the scenes are INVENTED (our own
 * frame, wafers, bench, cloth and targets), so these tests check the generator against its own
 * stated design and against the geometry and the photo model it claims to follow — not the film
 * detection (the mapper's tests do that with these scenes). Needs the build (`dist/`).
 * The last block checks the camera effects of the light scenes (bench/camera-effects.js) the same
 * way: against the formulas the generator states, not the mapper.
 */
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { decodeSrgb, encodeSrgb } from '../src/colour/srgb.js';
import {
  FIELD_HEIGHT,
  FIELD_WIDTH,
  burstingSeries,
  colourTarget,
  greyCard,
  noise,
  soapFilmInFrame,
  soapFilmOffBorder,
  soapFilmWithGlint,
  truthFractions,
  uniformCoating,
  uniformOxideNm,
  waferOnDarkChuck,
  waferOnGreyBench,
  type FieldScene,
  type FieldSeries,
} from '../bench/field-scenes.js';
import { PICTURE_STYLE, UNEVEN_LIGHT, applyPictureStyle, falloffAt, toneCurve, unevenLight, vignetting } from '../bench/camera-effects.js';
import { soapFilmStyledUnevenInFrame, soapFilmUnevenLight } from '../bench/light-scenes.js';

const scenes: Record<string, FieldScene> = {};
let series: FieldSeries;

beforeAll(async () => {
  for (const [name, make] of Object.entries({
    soapFilmInFrame, soapFilmOffBorder, soapFilmWithGlint, waferOnDarkChuck, waferOnGreyBench, uniformCoating, greyCard, colourTarget, noise,
  })) {
    scenes[name] = await make();
  }
  series = await burstingSeries(4, 2);
}, 60_000);

function count(mask: Uint8Array): number {
  let n = 0;
  for (const v of mask) n += v;
  return n;
}

/** Mean of each channel of the decoded photo over the pixels where `select` is true, and how many. */
async function meanCodes(scene: FieldScene, select: (p: number) => boolean): Promise<{ mean: [number, number, number]; n: number }> {
  const { data } = await sharp(scene.photo).raw().toBuffer({ resolveWithObject: true });
  const sum = [0, 0, 0];
  let n = 0;
  for (let p = 0; p < scene.width * scene.height; p++) {
    if (!select(p)) continue;
    n++;
    for (let c = 0; c < 3; c++) sum[c] += data[p * 3 + c];
  }
  return { mean: [sum[0] / n, sum[1] / n, sum[2] / n], n };
}

/** Pixels of surface `name` that no other layer touches, at least `marginPx` from any other label. */
function pureSurface(scene: FieldScene, name: string, marginPx: number): (p: number) => boolean {
  const id = scene.surfaces.find((s) => s.name === name)?.id;
  if (id === undefined) throw new Error(`${scene.name} has no surface ${name}`);
  const w = scene.width;
  return (p) => {
    const x = p % w;
    const y = (p / w) | 0;
    for (let dy = -marginPx; dy <= marginPx; dy++) {
      for (let dx = -marginPx; dx <= marginPx; dx++) {
        const xx = x + dx;
        const yy = y + dy;
        if (xx < 0 || yy < 0 || xx >= w || yy >= scene.height) continue;
        const q = yy * w + xx;
        if (scene.labels[q] !== id || scene.mixed[q]) return false;
      }
    }
    return true;
  };
}

/** The composition rule of the header of bench/field-scenes.js, for a surface's mean reflectance. */
function expectedCode(scene: FieldScene, name: string, c: number): number {
  const rho = scene.surfaces.find((s) => s.name === name)!.reflectanceRgb[c];
  return 255 * encodeSrgb(Math.min(1, scene.exposure * rho + scene.flare[c]));
}

describe('field scenes: photos', () => {
  it('every photo decodes to 480 × 360 RGB; JPEG with 4:2:0 chroma, noise as PNG', async () => {
    for (const scene of [...Object.values(scenes), ...series.frames]) {
      const meta = await sharp(scene.photo).metadata();
      expect([scene.name, meta.width, meta.height, meta.channels]).toEqual([scene.name, FIELD_WIDTH, FIELD_HEIGHT, 3]);
      expect([scene.width, scene.height]).toEqual([480, 360]);
      expect(meta.format).toBe(scene.name === 'noise' ? 'png' : 'jpeg');
      if (meta.format === 'jpeg') expect(meta.chromaSubsampling).toBe('4:2:0');
      expect(scene.truthNm.length).toBe(480 * 360);
    }
  });

  it('the same seed gives the same photo; another seed another one', async () => {
    expect(Buffer.compare((await noise()).photo, scenes.noise.photo)).toBe(0);
    expect(Buffer.compare((await noise(5)).photo, scenes.noise.photo)).not.toBe(0);
  });
});

describe('field scenes: truth', () => {
  it('soap film in its frame: film area as the frame geometry gives, about 10 % of it below 50 nm (as documented)', () => {
    // The frame's centre line is a rounded rectangle 324 × 290 px (corner radius 8 px); the film
    // fills it less half the 5 px wire on each side: (324 − 5)(290 − 5) px less the corners.
    const byGeometry = ((324 - 5) * (290 - 5) - (4 - Math.PI) * (8 - 2.5) ** 2) / (480 * 360);
    const a = truthFractions(scenes.soapFilmInFrame);
    expect(Math.abs(a.filmFraction - byGeometry)).toBeLessThan(0.004);
    expect(Math.abs(a.filmFraction - 0.526)).toBeLessThan(0.002);
    expect(Math.abs(a.thinFraction! - 0.104)).toBeLessThan(0.01);
    // the thickest film, at the bottom wire: about 1.2 µm; the black film: 5–10 nm
    let maxNm = 0;
    let minNm = Infinity;
    for (const v of scenes.soapFilmInFrame.truthNm) if (v === v) ((maxNm = Math.max(maxNm, v)), (minNm = Math.min(minNm, v)));
    expect(maxNm).toBeGreaterThan(1100);
    expect(maxNm).toBeLessThan(1300);
    expect(minNm).toBeGreaterThanOrEqual(5);
    expect(minNm).toBeLessThan(10);
  });

  it('soap film in its frame: the black film meets the top wire, and the cloth reaches every border', () => {
    const s = scenes.soapFilmInFrame;
    const wire = s.surfaces.find((x) => x.name === 'wire')!.id;
    const cloth = s.surfaces.find((x) => x.name === 'cloth')!.id;
    // down the middle column: cloth, wire, then film that starts black (< 10 nm)
    const x = 240;
    let y = 0;
    while (s.labels[y * 480 + x] === cloth) y++;
    expect(s.labels[y * 480 + x]).toBe(wire);
    while (!s.film[y * 480 + x]) y++;
    expect(s.truthNm[y * 480 + x]).toBeLessThan(10);
    for (let i = 0; i < 480; i += 7) {
      expect(s.labels[i]).toBe(cloth);
    }
    for (let j = 0; j < 360; j += 7) {
      expect(s.labels[j * 480]).toBe(cloth);
      expect(s.labels[j * 480 + 479]).toBe(cloth);
    }
  });

  it('soap film off the border: black film on the top row, and less film than in the frame scene', () => {
    const s = scenes.soapFilmOffBorder;
    let blackOnTopRow = 0;
    for (let x = 0; x < 480; x++) if (s.film[x] && s.truthNm[x] < 10) blackOnTopRow++;
    expect(blackOnTopRow).toBeGreaterThan(250);
    const b = truthFractions(s);
    expect(Math.abs(b.filmFraction - 0.516)).toBeLessThan(0.003);
    expect(Math.abs(b.thinFraction! - 0.087)).toBeLessThan(0.01);
  });

  it('the glint and its halo are not film; the rest is the frame scene', () => {
    const a = scenes.soapFilmInFrame;
    const e = scenes.soapFilmWithGlint;
    const centre = 148 * 480 + 318;
    expect(e.film[centre]).toBe(0);
    expect(e.rgb[centre * 3]).toBe(255);
    // lost film: the clipped core (r = 10 px) and the halo while it adds ≥ 0.05:
    // r + 3.5·sqrt(2 ln(0.45 / 0.05)) ≈ 17.3 px, a disc of ≈ 940 px
    const lost = count(a.film) - count(e.film);
    expect(lost).toBeGreaterThan(800);
    expect(lost).toBeLessThan(1100);
    expect(Math.abs(truthFractions(e).thinFraction! - 0.106)).toBeLessThan(0.01);
  });

  it('wafers: film area of a 150 px disc with its flat at 138 px, less the 1.5 px bevel', () => {
    // circle πr² less the segment beyond the flat, r² acos(d/r) − d·sqrt(r² − d²)
    const r = 150;
    const d = 138;
    const disc = Math.PI * r * r - (r * r * Math.acos(d / r) - d * Math.sqrt(r * r - d * d));
    const perimeter = 2 * r * (Math.PI - Math.acos(d / r)) + 2 * Math.sqrt(r * r - d * d);
    const byGeometry = (disc - 1.5 * perimeter) / (480 * 360);
    for (const name of ['waferOnDarkChuck', 'waferOnGreyBench', 'uniformCoating']) {
      const f = truthFractions(scenes[name]);
      expect(Math.abs(f.filmFraction - byGeometry), name).toBeLessThan(0.004);
      expect(f.thinFraction).toBeNull();
    }
    // the tweezers cover part of the rim
    expect(count(scenes.waferOnGreyBench.film)).toBeLessThan(count(scenes.waferOnDarkChuck.film));
  });

  it('wafer thicknesses: bowl 420–580 nm with steps down to ~120 nm; the coating 100–104 nm', () => {
    const range = (s: FieldScene) => {
      let lo = Infinity;
      let hi = -Infinity;
      for (const v of s.truthNm) if (v === v) ((lo = Math.min(lo, v)), (hi = Math.max(hi, v)));
      return [lo, hi];
    };
    const [lo, hi] = range(scenes.waferOnDarkChuck);
    expect(lo).toBeGreaterThan(115);
    expect(lo).toBeLessThan(140);
    expect(hi).toBeLessThanOrEqual(580);
    expect(hi).toBeGreaterThan(570);
    const [clo, chi] = range(scenes.uniformCoating);
    expect(clo).toBeGreaterThanOrEqual(100);
    expect(chi).toBeLessThanOrEqual(104);
  });

  it('uniform coating: an expected range and an anchor at the wafer centre with its true thickness', () => {
    const s = scenes.uniformCoating;
    expect(s.variants!.map((v) => v.name)).toEqual(['expect', 'anchor']);
    expect(s.variants![0].mapOptions.expectNm).toEqual([70, 140]);
    const anchor = s.variants![1].mapOptions.anchors![0];
    expect(s.film[anchor.y * 480 + anchor.x]).toBe(1);
    expect(Math.abs(anchor.thicknessNm - s.truthNm[anchor.y * 480 + anchor.x])).toBeLessThan(0.01);
    expect(Math.abs(anchor.thicknessNm - uniformOxideNm(anchor.x + 0.5, anchor.y + 0.5))).toBeLessThan(0.01);
  });

  it('the edge band is one pixel wide along the film outline', () => {
    // soap frame: the outline is the inner edge of the wire, ≈ 2(319 + 285) px long
    const n = count(scenes.soapFilmInFrame.edge);
    expect(n).toBeGreaterThan(0.85 * 2 * (319 + 285));
    expect(n).toBeLessThan(1.15 * 2 * (319 + 285));
  });

  it('photos of no film hold no film in truth', () => {
    for (const name of ['greyCard', 'colourTarget', 'noise']) {
      const s = scenes[name];
      expect(count(s.film), name).toBe(0);
      expect(s.truthNm.every((v) => Number.isNaN(v)), name).toBe(true);
    }
    // the colour target shows 24 patches
    expect(scenes.colourTarget.surfaces.filter((x) => x.name.startsWith('patch')).length).toBe(24);
  });

  it('bursting series: names sort in time order, film until burstAt, none after, thinning as it drains', () => {
    expect(series.ruptureIndex).toBe(2);
    expect(series.lastFilmIndex).toBe(1);
    const names = series.frames.map((f) => f.fileName);
    expect([...names].sort()).toEqual(names);
    const f = series.frames.map((fr) => truthFractions(fr));
    expect(f[0].filmFraction).toBeGreaterThan(0.5);
    expect(f[1].filmFraction).toBeGreaterThan(0.5);
    expect(f[2].filmFraction).toBe(0);
    expect(f[3].filmFraction).toBe(0);
    expect(f[1].thinFraction!).toBeGreaterThan(f[0].thinFraction! + 0.05);
    // after the burst the frame and its droplets remain
    expect(series.frames[2].surfaces.some((x) => x.name === 'droplet')).toBe(true);
    expect(count(series.frames[2].labels.map((l) => (l === series.frames[2].surfaces.find((x) => x.name === 'wire')!.id ? 1 : 0)))).toBeGreaterThan(2000);
  });
});

describe('field scenes: surroundings pass through the same camera as the film', () => {
  it('dark cloth: encoded = sRGB(exposure·ρ + flare) in the photo, at a linear level of 0.01–0.03', async () => {
    const s = scenes.soapFilmInFrame;
    const { mean, n } = await meanCodes(s, pureSurface(s, 'cloth', 3));
    expect(n).toBeGreaterThan(50_000);
    for (let c = 0; c < 3; c++) {
      expect(Math.abs(mean[c] - expectedCode(s, 'cloth', c))).toBeLessThan(2);
      const linearLevel = decodeSrgb(mean[c] / 255) - s.flare[c];
      expect(linearLevel).toBeGreaterThan(0.01);
      expect(linearLevel).toBeLessThan(0.03);
    }
  });

  it('near-black chuck and grey bench follow the same rule (exposure 1.3)', async () => {
    const chuck = scenes.waferOnDarkChuck;
    const bench = scenes.waferOnGreyBench;
    const m1 = await meanCodes(chuck, pureSurface(chuck, 'chuck', 3));
    const m2 = await meanCodes(bench, pureSurface(bench, 'bench', 3));
    for (let c = 0; c < 3; c++) {
      expect(Math.abs(m1.mean[c] - expectedCode(chuck, 'chuck', c))).toBeLessThan(2);
      expect(Math.abs(m2.mean[c] - expectedCode(bench, 'bench', c))).toBeLessThan(3);
    }
    // the exposure acts on the bench too: 0.3 at exposure 1.3 encodes ≈ 20 codes above 0.3 itself
    expect(m2.mean[1]).toBeGreaterThan(255 * encodeSrgb(0.3) + 12);
  });

  it('surfaces are textured, not flat fills', async () => {
    const s = scenes.soapFilmInFrame;
    const { data } = await sharp(s.photo).raw().toBuffer({ resolveWithObject: true });
    const select = pureSurface(s, 'cloth', 3);
    let sum = 0;
    let sum2 = 0;
    let n = 0;
    for (let p = 0; p < 480 * 360; p++) {
      if (!select(p)) continue;
      const v = data[p * 3 + 1];
      sum += v;
      sum2 += v * v;
      n++;
    }
    const sd = Math.sqrt(sum2 / n - (sum / n) ** 2);
    expect(sd).toBeGreaterThan(2);
    expect(sd).toBeLessThan(15);
  });
});

// ---------------------------------------------------------------------------------------------
// Camera effects of the light scenes (bench/camera-effects.js, bench/light-scenes.js; issue 14).
// Checks of our own invented scenes: the generator's effects are what its header says they are.

describe('light scenes: the camera effects are what the generator claims', () => {
  const light = unevenLight(480, 360, UNEVEN_LIGHT);
  const at = (x: number, y: number) => light.gain[y * 480 + x];

  it('uneven light: largest gain 1; 35 % fall-off between the corners along the light; cos⁴ vignetting 25 % at the corners', () => {
    let max = 0;
    let min = Infinity;
    for (const g of light.gain) ((max = Math.max(max, g)), (min = Math.min(min, g)));
    expect(max).toBe(1);
    // the direction (32° below +x) runs from the top-left corner to the bottom-right one; both
    // corners are equally far from the centre, so their vignetting cancels in the ratio
    expect(at(479, 359) / at(0, 0)).toBeCloseTo(1 - 0.35, 2);
    expect(falloffAt(0, 0.35, UNEVEN_LIGHT.steepness)).toBe(1);
    expect(falloffAt(1, 0.35, UNEVEN_LIGHT.steepness)).toBeCloseTo(0.65, 12);
    // cos⁴ law of natural vignetting (common practice): cos⁴(atan(r/f)), 0.75 at half the diagonal
    const rCorner = Math.hypot(240, 180);
    expect(Math.cos(Math.atan(rCorner / light.focalPx)) ** 4).toBeCloseTo(0.75, 12);
    expect(vignetting(rCorner, light.focalPx)).toBeCloseTo(0.75, 12);
    expect(vignetting(0.4 * rCorner, light.focalPx)).toBeCloseTo(Math.cos(Math.atan((0.4 * rCorner) / light.focalPx)) ** 4, 12);
    // darkest pixel: the far corner, both effects together, relative to the brightest
    expect(min).toBe(at(479, 359));
    expect(min).toBeGreaterThan(0.65 * 0.75 * 0.99);
    expect(min).toBeLessThan(0.65);
  });

  it('uneven light: not along an axis (falls along x and along y), smooth (neighbours within 0.5 %)', () => {
    expect(at(60, 180)).toBeGreaterThan(at(420, 180));
    expect(at(240, 30)).toBeGreaterThan(at(240, 330));
    let step = 0;
    for (let y = 0; y < 360; y++) for (let x = 1; x < 480; x++) step = Math.max(step, Math.abs(at(x, y) - at(x - 1, y)));
    expect(step).toBeLessThan(0.005);
  });

  it('tone curve: through 0 and 1, strictly increasing, an S (darker shadows, brighter highlights), not a cubic', () => {
    const curve = toneCurve(PICTURE_STYLE);
    expect(curve(0)).toBeCloseTo(0, 12);
    expect(curve(1)).toBeCloseTo(1, 12);
    let previous = -1;
    for (let i = 0; i <= 1000; i++) {
      const v = curve(i / 1000);
      expect(v).toBeGreaterThan(previous);
      previous = v;
    }
    expect(curve(0.2)).toBeLessThan(0.2 - 0.03);
    expect(curve(0.8)).toBeGreaterThan(0.8 + 0.03);
    // least-squares cubic through 101 points leaves a visible residual: the family is not a low-order polynomial
    const xs = Array.from({ length: 101 }, (_, i) => i / 100);
    const A = xs.map((x) => [1, x, x * x, x * x * x]);
    const b = xs.map((x) => curve(x));
    const ata = [0, 1, 2, 3].map((i) => [0, 1, 2, 3].map((j) => A.reduce((s, row) => s + row[i] * row[j], 0)));
    const atb = [0, 1, 2, 3].map((i) => A.reduce((s, row, k) => s + row[i] * b[k], 0));
    // Gaussian elimination on the 4 × 4 normal equations
    for (let i = 0; i < 4; i++) {
      for (let k = i + 1; k < 4; k++) {
        const f = ata[k][i] / ata[i][i];
        for (let j = i; j < 4; j++) ata[k][j] -= f * ata[i][j];
        atb[k] -= f * atb[i];
      }
    }
    const c = [0, 0, 0, 0];
    for (let i = 3; i >= 0; i--) c[i] = (atb[i] - [0, 1, 2, 3].slice(i + 1).reduce((s, j) => s + ata[i][j] * c[j], 0)) / ata[i][i];
    const residual = Math.max(...xs.map((x, k) => Math.abs(c[0] + c[1] * x + c[2] * x * x + c[3] * x ** 3 - b[k])));
    expect(residual).toBeGreaterThan(0.003);
  });

  it('saturation: greys unchanged; BT.601 luma kept and Cb, Cr scaled by 1.25 (ITU-R BT.601 YCbCr, common practice)', () => {
    const identity = (e: number) => e;
    const curve = toneCurve(PICTURE_STYLE);
    for (const v of [0, 0.18, 0.5, 0.93, 1]) {
      const grey = Float64Array.of(v, v, v);
      applyPictureStyle(identity, 1.25, grey);
      expect([...grey]).toEqual([v, v, v]);
      const styled = Float64Array.of(v, v, v);
      applyPictureStyle(curve, 1.25, styled);
      expect(styled[0]).toBe(styled[1]);
      expect(styled[1]).toBe(styled[2]);
      expect(styled[0]).toBeCloseTo(curve(v), 12);
    }
    const ycbcr = (r: number, g: number, b: number) => {
      const y = 0.299 * r + 0.587 * g + 0.114 * b;
      return [y, (b - y) / 1.772, (r - y) / 1.402];
    };
    const rgb = Float64Array.of(0.62, 0.45, 0.38);
    const before = ycbcr(rgb[0], rgb[1], rgb[2]);
    applyPictureStyle(identity, 1.25, rgb);
    const after = ycbcr(rgb[0], rgb[1], rgb[2]);
    expect(after[0]).toBeCloseTo(before[0], 12);
    expect(after[1]).toBeCloseTo(1.25 * before[1], 12);
    expect(after[2]).toBeCloseTo(1.25 * before[2], 12);
  });

  it('the light scenes carry the truth of their effects, and the cloth behind the film went through both', async () => {
    const a = await soapFilmUnevenLight();
    expect(a.pictureStyle).toBeNull();
    expect(a.unevenLight!.falloff).toBe(0.35);
    expect(a.unevenLight!.vignettingLoss).toBe(0.25);
    expect(a.unevenLight!.directionDeg % 90).not.toBe(0);
    expect(a.unevenLight!.gain).toEqual(unevenLight(480, 360, { ...UNEVEN_LIGHT, directionDeg: a.unevenLight!.directionDeg }).gain);
    expect(truthFractions(a).filmFraction).toBe(1);
    const c = await soapFilmStyledUnevenInFrame();
    expect(c.pictureStyle).toEqual(PICTURE_STYLE);
    expect(c.unevenLight!.gain.length).toBe(480 * 360);
    // the composition rule with both effects: code = 255·style(sRGB(gain·exposure·ρ + flare)), per
    // pixel of pure cloth with the cloth's mean reflectance (the weave averages out)
    const select = pureSurface(c, 'cloth', 3);
    const { data } = await sharp(c.photo).raw().toBuffer({ resolveWithObject: true });
    const curve = toneCurve(c.pictureStyle!);
    const rho = c.surfaces.find((x) => x.name === 'cloth')!.reflectanceRgb;
    const expected = [0, 0, 0];
    const got = [0, 0, 0];
    let n = 0;
    const triple = new Float64Array(3);
    for (let p = 0; p < 480 * 360; p++) {
      if (!select(p)) continue;
      n++;
      for (let k = 0; k < 3; k++) triple[k] = encodeSrgb(c.unevenLight!.gain[p] * c.exposure * rho[k] + c.flare[k]);
      applyPictureStyle(curve, c.pictureStyle!.saturation, triple);
      for (let k = 0; k < 3; k++) ((expected[k] += 255 * triple[k]), (got[k] += data[p * 3 + k]));
    }
    expect(n).toBeGreaterThan(50_000);
    for (let k = 0; k < 3; k++) expect(Math.abs(got[k] / n - expected[k] / n)).toBeLessThan(2);
    // and the styled, dimmed cloth is darker than the plain cloth of soapFilmInFrame
    const plain = await meanCodes(scenes.soapFilmInFrame, pureSurface(scenes.soapFilmInFrame, 'cloth', 3));
    expect(got[1] / n).toBeLessThan(plain.mean[1] - 3);
  }, 30_000);
});
