// Field scenes: photos of thin films as they are taken, for the tests and `npm run bench:accuracy`.
//
// EVERY SCENE HERE IS INVENTED: made-up geometry, made-up thickness fields and made-up surfaces,
// our own scenarios (a lab's draining soap-film frame, a wafer batch on a chuck or a bench), not
// measurements. The film is rendered with the project's own forward model (renderPhoto, through a
// linear camera so that it stays in linear light), then composed with what is not film IN LINEAR
// LIGHT and passed through the same camera as the film:
//
//     encoded_c = sRGB( exposure · reflectance_c + flare_c + noise_c )         (per pixel)
//
// where `reflectance_c · exposure` is the film's linear colour from renderPhoto on film pixels and
// a textured surface's reflectance times the same exposure elsewhere; edges are blended over about
// a pixel (coverage from a signed distance); `noise_c` is seeded Gaussian sensor noise
// (createNormal, src/colour/seededNormal.ts); `sRGB` is the project's tabulated transfer function
// (encodedCodeTable, src/colour/encodedCodeTable.ts). Photos are JPEG quality 90 with 4:2:0
// chroma, as cameras write them (common practice), unless a scene says otherwise.
//
// How "reflectance" is read for diffuse surfaces next to a soap film. A soap film mirrors a bright
// lamp panel, so its photo is exposed ×7; a dark cloth lit by the room reflects far less of that
// panel than its albedo. The cloth is therefore given the reflectance that puts it at a linear
// level of 0.01–0.03 in the photo (what black velvet shows beside a lit film, codes ≈ 30–50), not
// an albedo of 0.01–0.03 times 7, which would show it mid-grey. Wafer scenes (exposure ≈ 1.3) use
// the surfaces' reflectances as they are.
//
// Camera effects (issue 14; bench/camera-effects.js has the formulas): a scene may add uneven
// light (a smooth gain multiplying `exposure · reflectance_c`, glints included, before flare and
// noise) and a picture style (tone curve and saturation on the encoded values before the 8-bit
// rounding); the record keeps their truth (`unevenLight`, `pictureStyle`; null when none). The
// scenes with effects are in bench/light-scenes.js, which builds on the canvas, surfaces and
// scene parts exported here; the scenes of this file use no effect.
//
// Truth per scene: `film` (1 = film) where the film covers at least half the pixel and no glint
// lies on it; `truthNm` the film's thickness there (NaN elsewhere); `edge` (1 = the truth is shared)
// on pixels the composition blends (film and surface both present) and on a glint's faint rim
// (added light 0.005–0.05), which scores leave out on both sides.
import sharp from 'sharp';
import { buildCamera, createNormal, createUniform, decodeSrgb, encodeSrgb, encodedCodeTable, resolveLight } from '../dist/colour/index.js';
import { resolveStack } from '../dist/optics/index.js';
import { renderPhoto } from '../dist/render/index.js';
import { applyPictureStyle, toneCurve } from './camera-effects.js';

export const FIELD_WIDTH = 480;
export const FIELD_HEIGHT = 360;
/** Added glint light (linear) at or above which a film pixel is not film in truth. */
export const GLINT_NOT_FILM = 0.05;
/** Added glint light (linear) above which a film pixel's truth is shared (see the header). */
export const GLINT_EDGE = 0.005;

/**
 * @typedef {{ readonly id: number, readonly name: string, readonly reflectanceRgb: readonly [number, number, number] }} Surface
 *   a non-film surface: its id in `labels` and its mean reflectance (linear, before exposure)
 * @typedef {{
 *   name: string, description: string, fileName: string, format: 'jpeg' | 'png',
 *   width: number, height: number, stack: string, light: string, angleDeg: number,
 *   thinBelowNm: number | null, exposure: number, flare: readonly [number, number, number], noiseSigma: number,
 *   truthNm: Float32Array, film: Uint8Array, edge: Uint8Array, labels: Uint8Array, mixed: Uint8Array,
 *   surfaces: Surface[], rgb: Uint8Array, photo: Buffer, mapOptions: Record<string, unknown>,
 *   variants?: { name: string, mapOptions: Record<string, unknown> }[],
 *   unevenLight?: import('./camera-effects.js').UnevenLight | null, pictureStyle?: import('./camera-effects.js').PictureStyle | null
 * }} FieldScene
 *   `unevenLight` and `pictureStyle`: the truth of the camera effects applied (bench/camera-effects.js), null when none
 * @typedef {{ unevenLight?: import('./camera-effects.js').UnevenLight | null, pictureStyle?: import('./camera-effects.js').PictureStyle | null }} SceneEffects
 */

// ---------------------------------------------------------------------------------------------
// Texture: seeded value noise (smooth random fields) and signed distances

/**
 * Smooth value noise in [-1, 1]: random values on a lattice of cellX × cellY pixels, blended with
 * a smoothstep. Returns a function of pixel coordinates (no allocation per call).
 * @param {number} seed @param {number} cellX @param {number} cellY
 * @returns {(x: number, y: number) => number}
 */
export function valueNoise(seed, cellX, cellY) {
  const uniform = createUniform(seed);
  const nx = Math.ceil((FIELD_WIDTH + 64) / cellX) + 3;
  const ny = Math.ceil((FIELD_HEIGHT + 64) / cellY) + 3;
  const lattice = new Float32Array(nx * ny);
  for (let i = 0; i < lattice.length; i++) lattice[i] = 2 * uniform() - 1;
  return (x, y) => {
    const gx = (x + 32) / cellX;
    const gy = (y + 32) / cellY;
    let ix = Math.floor(gx);
    let iy = Math.floor(gy);
    let fx = gx - ix;
    let fy = gy - iy;
    ix = ix < 0 ? 0 : ix > nx - 2 ? nx - 2 : ix;
    iy = iy < 0 ? 0 : iy > ny - 2 ? ny - 2 : iy;
    fx = fx * fx * (3 - 2 * fx);
    fy = fy * fy * (3 - 2 * fy);
    const k = iy * nx + ix;
    const top = lattice[k] + fx * (lattice[k + 1] - lattice[k]);
    const bottom = lattice[k + nx] + fx * (lattice[k + nx + 1] - lattice[k + nx]);
    return top + fy * (bottom - top);
  };
}

/**
 * Fractal sum of value noise (octaves halve the cell and the amplitude), roughly in [-1, 1].
 * @param {number} seed @param {number} cellX @param {number} cellY @param {number} octaves
 */
export function fractalNoise(seed, cellX, cellY, octaves) {
  /** @type {((x: number, y: number) => number)[]} */
  const layers = [];
  for (let o = 0; o < octaves; o++) layers.push(valueNoise(seed * 31 + o * 7919, Math.max(1, cellX / 2 ** o), Math.max(1, cellY / 2 ** o)));
  const norm = 1 / (2 - 2 ** (1 - octaves));
  return (/** @type {number} */ x, /** @type {number} */ y) => {
    let sum = 0;
    let amplitude = 1;
    for (let o = 0; o < layers.length; o++) {
      sum += amplitude * layers[o](x, y);
      amplitude *= 0.5;
    }
    return sum * norm;
  };
}

/** Coverage of a pixel by a shape from its signed distance (px, negative inside): a one-pixel ramp. */
export function coverage(/** @type {number} */ sdPx) {
  const a = 0.5 - sdPx;
  return a <= 0 ? 0 : a >= 1 ? 1 : a;
}

/** Signed distance to a rounded rectangle centred at (cx, cy) with half sizes hw, hh and corner radius r. */
function sdRoundRect(/** @type {number} */ x, /** @type {number} */ y, /** @type {number} */ cx, /** @type {number} */ cy, /** @type {number} */ hw, /** @type {number} */ hh, /** @type {number} */ r) {
  const qx = Math.abs(x - cx) - (hw - r);
  const qy = Math.abs(y - cy) - (hh - r);
  const ox = qx > 0 ? qx : 0;
  const oy = qy > 0 ? qy : 0;
  return Math.hypot(ox, oy) + Math.min(Math.max(qx, qy), 0) - r;
}

/**
 * Signed distance to a tapered bar from (ax, ay) (half width ra) to (bx, by) (half width rb), and
 * the position t (0..1) along it.
 * @param {Float64Array} out receives [distance, t]
 */
function sdTaperedBar(/** @type {number} */ x, /** @type {number} */ y, /** @type {number} */ ax, /** @type {number} */ ay, /** @type {number} */ bx, /** @type {number} */ by, /** @type {number} */ ra, /** @type {number} */ rb, out) {
  const dx = bx - ax;
  const dy = by - ay;
  const length2 = dx * dx + dy * dy;
  let t = ((x - ax) * dx + (y - ay) * dy) / length2;
  t = t < 0 ? 0 : t > 1 ? 1 : t;
  const px = ax + t * dx - x;
  const py = ay + t * dy - y;
  out[0] = Math.hypot(px, py) - (ra + t * (rb - ra));
  out[1] = t;
}

/** Rotates (x, y) about (cx, cy) by angleRad into `out` (the frame's own coordinates). */
export function rotate(/** @type {number} */ x, /** @type {number} */ y, /** @type {number} */ cx, /** @type {number} */ cy, /** @type {number} */ angleRad, /** @type {Float64Array} */ out) {
  const c = Math.cos(angleRad);
  const s = Math.sin(angleRad);
  out[0] = cx + c * (x - cx) + s * (y - cy);
  out[1] = cy - s * (x - cx) + c * (y - cy);
}

// ---------------------------------------------------------------------------------------------
// The canvas: layers painted back to front in linear light

export function createCanvas(/** @type {number} */ exposure) {
  const n = FIELD_WIDTH * FIELD_HEIGHT;
  return {
    exposure,
    /** Linear light before flare and noise, 3 per pixel. */
    linear: new Float32Array(n * 3),
    /** Share of the pixel that is film. */
    filmWeight: new Float32Array(n),
    /** Linear light added by glints. */
    glint: new Float32Array(n),
    /** Top-most layer covering at least half of the pixel (0 = film). */
    labels: new Uint8Array(n),
    /** 1 where more than one layer shows in the pixel. */
    mixed: new Uint8Array(n),
    /** @type {Surface[]} */
    surfaces: [],
  };
}

/**
 * Paints a surface: per pixel coverage α (0..1) and reflectance (written into `rho`), blended
 * in linear light over what lies beneath: linear = (1 − α)·linear + α·exposure·ρ.
 * @param {ReturnType<typeof createCanvas>} canvas
 * @param {string} name
 * @param {readonly [number, number, number]} meanReflectanceRgb the surface's nominal reflectance (for the record)
 * @param {(x: number, y: number) => number} alphaAt
 * @param {(x: number, y: number, rho: Float64Array) => void} reflectanceAt
 */
export function paintSurface(canvas, name, meanReflectanceRgb, alphaAt, reflectanceAt) {
  const id = canvas.surfaces.length + 1;
  canvas.surfaces.push({ id, name, reflectanceRgb: meanReflectanceRgb });
  const rho = new Float64Array(3);
  const e = canvas.exposure;
  for (let y = 0, p = 0; y < FIELD_HEIGHT; y++) {
    for (let x = 0; x < FIELD_WIDTH; x++, p++) {
      const a = alphaAt(x + 0.5, y + 0.5);
      if (a <= 0) continue;
      reflectanceAt(x + 0.5, y + 0.5, rho);
      const o = p * 3;
      const keep = 1 - a;
      canvas.linear[o] = keep * canvas.linear[o] + a * e * rho[0];
      canvas.linear[o + 1] = keep * canvas.linear[o + 1] + a * e * rho[1];
      canvas.linear[o + 2] = keep * canvas.linear[o + 2] + a * e * rho[2];
      canvas.filmWeight[p] *= keep;
      if (a < 1) canvas.mixed[p] = 1;
      else canvas.mixed[p] = 0;
      if (a >= 0.5) canvas.labels[p] = id;
    }
  }
  return id;
}

/**
 * Paints the film: coverage α from `alphaAt`, colour from the rendered linear film photo.
 * @param {ReturnType<typeof createCanvas>} canvas
 * @param {(x: number, y: number) => number} alphaAt
 * @param {Float32Array} filmLinear 3 per pixel (already times the exposure)
 */
export function paintFilm(canvas, alphaAt, filmLinear) {
  for (let y = 0, p = 0; y < FIELD_HEIGHT; y++) {
    for (let x = 0; x < FIELD_WIDTH; x++, p++) {
      const a = alphaAt(x + 0.5, y + 0.5);
      if (a <= 0) continue;
      const o = p * 3;
      const keep = 1 - a;
      canvas.linear[o] = keep * canvas.linear[o] + a * filmLinear[o];
      canvas.linear[o + 1] = keep * canvas.linear[o + 1] + a * filmLinear[o + 1];
      canvas.linear[o + 2] = keep * canvas.linear[o + 2] + a * filmLinear[o + 2];
      canvas.filmWeight[p] = keep * canvas.filmWeight[p] + a;
      canvas.mixed[p] = a < 1 ? 1 : 0;
      if (a >= 0.5) canvas.labels[p] = 0;
    }
  }
}

/**
 * Adds a lamp glint: a clipped core of radiusPx (anti-aliased) and a soft halo falling off with
 * a Gaussian of haloPx beyond it (peak `haloPeak`, linear), white light added on top of everything.
 */
export function addGlint(/** @type {ReturnType<typeof createCanvas>} */ canvas, /** @type {number} */ cx, /** @type {number} */ cy, /** @type {number} */ radiusPx, /** @type {number} */ haloPx, /** @type {number} */ haloPeak) {
  const reach = radiusPx + 5 * haloPx + 2;
  for (let y = Math.max(0, Math.floor(cy - reach)); y < Math.min(FIELD_HEIGHT, Math.ceil(cy + reach)); y++) {
    for (let x = Math.max(0, Math.floor(cx - reach)); x < Math.min(FIELD_WIDTH, Math.ceil(cx + reach)); x++) {
      const d = Math.hypot(x + 0.5 - cx, y + 0.5 - cy);
      const core = coverage(d - radiusPx);
      const beyond = d > radiusPx ? d - radiusPx : 0;
      const amount = 3 * core + haloPeak * Math.exp(-(beyond * beyond) / (2 * haloPx * haloPx));
      const p = y * FIELD_WIDTH + x;
      canvas.glint[p] += amount;
      const o = p * 3;
      canvas.linear[o] += amount;
      canvas.linear[o + 1] += amount;
      canvas.linear[o + 2] += amount;
    }
  }
}

/**
 * The camera: optional uneven light (the gain multiplies the linear light of everything, before
 * flare), flare, seeded sensor noise, clamp, sRGB, optional picture style on the encoded values,
 * 8-bit (bench/camera-effects.js describes the effects). Without effects: the project's code table.
 * @param {ReturnType<typeof createCanvas>} canvas
 * @param {readonly [number, number, number]} flare
 * @param {number} noiseSigma
 * @param {number} seed
 * @param {SceneEffects} [effects]
 * @returns {Uint8Array} interleaved RGB
 */
function exposeCanvas(canvas, flare, noiseSigma, seed, effects = {}) {
  const normal = createNormal(seed);
  const rgb = new Uint8Array(canvas.linear.length);
  const gain = effects.unevenLight ? effects.unevenLight.gain : null;
  const style = effects.pictureStyle ?? null;
  if (!style) {
    const { codes, maxIndex } = encodedCodeTable('srgb', 8);
    for (let i = 0; i < rgb.length; i++) {
      let v = (gain ? gain[(i / 3) | 0] * canvas.linear[i] : canvas.linear[i]) + flare[i % 3] + noiseSigma * normal();
      v = v < 0 ? 0 : v > 1 ? 1 : v;
      rgb[i] = codes[(v * maxIndex + 0.5) | 0];
    }
    return rgb;
  }
  const curve = toneCurve(style);
  const triple = new Float64Array(3);
  for (let p = 0, i = 0; i < rgb.length; p++, i += 3) {
    const g = gain ? gain[p] : 1;
    for (let c = 0; c < 3; c++) {
      const v = g * canvas.linear[i + c] + flare[c] + noiseSigma * normal();
      triple[c] = encodeSrgb(v < 0 ? 0 : v > 1 ? 1 : v);
    }
    applyPictureStyle(curve, style.saturation, triple);
    rgb[i] = Math.round(255 * triple[0]);
    rgb[i + 1] = Math.round(255 * triple[1]);
    rgb[i + 2] = Math.round(255 * triple[2]);
  }
  return rgb;
}

/** Offset added in the linear film render and taken off again: keeps out-of-gamut (negative) channels. */
const LINEAR_OFFSET = 0.2;

/**
 * Renders a thickness field (NaN = no film there) to the film's linear colour times the exposure,
 * with the project's forward model through a linear camera (16-bit, no noise). Saturated film
 * colours lie outside the sRGB gamut (a channel slightly below 0, which the camera clamps only
 * after the flare is added), so the render carries an offset that is taken off again; a value
 * clipped at either end of the render is refused.
 * @returns {Float32Array} 3 per pixel
 */
export function renderFilmLinear(/** @type {Float32Array} */ fieldNm, /** @type {string} */ stackName, /** @type {string} */ lightName, /** @type {number} */ angleDeg, /** @type {number} */ exposure) {
  const light = resolveLight(lightName);
  const camera = { ...buildCamera({ light }), encoding: /** @type {const} */ ('linear') };
  const rendered = renderPhoto(fieldNm, FIELD_WIDTH, FIELD_HEIGHT, {
    stack: resolveStack(stackName), light, camera, angleRad: (angleDeg * Math.PI) / 180, exposure, flare: LINEAR_OFFSET, noiseSigma: 0, bitDepth: 16,
  });
  const out = new Float32Array(rendered.data.length);
  for (let i = 0; i < out.length; i++) {
    const code = rendered.data[i];
    if (fieldNm[(i / 3) | 0] >= 0 && (code === 0 || code === 65535)) {
      throw new RangeError(`renderFilmLinear: the film's linear colour left the range the render can hold (code ${code} at sample ${i})`);
    }
    out[i] = code / 65535 - LINEAR_OFFSET;
  }
  return out;
}

/** Encodes interleaved 8-bit RGB as the scene's photo file. */
async function encodePhoto(/** @type {Uint8Array} */ rgb, /** @type {'jpeg' | 'png'} */ format) {
  const image = sharp(Buffer.from(rgb.buffer, rgb.byteOffset, rgb.byteLength), { raw: { width: FIELD_WIDTH, height: FIELD_HEIGHT, channels: 3 } });
  return format === 'jpeg' ? image.jpeg({ quality: 90, chromaSubsampling: '4:2:0' }).toBuffer() : image.png().toBuffer();
}

/**
 * Truth and photo of a finished canvas.
 * @param {ReturnType<typeof createCanvas>} canvas
 * @param {Float32Array | null} fieldNm
 * @param {Omit<FieldScene, 'truthNm' | 'film' | 'edge' | 'labels' | 'mixed' | 'surfaces' | 'rgb' | 'photo' | 'width' | 'height' | 'format' | 'fileName' | 'unevenLight' | 'pictureStyle'> & { format?: 'jpeg' | 'png', fileName?: string, seed: number, effects?: SceneEffects }} spec
 * @returns {Promise<FieldScene>}
 */
export async function finishScene(canvas, fieldNm, spec) {
  const n = FIELD_WIDTH * FIELD_HEIGHT;
  const truthNm = new Float32Array(n).fill(Number.NaN);
  const film = new Uint8Array(n);
  const edge = new Uint8Array(n);
  for (let p = 0; p < n; p++) {
    const w = canvas.filmWeight[p];
    if (w <= 0) continue;
    const g = canvas.glint[p];
    if (w < 1 || (g > GLINT_EDGE && g < GLINT_NOT_FILM)) edge[p] = 1;
    if (w >= 0.5 && g < GLINT_NOT_FILM && fieldNm) {
      film[p] = 1;
      truthNm[p] = fieldNm[p];
    }
  }
  const format = spec.format ?? 'jpeg';
  const effects = spec.effects ?? {};
  const rgb = exposeCanvas(canvas, spec.flare, spec.noiseSigma, spec.seed, effects);
  const { seed, effects: _effects, ...rest } = spec;
  return {
    ...rest,
    unevenLight: effects.unevenLight ?? null,
    pictureStyle: effects.pictureStyle ?? null,
    format,
    fileName: spec.fileName ?? `${spec.name}.${format === 'jpeg' ? 'jpg' : 'png'}`,
    width: FIELD_WIDTH,
    height: FIELD_HEIGHT,
    truthNm,
    film,
    edge,
    labels: canvas.labels,
    mixed: canvas.mixed,
    surfaces: canvas.surfaces,
    rgb,
    photo: await encodePhoto(rgb, format),
  };
}

// ---------------------------------------------------------------------------------------------
// Surfaces (all invented)

/** Dark cloth behind a soap-film frame: weave, soft vertical folds, mottling. Linear level ≈ exposure·0.0022 ≈ 0.015. */
export function darkCloth(/** @type {number} */ seed) {
  const folds = valueNoise(seed, 140, 400);
  const mottle = fractalNoise(seed + 1, 60, 60, 3);
  const fibre = valueNoise(seed + 2, 1.3, 1.3);
  /** @type {readonly [number, number, number]} */
  const mean = [0.0022, 0.00215, 0.0024];
  return {
    mean,
    /** @param {number} x @param {number} y @param {Float64Array} rho */
    at(x, y, rho) {
      const fold = 1 + 0.3 * Math.sin((2 * Math.PI * x) / 85 + 2.2 * folds(x, y));
      const weave = 1 + 0.07 * Math.sin((2 * Math.PI * x) / 3.2) * Math.sin((2 * Math.PI * y) / 3.2) + 0.05 * fibre(x, y);
      const f = fold * weave * (1 + 0.12 * mottle(x, y));
      rho[0] = mean[0] * f;
      rho[1] = mean[1] * f;
      rho[2] = mean[2] * f;
    },
  };
}

/**
 * Brushed metal: streaks along the piece (`alongX` tells which way it runs at a point), a
 * specular stripe at `stripeAt` (−1..1 across the piece) and the base reflectance `base`.
 */
function brushedMetal(/** @type {number} */ seed, /** @type {number} */ base, /** @type {number} */ stripePeak) {
  const streaksX = valueNoise(seed, 40, 0.8);
  const streaksY = valueNoise(seed + 1, 0.8, 40);
  const glow = valueNoise(seed + 2, 70, 70);
  /** @type {readonly [number, number, number]} */
  const mean = [base * 1.0, base * 1.01, base * 1.04];
  return {
    mean,
    /**
     * @param {number} x @param {number} y @param {Float64Array} rho
     * @param {number} across position across the piece, −1..1 @param {boolean} alongX
     */
    at(x, y, rho, across, alongX) {
      const streak = 1 + 0.18 * (alongX ? streaksX(x, y) : streaksY(x, y));
      const d = across - 0.35;
      const stripe = stripePeak * (0.65 + 0.35 * glow(x, y)) * Math.exp(-(d * d) / (2 * 0.2 * 0.2));
      rho[0] = mean[0] * streak + stripe;
      rho[1] = mean[1] * streak + stripe;
      rho[2] = mean[2] * streak + stripe;
    },
  };
}

/** A mid-grey lab bench with grain running along x, lit a little more from the left. */
export function greyBench(/** @type {number} */ seed, /** @type {number} */ base) {
  const grain = fractalNoise(seed, 90, 5, 3);
  const mottle = fractalNoise(seed + 1, 80, 80, 2);
  const speck = valueNoise(seed + 2, 1.1, 1.1);
  /** @type {readonly [number, number, number]} */
  const mean = [base, base * 0.99, base * 0.96];
  return {
    mean,
    /** @param {number} x @param {number} y @param {Float64Array} rho */
    at(x, y, rho) {
      const light = 1 + 0.06 * (0.5 - x / FIELD_WIDTH);
      const f = light * (1 + 0.05 * grain(x, y) + 0.03 * mottle(x, y) + 0.02 * speck(x, y));
      rho[0] = mean[0] * f;
      rho[1] = mean[1] * f;
      rho[2] = mean[2] * f;
    },
  };
}

/** A near-black anodised vacuum chuck with concentric grooves around (cx, cy). */
export function darkChuck(/** @type {number} */ seed, /** @type {number} */ cx, /** @type {number} */ cy) {
  const mottle = fractalNoise(seed, 70, 70, 3);
  const tooling = valueNoise(seed + 1, 1.2, 1.2);
  /** @type {readonly [number, number, number]} */
  const mean = [0.02, 0.02, 0.021];
  return {
    mean,
    /** @param {number} x @param {number} y @param {Float64Array} rho */
    at(x, y, rho) {
      const r = Math.hypot(x - cx, y - cy);
      const phase = (r % 17) - 8.5;
      const groove = 1 - 0.3 * Math.exp(-(phase * phase) / 0.8);
      const f = groove * (1 + 0.08 * mottle(x, y) + 0.04 * tooling(x, y));
      rho[0] = mean[0] * f;
      rho[1] = mean[1] * f;
      rho[2] = mean[2] * f;
    },
  };
}

// ---------------------------------------------------------------------------------------------
// Soap film in a wire frame

/** The frame of the soap-film scenes: centre line of a slightly tilted rounded rectangle of wire. */
export const FRAME = { cx: 240, hw: 162, hh: 145, cornerPx: 8, wirePx: 5, tiltRad: (-1.2 * Math.PI) / 180 };

/**
 * Thickness of the invented draining soap film (nm) at frame coordinates u (0 left … 1 right),
 * v (0 top … 1 bottom) at drainage stage `stage` (0 = fresh): common black film (5–8 nm) at the
 * top, a sharp front to grey first-order film, a gravity wedge rising to ≈ 1.2 µm at the bottom,
 * thinner swirls rising along the side wires.
 */
export function soapFilmThicknessNm(/** @type {number} */ u, /** @type {number} */ v, /** @type {number} */ stage, /** @type {number} */ wobble, /** @type {number} */ grain) {
  const blackEdge = 0.054 + 0.06 * stage + 0.014 * Math.sin(2 * Math.PI * (1.6 * u + 0.2)) + 0.01 * wobble;
  if (v < blackEdge) return 6.5 + 1.2 * grain;
  const w = (v - blackEdge) / (1 - blackEdge) + 0.015 * wobble;
  const drained = 1 / Math.sqrt(1 + 2.5 * stage);
  let h = 30 + 1170 * drained * Math.pow(w > 0 ? w : 0, 1.45);
  for (const [su, sv, ru, rv, depth] of SWIRLS) {
    // swirls rise along the wires as the film drains
    const du = (u - su) / ru;
    const dv = (v - sv + 0.06 * stage) / rv;
    h *= 1 - depth * Math.exp(-(du * du + dv * dv));
  }
  return h;
}

/** Swirls of marginal regeneration along the side wires: [u, v, radius u, radius v, depth]. */
const SWIRLS = [
  [0.035, 0.3, 0.045, 0.09, 0.45],
  [0.05, 0.55, 0.05, 0.1, 0.4],
  [0.03, 0.8, 0.04, 0.08, 0.3],
  [0.965, 0.4, 0.045, 0.1, 0.45],
  [0.95, 0.68, 0.05, 0.09, 0.35],
];

/**
 * Paints the frame scene: cloth, film, wire, handle. `shiftY` moves the frame up (negative) or
 * down; `stage` is the drainage stage; `withFilm` false leaves the frame empty (a burst film).
 */
export function soapFrameCanvas(/** @type {{ shiftY: number, stage: number, withFilm: boolean, seed: number, droplets?: boolean }} */ o) {
  const exposure = 7;
  const canvas = createCanvas(exposure);
  const cy = 181 + o.shiftY;
  const { cx, hw, hh, cornerPx, wirePx, tiltRad } = FRAME;
  const q = new Float64Array(2);
  const cloth = darkCloth(o.seed + 10);
  paintSurface(canvas, 'cloth', cloth.mean, () => 1, cloth.at);

  let fieldNm = null;
  if (o.withFilm) {
    fieldNm = new Float32Array(FIELD_WIDTH * FIELD_HEIGHT).fill(Number.NaN);
    const wobble = fractalNoise(o.seed + 20, 120, 60, 2);
    const grain = valueNoise(o.seed + 21, 9, 9);
    for (let y = 0, p = 0; y < FIELD_HEIGHT; y++) {
      for (let x = 0; x < FIELD_WIDTH; x++, p++) {
        rotate(x + 0.5, y + 0.5, cx, cy, tiltRad, q);
        if (sdRoundRect(q[0], q[1], cx, cy, hw, hh, cornerPx) > 1) continue;
        const u = (q[0] - (cx - hw)) / (2 * hw);
        const v = (q[1] - (cy - hh)) / (2 * hh);
        fieldNm[p] = soapFilmThicknessNm(u, v, o.stage, wobble(x, y), grain(x, y));
      }
    }
    const filmLinear = renderFilmLinear(fieldNm, 'soap-film', 'D65', 0, exposure);
    paintFilm(canvas, (x, y) => (rotate(x, y, cx, cy, tiltRad, q), coverage(sdRoundRect(q[0], q[1], cx, cy, hw, hh, cornerPx))), filmLinear);
  }

  const metal = brushedMetal(o.seed + 30, 0.018, 0.09);
  paintSurface(
    canvas,
    'wire',
    metal.mean,
    (x, y) => (rotate(x, y, cx, cy, tiltRad, q), coverage(Math.abs(sdRoundRect(q[0], q[1], cx, cy, hw, hh, cornerPx)) - wirePx / 2)),
    (x, y, rho) => {
      rotate(x, y, cx, cy, tiltRad, q);
      const sd = sdRoundRect(q[0], q[1], cx, cy, hw, hh, cornerPx);
      const alongX = Math.abs(q[1] - cy) - hh > Math.abs(q[0] - cx) - hw;
      // lit from the upper left: the stripe sits on the outer side of the top and left wires
      const outward = alongX ? (q[1] < cy ? 1 : -1) : q[0] < cx ? 1 : -1;
      metal.at(x, y, rho, (outward * sd) / (wirePx / 2), alongX);
    },
  );
  // the handle: a wire from the bottom of the frame to below the photo
  const hx = cx + 2;
  const handleTop = cy + hh;
  paintSurface(
    canvas,
    'handle',
    metal.mean,
    (x, y) => (rotate(x, y, cx, cy, tiltRad, q), q[1] < handleTop ? 0 : coverage(Math.abs(q[0] - hx) - wirePx / 2)),
    (x, y, rho) => (rotate(x, y, cx, cy, tiltRad, q), metal.at(x, y, rho, (hx - q[0]) / (wirePx / 2), false)),
  );
  if (o.droplets) {
    // droplets left on the wire after the film burst: dark lenses with a bright point
    const drops = [[0.22, 1], [0.47, 1], [0.71, 1], [0, 0.62], [1, 0.35]];
    const water = { mean: /** @type {const} */ ([0.008, 0.009, 0.01]) };
    for (const [du, dv] of drops) {
      const dxLocal = cx - hw + du * 2 * hw;
      const dyLocal = cy - hh + dv * 2 * hh + (dv === 1 ? 2.5 : 0);
      const c = Math.cos(tiltRad);
      const s = Math.sin(tiltRad);
      const px = cx + c * (dxLocal - cx) - s * (dyLocal - cy);
      const py = cy + s * (dxLocal - cx) + c * (dyLocal - cy);
      paintSurface(canvas, 'droplet', water.mean, (x, y) => coverage(Math.hypot(x - px, y - py) - 3.2), (x, y, rho) => {
        const spot = 0.12 * Math.exp(-((x - px + 1) ** 2 + (y - py + 1.2) ** 2) / 0.8);
        rho[0] = water.mean[0] + spot;
        rho[1] = water.mean[1] + spot;
        rho[2] = water.mean[2] + spot;
      });
    }
  }
  return { canvas, fieldNm };
}

export const SOAP = { stack: 'soap-film', light: 'D65', angleDeg: 0, thinBelowNm: 50, flare: /** @type {const} */ ([0.008, 0.008, 0.009]), noiseSigma: 0.003 };

/**
 * (a) A vertical draining soap film in a rectangular wire frame (wire 5 px, brushed metal with a
 * specular stripe, a handle to the bottom border) in front of a dark cloth that reaches the photo
 * border on every side; D65, exposure 7. Common black film (5–8 nm) along the top wire, a gravity
 * wedge to ≈ 1.2 µm at the bottom, thinner swirls along the side wires.
 * Truth (measured on the generator, checked in tests/field-scenes.test.ts): film 52.6 % of the
 * photo, 10.4 % of the film below the 50 nm threshold.
 */
export async function soapFilmInFrame(seed = 1301) {
  const { canvas, fieldNm } = soapFrameCanvas({ shiftY: 0, stage: 0, withFilm: true, seed });
  return finishScene(canvas, fieldNm, {
    ...SOAP, name: 'soapFilmInFrame', seed, exposure: canvas.exposure, mapOptions: {},
    description: 'draining soap film in a wire frame before a dark cloth; black film at the top wire (invented)',
  });
}

/**
 * (b) The same film framed 44 px higher: the top wire lies beyond the photo's top border and the
 * black film runs off it; dark cloth elsewhere.
 * Truth: film 51.6 % of the photo, 8.7 % of the film below 50 nm.
 */
export async function soapFilmOffBorder(seed = 1302) {
  const { canvas, fieldNm } = soapFrameCanvas({ shiftY: -44, stage: 0, withFilm: true, seed });
  return finishScene(canvas, fieldNm, {
    ...SOAP, name: 'soapFilmOffBorder', seed, exposure: canvas.exposure, mapOptions: {},
    description: 'draining soap film whose frame top and black film run off the top border (invented)',
  });
}

/**
 * (e) Scene (a) with a lamp glint on the film (a clipped blob 20 px across with a soft halo) and a
 * second, smaller glint on the left wire. The glint and its halo where it adds ≥ 0.05 (linear) are
 * not film in truth. Truth: film 52.0 % of the photo, 10.6 % of the film below 50 nm.
 */
export async function soapFilmWithGlint(seed = 1301) {
  const { canvas, fieldNm } = soapFrameCanvas({ shiftY: 0, stage: 0, withFilm: true, seed });
  addGlint(canvas, 318, 148, 10, 3.5, 0.45);
  const c = Math.cos(FRAME.tiltRad);
  const s = Math.sin(FRAME.tiltRad);
  const wx = FRAME.cx - FRAME.hw;
  const wy = 250;
  addGlint(canvas, FRAME.cx + c * (wx - FRAME.cx) - s * (wy - 181), 181 + s * (wx - FRAME.cx) + c * (wy - 181), 4, 2.5, 0.4);
  return finishScene(canvas, fieldNm, {
    ...SOAP, name: 'soapFilmWithGlint', seed: seed + 3, exposure: canvas.exposure, mapOptions: {},
    description: 'scene soapFilmInFrame with a lamp glint on the film and one on the wire (invented)',
  });
}

/**
 * (g) A series of `frames` photos of the frame scene draining over time (black film spreading
 * down, the wedge thinning), the film bursting before frame `burstAt`: from it on only the frame,
 * its handle, a few droplets on the wire and the cloth remain. File names sort in time order.
 * @returns {Promise<{ name: string, frames: FieldScene[], ruptureIndex: number | null, lastFilmIndex: number }>}
 */
export async function burstingSeries(frames = 12, burstAt = 7, seed = 1400) {
  if (!Number.isInteger(frames) || frames < 2) throw new RangeError(`burstingSeries: frames must be an integer ≥ 2, received ${frames}`);
  if (!Number.isInteger(burstAt) || burstAt < 1 || burstAt > frames) {
    throw new RangeError(`burstingSeries: burstAt must be an integer from 1 to frames (${frames}; = frames: no burst), received ${burstAt}`);
  }
  const out = [];
  for (let i = 0; i < frames; i++) {
    const withFilm = i < burstAt;
    const stage = withFilm ? (1.6 * i) / Math.max(1, burstAt - 1) : 0;
    const { canvas, fieldNm } = soapFrameCanvas({ shiftY: 0, stage, withFilm, seed: seed + 1, droplets: !withFilm });
    out.push(
      await finishScene(canvas, fieldNm, {
        ...SOAP, name: `burstingSeries frame ${i}`, fileName: `frame-${String(i).padStart(3, '0')}.jpg`, seed: seed + 100 + i,
        exposure: canvas.exposure, mapOptions: {},
        description: withFilm ? `draining soap film, frame ${i} (drainage stage ${stage.toFixed(2)}) (invented)` : `frame ${i}: the film has burst; empty wire frame (invented)`,
      }),
    );
  }
  return { name: 'burstingSeries', frames: out, ruptureIndex: burstAt < frames ? burstAt : null, lastFilmIndex: burstAt - 1 };
}

/**
 * (i) A series of `frames` photos of the frame scene whose common black film grows down from the
 * top wire (drainage stage 0 … `stageMax`; the black front at v = 0.054 + 0.06·stage of the frame's
 * height, so stage 6 blackens the top 41 %) while the coloured wedge below it thins; no burst.
 * Truth per frame as in (a). For the series film-area prior: the black film stays film.
 * @returns {Promise<{ name: string, frames: FieldScene[], ruptureIndex: null, lastFilmIndex: number }>}
 */
export async function blackFilmGrowingSeries(frames = 6, stageMax = 6, seed = 1450, shiftY = 0) {
  if (!Number.isInteger(frames) || frames < 2) throw new RangeError(`blackFilmGrowingSeries: frames must be an integer ≥ 2, received ${frames}`);
  const out = [];
  for (let i = 0; i < frames; i++) {
    const stage = (stageMax * i) / (frames - 1);
    const { canvas, fieldNm } = soapFrameCanvas({ shiftY, stage, withFilm: true, seed: seed + 1 });
    out.push(
      await finishScene(canvas, fieldNm, {
        ...SOAP, name: `blackFilmGrowingSeries frame ${i}`, fileName: `grow-${String(i).padStart(3, '0')}.jpg`, seed: seed + 100 + i,
        exposure: canvas.exposure, mapOptions: {},
        description: `draining soap film, black film growing from the top wire, frame ${i} (drainage stage ${stage.toFixed(2)}) (invented)`,
      }),
    );
  }
  return { name: 'blackFilmGrowingSeries', frames: out, ruptureIndex: null, lastFilmIndex: frames - 1 };
}

// ---------------------------------------------------------------------------------------------
// Wafers

export const WAFER = { cx: 240, cy: 178, radiusPx: 150, flatFromCentrePx: 138 };

function sdWafer(/** @type {number} */ x, /** @type {number} */ y) {
  const round = Math.hypot(x - WAFER.cx, y - WAFER.cy) - WAFER.radiusPx;
  const flat = y - (WAFER.cy + WAFER.flatFromCentrePx);
  return round > flat ? round : flat;
}

/** The invented oxide wafer of the bench (a bowl 420–580 nm) with two etched steps, in photo coordinates. */
export function waferOxideNm(/** @type {number} */ x, /** @type {number} */ y) {
  const r2 = ((x - WAFER.cx) ** 2 + (y - WAFER.cy) ** 2) / WAFER.radiusPx ** 2;
  let h = 420 + 160 * r2;
  if (x > 138 && x < 204 && y > 88 && y < 150) h -= 150;
  if (x > 262 && x < 344 && y > 196 && y < 262) h -= 300;
  return h;
}

/** The invented uniform coating: 100 nm at the centre rising to 104 nm at the rim (a gentle bowl). */
export function uniformOxideNm(/** @type {number} */ x, /** @type {number} */ y) {
  return 100 + (4 * ((x - WAFER.cx) ** 2 + (y - WAFER.cy) ** 2)) / WAFER.radiusPx ** 2;
}

export const OXIDE = { stack: 'oxide-on-silicon', light: 'F11', angleDeg: 0, thinBelowNm: null, flare: /** @type {const} */ ([0.01, 0.01, 0.011]), noiseSigma: 0.003 };

/** Paints a wafer with thickness `thicknessAt` onto the canvas. */
export function paintWafer(/** @type {ReturnType<typeof createCanvas>} */ canvas, /** @type {(x: number, y: number) => number} */ thicknessAt) {
  const fieldNm = new Float32Array(FIELD_WIDTH * FIELD_HEIGHT).fill(Number.NaN);
  for (let y = 0, p = 0; y < FIELD_HEIGHT; y++) {
    for (let x = 0; x < FIELD_WIDTH; x++, p++) if (sdWafer(x + 0.5, y + 0.5) <= 1) fieldNm[p] = thicknessAt(x + 0.5, y + 0.5);
  }
  paintFilm(canvas, (x, y) => coverage(sdWafer(x, y)), renderFilmLinear(fieldNm, OXIDE.stack, OXIDE.light, OXIDE.angleDeg, canvas.exposure));
  // the rounded edge (bevel) of the wafer, 1.5 px: dark, catching the lamp towards the upper left
  /** @type {readonly [number, number, number]} */
  const bevel = [0.05, 0.05, 0.052];
  paintSurface(canvas, 'wafer bevel', bevel, (x, y) => coverage(Math.abs(sdWafer(x, y) + 0.75) - 0.75), (x, y, rho) => {
    const facing = Math.max(0, -((x - WAFER.cx) + (y - WAFER.cy)) / (Math.SQRT2 * Math.hypot(x - WAFER.cx, y - WAFER.cy)));
    const shine = 0.35 * facing ** 6;
    rho[0] = bevel[0] + shine;
    rho[1] = bevel[1] + shine;
    rho[2] = bevel[2] + shine;
  });
  return fieldNm;
}

/** A bench with tweezers reaching from the right border onto the wafer's rim, and their shadow. */
export function paintTweezers(/** @type {ReturnType<typeof createCanvas>} */ canvas, /** @type {ReturnType<typeof greyBench>} */ bench, /** @type {number} */ seed) {
  const angle = (-50 * Math.PI) / 180;
  const rimX = WAFER.cx + WAFER.radiusPx * Math.cos(angle);
  const rimY = WAFER.cy + WAFER.radiusPx * Math.sin(angle);
  const ax = FIELD_WIDTH + 20;
  const ay = 28;
  const length = Math.hypot(rimX - ax, rimY - ay);
  const tipX = rimX + (12 * (rimX - ax)) / length;
  const tipY = rimY + (12 * (rimY - ay)) / length;
  const bar = new Float64Array(2);
  const shadowDx = 5;
  const shadowDy = 8;
  paintSurface(
    canvas,
    'tweezer shadow',
    [bench.mean[0] * 0.55, bench.mean[1] * 0.55, bench.mean[2] * 0.55],
    (x, y) => {
      sdTaperedBar(x - shadowDx, y - shadowDy, ax, ay, tipX, tipY, 8, 4.5, bar);
      const a = 0.5 - bar[0] / 4;
      return a <= 0 ? 0 : a >= 1 ? 1 : a;
    },
    (x, y, rho) => {
      bench.at(x, y, rho);
      rho[0] *= 0.55;
      rho[1] *= 0.55;
      rho[2] *= 0.55;
    },
  );
  return () => {
    const steel = brushedMetal(seed, 0.16, 0.75);
    const ux = (tipX - ax) / Math.hypot(tipX - ax, tipY - ay);
    const uy = (tipY - ay) / Math.hypot(tipX - ax, tipY - ay);
    paintSurface(
      canvas,
      'tweezers',
      steel.mean,
      (x, y) => (sdTaperedBar(x, y, ax, ay, tipX, tipY, 8, 4.5, bar), coverage(bar[0])),
      (x, y, rho) => {
        sdTaperedBar(x, y, ax, ay, tipX, tipY, 8, 4.5, bar);
        const halfWidth = 8 + bar[1] * (4.5 - 8);
        const across = ((x - ax) * -uy + (y - ay) * ux) / halfWidth;
        steel.at(x, y, rho, across, Math.abs(ux) > Math.abs(uy));
        // the slit between the two arms, from a third of the way to the tip
        if (bar[1] > 0.35) {
          const slit = Math.exp(-((across * halfWidth) ** 2) / 0.5);
          rho[0] *= 1 - 0.8 * slit;
          rho[1] *= 1 - 0.8 * slit;
          rho[2] *= 1 - 0.8 * slit;
        }
      },
    );
  };
}

/**
 * (c) An oxide-on-silicon wafer (150 px radius with a flat; bowl 420–580 nm with etched steps of
 * −150 and −300 nm) on a near-black grooved chuck (reflectance ≈ 0.02) filling the rest of the
 * photo; fluorescent light F11, exposure 1.3. The wafer's rounded edge (1.5 px bevel) is not film.
 * Truth: film 39.5 % of the photo, no thin threshold.
 */
export async function waferOnDarkChuck(seed = 1501) {
  const canvas = createCanvas(1.3);
  const chuck = darkChuck(seed, WAFER.cx, WAFER.cy);
  paintSurface(canvas, 'chuck', chuck.mean, () => 1, chuck.at);
  const fieldNm = paintWafer(canvas, waferOxideNm);
  return finishScene(canvas, fieldNm, {
    ...OXIDE, name: 'waferOnDarkChuck', seed, exposure: canvas.exposure, mapOptions: {},
    description: 'oxide wafer with a bowl and etched steps on a near-black chuck, F11 (invented)',
  });
}

/**
 * (d) The same wafer on a mid-grey bench (reflectance ≈ 0.3 with grain) held at its rim by
 * brushed-steel tweezers (15 px wide at the border) that reach in from the right border and cast
 * a soft shadow on the bench. Truth: film 39.5 % of the photo, no thin threshold.
 */
export async function waferOnGreyBench(seed = 1502) {
  const canvas = createCanvas(1.3);
  const bench = greyBench(seed, 0.3);
  paintSurface(canvas, 'bench', bench.mean, () => 1, bench.at);
  const paintTweezerArms = paintTweezers(canvas, bench, seed + 5);
  const fieldNm = paintWafer(canvas, waferOxideNm);
  paintTweezerArms();
  return finishScene(canvas, fieldNm, {
    ...OXIDE, name: 'waferOnGreyBench', seed, exposure: canvas.exposure, mapOptions: {},
    description: 'oxide wafer with a bowl and etched steps on a grey bench, held by tweezers, F11 (invented)',
  });
}

/**
 * (h) A wafer with a uniform oxide of 100–104 nm (a gentle bowl) on the grey bench; F11, exposure
 * 1.3. `mapOptions` (variant "expect") gives `expectNm: [70, 140]`; variant "anchor" an anchor at
 * the wafer centre with its true thickness (100 nm). Truth: film 39.5 % of the photo.
 */
export async function uniformCoating(seed = 1601) {
  const canvas = createCanvas(1.3);
  const bench = greyBench(seed, 0.28);
  paintSurface(canvas, 'bench', bench.mean, () => 1, bench.at);
  const fieldNm = paintWafer(canvas, uniformOxideNm);
  const ax = WAFER.cx;
  const ay = WAFER.cy;
  const anchorNm = uniformOxideNm(ax + 0.5, ay + 0.5);
  const variants = [
    { name: 'expect', mapOptions: { expectNm: [70, 140] } },
    { name: 'anchor', mapOptions: { anchors: [{ x: ax, y: ay, thicknessNm: Math.round(anchorNm * 100) / 100 }] } },
  ];
  return finishScene(canvas, fieldNm, {
    ...OXIDE, name: 'uniformCoating', seed, exposure: canvas.exposure, mapOptions: variants[0].mapOptions, variants,
    description: 'wafer with a uniform 100–104 nm oxide on a grey bench, F11 (invented)',
  });
}

// ---------------------------------------------------------------------------------------------
// Photos that hold no film (mapped as if they were soap films under D65)

const NOT_FILM = { stack: 'soap-film', light: 'D65', angleDeg: 0, thinBelowNm: 50, noiseSigma: 0.003 };

/** (f) A neutral grey card (reflectance 0.18) filling the photo, light falling off by ≈ 15 % to the corners; exposure 2. No film. */
export async function greyCard(seed = 1701) {
  const canvas = createCanvas(2);
  const paper = fractalNoise(seed, 50, 50, 3);
  const fibre = valueNoise(seed + 1, 1.5, 1.5);
  /** @type {readonly [number, number, number]} */
  const mean = [0.18, 0.18, 0.178];
  paintSurface(canvas, 'grey card', mean, () => 1, (x, y, rho) => {
    const r2 = ((x - 220) ** 2 + (y - 170) ** 2) / (300 * 300);
    const f = (1 - 0.15 * r2) * (1 + 0.012 * paper(x, y) + 0.008 * fibre(x, y));
    rho[0] = mean[0] * f;
    rho[1] = mean[1] * f;
    rho[2] = mean[2] * f;
  });
  return finishScene(canvas, null, {
    ...NOT_FILM, name: 'greyCard', seed, exposure: canvas.exposure, flare: [0.006, 0.006, 0.006], mapOptions: {},
    description: 'a neutral grey card filling the photo (invented; no film)',
  });
}

/** Our own 24 patch colours (8-bit sRGB as printed), rows of saturated, muted, pale and neutral tones. */
export const TARGET_COLOURS_SRGB8 = [
  [196, 64, 52], [226, 142, 40], [214, 204, 60], [92, 168, 70], [48, 150, 160], [60, 90, 180],
  [120, 70, 150], [200, 90, 140], [150, 110, 80], [90, 60, 40], [110, 140, 60], [40, 100, 80],
  [230, 180, 170], [240, 220, 160], [190, 220, 180], [170, 200, 230], [200, 180, 220], [120, 60, 70],
  [240, 240, 236], [196, 196, 192], [150, 150, 148], [110, 110, 108], [70, 70, 70], [38, 38, 38],
];

/**
 * (f) A printed target of 24 matte colour patches (6 × 4, 58 px, our own colours spread over the
 * gamut) on a dark surround (reflectance 0.03), slightly turned, light falling off to the right;
 * exposure 1. No film.
 */
export async function colourTarget(seed = 1702) {
  const canvas = createCanvas(1);
  const card = fractalNoise(seed, 40, 40, 2);
  /** @type {readonly [number, number, number]} */
  const surroundMean = [0.03, 0.03, 0.031];
  paintSurface(canvas, 'surround', surroundMean, () => 1, (x, y, rho) => {
    const f = 1 + 0.1 * card(x, y);
    rho[0] = surroundMean[0] * f;
    rho[1] = surroundMean[1] * f;
    rho[2] = surroundMean[2] * f;
  });
  const q = new Float64Array(2);
  const tilt = (0.9 * Math.PI) / 180;
  const print = valueNoise(seed + 1, 1.4, 1.4);
  const patch = 58;
  const gap = 12;
  const x0 = 240 - (6 * patch + 5 * gap) / 2;
  const y0 = 180 - (4 * patch + 3 * gap) / 2;
  for (let k = 0; k < TARGET_COLOURS_SRGB8.length; k++) {
    const col = k % 6;
    const row = (k / 6) | 0;
    const pcx = x0 + col * (patch + gap) + patch / 2;
    const pcy = y0 + row * (patch + gap) + patch / 2;
    /** @type {[number, number, number]} */
    const rgb = [decodeSrgb(TARGET_COLOURS_SRGB8[k][0] / 255), decodeSrgb(TARGET_COLOURS_SRGB8[k][1] / 255), decodeSrgb(TARGET_COLOURS_SRGB8[k][2] / 255)];
    paintSurface(
      canvas,
      `patch ${k + 1}`,
      rgb,
      (x, y) => (rotate(x, y, 240, 180, tilt, q), coverage(sdRoundRect(q[0], q[1], pcx, pcy, patch / 2, patch / 2, 2))),
      (x, y, rho) => {
        const f = (1 - 0.08 * (x / FIELD_WIDTH)) * (1 + 0.01 * print(x, y));
        rho[0] = rgb[0] * f;
        rho[1] = rgb[1] * f;
        rho[2] = rgb[2] * f;
      },
    );
  }
  return finishScene(canvas, null, {
    ...NOT_FILM, name: 'colourTarget', seed, exposure: canvas.exposure, flare: [0.005, 0.005, 0.005], mapOptions: {},
    description: 'a target of 24 colour patches of our own on a dark surround (invented; no film)',
  });
}

/** (f) Uniform random 8-bit RGB (seeded), written as PNG. No film, no camera. */
export async function noise(seed = 1703) {
  const n = FIELD_WIDTH * FIELD_HEIGHT;
  const uniform = createUniform(seed);
  const rgb = new Uint8Array(n * 3);
  for (let i = 0; i < rgb.length; i++) rgb[i] = (uniform() * 256) | 0;
  return {
    ...NOT_FILM, name: 'noise', description: 'uniform random RGB (invented; no film)', fileName: 'noise.png', format: /** @type {const} */ ('png'),
    width: FIELD_WIDTH, height: FIELD_HEIGHT, exposure: 1, flare: /** @type {const} */ ([0, 0, 0]), noiseSigma: 0,
    truthNm: new Float32Array(n).fill(Number.NaN), film: new Uint8Array(n), edge: new Uint8Array(n), labels: new Uint8Array(n).fill(1),
    mixed: new Uint8Array(n), surfaces: [{ id: 1, name: 'noise', reflectanceRgb: /** @type {const} */ ([0.5, 0.5, 0.5]) }],
    rgb, photo: await encodePhoto(rgb, 'png'), mapOptions: {},
  };
}

// ---------------------------------------------------------------------------------------------

/** The single-photo field scenes in the order of issue 13 (the series separately: burstingSeries). */
export const FIELD_SCENES = { soapFilmInFrame, soapFilmOffBorder, waferOnDarkChuck, waferOnGreyBench, soapFilmWithGlint, greyCard, colourTarget, noise, uniformCoating };

/**
 * The MapOptions to map a scene with, as a user would: its stack, light and angle, its thin
 * threshold, 2,000 nm maximum, the scene's own extra options, then `extra`.
 * @param {Pick<FieldScene, 'stack' | 'light' | 'angleDeg' | 'thinBelowNm' | 'mapOptions'>} scene
 * @param {Record<string, unknown>} [extra]
 */
export function mapOptionsFor(scene, extra = {}) {
  return {
    stack: resolveStack(scene.stack), angleRad: (scene.angleDeg * Math.PI) / 180, light: scene.light, thinBelowNm: scene.thinBelowNm,
    maxThicknessNm: 2000, ...scene.mapOptions, ...extra,
  };
}

/** Truth summary of a scene: film pixels / all pixels, thin film pixels / film pixels (null without a threshold). */
export function truthFractions(/** @type {Pick<FieldScene, 'film' | 'truthNm' | 'thinBelowNm'>} */ scene) {
  let filmPx = 0;
  let thinPx = 0;
  for (let p = 0; p < scene.film.length; p++) {
    if (!scene.film[p]) continue;
    filmPx++;
    if (scene.thinBelowNm !== null && scene.truthNm[p] < scene.thinBelowNm) thinPx++;
  }
  return { filmPx, filmFraction: filmPx / scene.film.length, thinFraction: scene.thinBelowNm === null || filmPx === 0 ? null : thinPx / filmPx };
}
