/**
 * Scenes for the coating-inspection tests (issue 19): round oxide wafers on a near-black vacuum
 * chuck, F11 light, lens vignetting (12 % at the corners), sensor noise and JPEG, built from the
 * bench's scene parts (bench/field-scenes.js) through our own forward model. The wafers and their
 * thickness patterns are INVENTED (our own scenario, "a small coating line's test wafers"), so
 * every check of a mapped thickness against them is a round trip through our own model.
 */
import { coverage, createCanvas, darkChuck, finishScene, OXIDE, paintFilm, paintSurface, renderFilmLinear, FIELD_WIDTH, FIELD_HEIGHT, type FieldScene } from '../bench/field-scenes.js';
import { unevenLight } from '../bench/camera-effects.js';

/** The test wafer: a round disc of 150 px radius centred in the 480 × 360 photo, no flat. */
export const DISC = { cx: 240, cy: 180, radiusPx: 150 } as const;

/** Signed distance (px) to the disc's rim, negative inside. */
export function sdDisc(x: number, y: number): number {
  return Math.hypot(x - DISC.cx, y - DISC.cy) - DISC.radiusPx;
}

/**
 * A wafer with thickness `thicknessAt` (nm at pixel centre x + 0.5, y + 0.5) on the chuck.
 * Returns the scene (photo bytes, truth per pixel, NaN off the wafer).
 */
export async function discOnChuck(name: string, thicknessAt: (x: number, y: number) => number, seed = 1901): Promise<FieldScene> {
  const canvas = createCanvas(1.3);
  const chuck = darkChuck(seed, DISC.cx, DISC.cy);
  paintSurface(canvas, 'chuck', chuck.mean, () => 1, chuck.at);
  const fieldNm = new Float32Array(FIELD_WIDTH * FIELD_HEIGHT).fill(Number.NaN);
  for (let y = 0, p = 0; y < FIELD_HEIGHT; y++) {
    for (let x = 0; x < FIELD_WIDTH; x++, p++) if (sdDisc(x + 0.5, y + 0.5) <= 1) fieldNm[p] = thicknessAt(x + 0.5, y + 0.5);
  }
  paintFilm(canvas, (x, y) => coverage(sdDisc(x, y)), renderFilmLinear(fieldNm, OXIDE.stack, OXIDE.light, OXIDE.angleDeg, canvas.exposure));
  const vignette = unevenLight(FIELD_WIDTH, FIELD_HEIGHT, { falloff: 0, directionDeg: 0, steepness: 1, vignettingLoss: 0.12 });
  return finishScene(canvas, fieldNm, {
    ...OXIDE, name, seed, exposure: canvas.exposure, mapOptions: {}, effects: { unevenLight: vignette },
    description: `${name}: round oxide wafer on a near-black chuck, F11, vignetting (invented)`,
  });
}

/** Nominal 100 nm coating (a gentle bowl, 99–101 nm) with a thick patch of 125 nm in the upper right quadrant. */
export function coatingWithThickPatch(x: number, y: number): number {
  const r2 = ((x - DISC.cx) ** 2 + (y - DISC.cy) ** 2) / DISC.radiusPx ** 2;
  if (x > 270 && x < 350 && y > 70 && y < 150) return 125;
  return 99 + 2 * r2;
}

/** "Before": a 500 nm oxide with a gentle bowl (495–505 nm). */
export function beforeEtchNm(x: number, y: number): number {
  const r2 = ((x - DISC.cx) ** 2 + (y - DISC.cy) ** 2) / DISC.radiusPx ** 2;
  return 495 + 10 * r2;
}

/** The etch removed: 100 nm in general, 160 nm in a square window (x 190–290, y 130–230). */
export function etchRemovedNm(x: number, y: number): number {
  return x > 190 && x < 290 && y > 130 && y < 230 ? 160 : 100;
}

export function afterEtchNm(x: number, y: number): number {
  return beforeEtchNm(x, y) - etchRemovedNm(x, y);
}
