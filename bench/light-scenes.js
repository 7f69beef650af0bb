// Light scenes: photos as they are taken under uneven light and through a camera's picture style,
// for `npm run bench:accuracy -- --light` and the tests (issue 14).
//
// EVERY SCENE HERE IS INVENTED, in scenarios of our own: a lab's draining soap film photographed
// close up under a daylight panel off to one side, and in its wire frame before a dark cloth with a
// lamp glint; an oxide wafer of the bench photographed close up under a fluorescent ring light,
// and on a dark chuck held by tweezers with a glint. The film, surfaces, glints and camera are
// those of bench/field-scenes.js (composed in linear light, rendered with the project's forward
// model); the camera effects are those of bench/camera-effects.js (the formulas are in its header):
//
//   (i)   uneven light only: a 35 % fall-off along a tilted direction × 25 % cos⁴ vignetting;
//   (ii)  picture style only: a logistic contrast S-curve blended with the identity, then a
//         saturation boost of 1.25 about BT.601 luma, on the encoded values before JPEG;
//   (iii) both, with a dark background, the frame or holder, and a glint.
//
// Close-ups (i, ii) are film from edge to edge (the one effect changed, everything else clean).
// Each record keeps the truth of its effects: `unevenLight.gain` (per pixel) and `pictureStyle`.
import { UNEVEN_LIGHT, PICTURE_STYLE, unevenLight } from './camera-effects.js';
import {
  FIELD_HEIGHT, FIELD_WIDTH, FRAME, OXIDE, SOAP, WAFER, addGlint, createCanvas, darkChuck, finishScene, paintFilm, paintSurface, paintTweezers,
  paintWafer, renderFilmLinear, soapFilmThicknessNm, soapFrameCanvas, valueNoise, fractalNoise, waferOxideNm,
} from './field-scenes.js';

/** The direction each scene's light falls off towards (degrees from +x, y down): never along an axis. */
const SOAP_LIGHT = { ...UNEVEN_LIGHT, directionDeg: 32 };
const WAFER_LIGHT = { ...UNEVEN_LIGHT, directionDeg: 205 };

/** The soap film close up: the camera framed inside the wire, black film along the top edge. */
function soapCloseUpCanvas(/** @type {number} */ seed) {
  const exposure = 7;
  const canvas = createCanvas(exposure);
  const fieldNm = new Float32Array(FIELD_WIDTH * FIELD_HEIGHT);
  const wobble = fractalNoise(seed + 20, 120, 60, 2);
  const grain = valueNoise(seed + 21, 9, 9);
  for (let y = 0, p = 0; y < FIELD_HEIGHT; y++) {
    for (let x = 0; x < FIELD_WIDTH; x++, p++) {
      const u = 0.02 + (0.96 * (x + 0.5)) / FIELD_WIDTH;
      const v = 0.03 + (0.95 * (y + 0.5)) / FIELD_HEIGHT;
      fieldNm[p] = soapFilmThicknessNm(u, v, 0.15, wobble(x, y), grain(x, y));
    }
  }
  paintFilm(canvas, () => 1, renderFilmLinear(fieldNm, SOAP.stack, SOAP.light, SOAP.angleDeg, exposure));
  return { canvas, fieldNm };
}

/** The wafer close up: the middle of the bench's oxide wafer (bowl and both etched steps) magnified 2.08×; its rim lies beyond the photo. */
function waferCloseUpCanvas() {
  const exposure = 1.3;
  const canvas = createCanvas(exposure);
  const zoom = 0.48;
  const fieldNm = new Float32Array(FIELD_WIDTH * FIELD_HEIGHT);
  for (let y = 0, p = 0; y < FIELD_HEIGHT; y++) {
    for (let x = 0; x < FIELD_WIDTH; x++, p++) {
      fieldNm[p] = waferOxideNm(WAFER.cx + (x + 0.5 - FIELD_WIDTH / 2) * zoom, WAFER.cy + (y + 0.5 - FIELD_HEIGHT / 2) * zoom);
    }
  }
  paintFilm(canvas, () => 1, renderFilmLinear(fieldNm, OXIDE.stack, OXIDE.light, OXIDE.angleDeg, exposure));
  return { canvas, fieldNm };
}

/**
 * (i) The draining soap film close up (film edge to edge, black film along the top), D65,
 * exposure 7, lit by a diffuse daylight panel off to the upper left: 35 % fall-off towards the
 * lower right (32° below the x axis) × 25 % vignetting at the corners.
 */
export async function soapFilmUnevenLight(seed = 2101) {
  const { canvas, fieldNm } = soapCloseUpCanvas(seed);
  return finishScene(canvas, fieldNm, {
    ...SOAP, name: 'soapFilmUnevenLight', seed, exposure: canvas.exposure, mapOptions: {},
    effects: { unevenLight: unevenLight(FIELD_WIDTH, FIELD_HEIGHT, SOAP_LIGHT) },
    description: 'draining soap film close up, a daylight panel off to one side: 35 % fall-off × 25 % vignetting (invented)',
  });
}

/** (ii) The same close-up evenly lit, through the camera's picture style (S-curve, saturation ×1.25). */
export async function soapFilmPictureStyle(seed = 2101) {
  const { canvas, fieldNm } = soapCloseUpCanvas(seed);
  return finishScene(canvas, fieldNm, {
    ...SOAP, name: 'soapFilmPictureStyle', seed: seed + 1, exposure: canvas.exposure, mapOptions: {},
    effects: { pictureStyle: PICTURE_STYLE },
    description: 'draining soap film close up, evenly lit, camera picture style: contrast S-curve, saturation ×1.25 (invented)',
  });
}

/**
 * (iii) The soap film in its wire frame before a dark cloth, with a lamp glint on the film and one
 * on the wire (scene soapFilmWithGlint of bench/field-scenes.js), under the uneven light of (i)
 * and through the picture style of (ii).
 */
export async function soapFilmStyledUnevenInFrame(seed = 2103) {
  const { canvas, fieldNm } = soapFrameCanvas({ shiftY: 0, stage: 0.1, withFilm: true, seed });
  addGlint(canvas, 318, 148, 10, 3.5, 0.45);
  const c = Math.cos(FRAME.tiltRad);
  const s = Math.sin(FRAME.tiltRad);
  const wx = FRAME.cx - FRAME.hw;
  const wy = 250;
  addGlint(canvas, FRAME.cx + c * (wx - FRAME.cx) - s * (wy - 181), 181 + s * (wx - FRAME.cx) + c * (wy - 181), 4, 2.5, 0.4);
  return finishScene(canvas, fieldNm, {
    ...SOAP, name: 'soapFilmStyledUnevenInFrame', seed: seed + 3, exposure: canvas.exposure, mapOptions: {},
    effects: { unevenLight: unevenLight(FIELD_WIDTH, FIELD_HEIGHT, SOAP_LIGHT), pictureStyle: PICTURE_STYLE },
    description: 'soap film in its frame before a dark cloth with glints, uneven light and the camera picture style (invented)',
  });
}

/**
 * (i) The oxide wafer close up (bowl 420–580 nm with both etched steps, film edge to edge), F11,
 * exposure 1.3, under a ring light that sits off centre: 35 % fall-off towards the left and a
 * little up (205°) × 25 % vignetting at the corners.
 */
export async function waferUnevenLight(seed = 2201) {
  const { canvas, fieldNm } = waferCloseUpCanvas();
  return finishScene(canvas, fieldNm, {
    ...OXIDE, name: 'waferUnevenLight', seed, exposure: canvas.exposure, mapOptions: {},
    effects: { unevenLight: unevenLight(FIELD_WIDTH, FIELD_HEIGHT, WAFER_LIGHT) },
    description: 'oxide wafer close up, F11 ring light off centre: 35 % fall-off × 25 % vignetting (invented)',
  });
}

/** (ii) The wafer close-up evenly lit, through the camera's picture style. */
export async function waferPictureStyle(seed = 2202) {
  const { canvas, fieldNm } = waferCloseUpCanvas();
  return finishScene(canvas, fieldNm, {
    ...OXIDE, name: 'waferPictureStyle', seed, exposure: canvas.exposure, mapOptions: {},
    effects: { pictureStyle: PICTURE_STYLE },
    description: 'oxide wafer close up, evenly lit, camera picture style: contrast S-curve, saturation ×1.25 (invented)',
  });
}

/**
 * (iii) The whole wafer on the near-black grooved chuck, held at its rim by tweezers reaching in
 * from the right, a glint of the lamp on the wafer, under the uneven light of (i) and through the
 * picture style of (ii).
 */
export async function waferStyledUnevenOnChuck(seed = 2203) {
  const canvas = createCanvas(1.3);
  const chuck = darkChuck(seed, WAFER.cx, WAFER.cy);
  paintSurface(canvas, 'chuck', chuck.mean, () => 1, chuck.at);
  const paintTweezerArms = paintTweezers(canvas, chuck, seed + 5);
  const fieldNm = paintWafer(canvas, waferOxideNm);
  paintTweezerArms();
  addGlint(canvas, 196, 236, 7, 3, 0.4);
  return finishScene(canvas, fieldNm, {
    ...OXIDE, name: 'waferStyledUnevenOnChuck', seed, exposure: canvas.exposure, mapOptions: {},
    effects: { unevenLight: unevenLight(FIELD_WIDTH, FIELD_HEIGHT, WAFER_LIGHT), pictureStyle: PICTURE_STYLE },
    description: 'oxide wafer on a dark chuck held by tweezers, a glint, uneven light and the camera picture style (invented)',
  });
}

/** The light scenes of issue 14, in the order of the issue: (i), (ii), (iii) for the soap film, then the wafer. */
export const LIGHT_SCENES = {
  soapFilmUnevenLight, soapFilmPictureStyle, soapFilmStyledUnevenInFrame, waferUnevenLight, waferPictureStyle, waferStyledUnevenOnChuck,
};
