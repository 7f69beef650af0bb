/**
 * Derivatives of one predicted table colour (./colourTable.ts, in the matching space of
 * ./matchSpace.ts) with respect to the photo-formation parameters, by the chain rule through the
 * model:
 *
 *   lin_c = clamp01( e · (W(g) · L)_c + f_c )          exposure e, white-balance gains g, flare f
 *   enc_c = E(lin_c)                                    sRGB encode (IEC 61966-2-1), or identity
 *   t_c   = T(enc_c; k, γ),  o_c = clamp01( Y + s·(t_c − Y) ),  Y = Σ β_j t_j   (../colour/toneResponse.ts)
 *   m     = M · o                                       matching space (linear)
 *
 * W is linear in the gains, so ∂W/∂g_j = W(unit gain j) (../colour/exposureModel.ts). A clamp
 * that holds a value at 0 or 1 passes no derivative. The response's columns are given even at the
 * identity (k = 0, γ = 1, s = 1), where a fit of the response starts. Used for the analytic
 * Jacobian of the photo-formation fit (./fitPhotoFormation.ts): exact derivatives of the exact
 * model, while the predicted table reads the encode and tone curve from tables (within 1e-6 and
 * 1e-4 of exact), which a least-squares step does not notice.
 *
 * Columns (PARAMETER_COUNT): exposure, red gain, blue gain, red, green, blue flare, contrast,
 * gamma, saturation (the green gain is fixed: the exposure absorbs it).
 */
import { whiteBalanceMatrix } from '../colour/exposureModel.js';
import type { Matrix3 } from '../colour/matrix3.js';
import { LUMA_BT601 } from '../colour/toneResponse.js';
import type { ColourTable } from './colourTable.js';
import type { MatchSpace } from './matchSpace.js';
import type { ExposureParameters } from './types.js';

export const PARAMETER_COUNT = 9;

/** Fills `out` (3 × PARAMETER_COUNT, row-major: channel, parameter) for table entry `index`. */
export type EntryDerivatives = (index: number, out: Float64Array) => void;

/** sRGB encode's slope (IEC 61966-2-1:1999): 12.92 on the linear toe, else 1.055/2.4 · x^(1/2.4 − 1). */
function encodeSlope(linear: number): number {
  return linear <= 0.0031308 ? 12.92 : (1.055 / 2.4) * Math.pow(linear, 1 / 2.4 - 1);
}

export function predictionDerivatives(table: ColourTable, parameters: ExposureParameters, space: MatchSpace | null): EntryDerivatives {
  const model = new EntryDerivativeModel(table, parameters, space);
  return (index, out) => model.fill(index, out);
}

/**
 * The derivatives of every entry of one predicted table (see the module's comment), for given
 * parameters: `fill(index, out)` as EntryDerivatives. A class, so that its code is compiled once
 * per process: a closure made per Jacobian was optimised anew each time (many times per frame).
 */
export class EntryDerivativeModel {
  private readonly w: Matrix3;
  private readonly dWdR: Matrix3;
  private readonly dWdB: Matrix3;
  private readonly exposure: number;
  private readonly flare: readonly number[];
  private readonly srgb: boolean;
  private readonly hasResponse: boolean;
  private readonly contrast: number;
  private readonly gamma: number;
  private readonly saturation: number;
  private readonly m: Float64Array | null;
  private readonly linear: Float64Array;
  // Per channel: d enc/d p (first six columns), then the response's chain.
  private readonly dEnc = new Float64Array(3 * PARAMETER_COUNT);
  private readonly tone = new Float64Array(3);
  private readonly toneSlope = new Float64Array(3);
  private readonly dToneContrast = new Float64Array(3);
  private readonly dToneGamma = new Float64Array(3);
  private readonly outputLive = new Uint8Array(3);
  private readonly plain = new Float64Array(3 * PARAMETER_COUNT);

  constructor(table: ColourTable, parameters: ExposureParameters, space: MatchSpace | null) {
    this.w = whiteBalanceMatrix(parameters.whiteBalance, table.encoding);
    this.dWdR = whiteBalanceMatrix([1, 0, 0], table.encoding);
    this.dWdB = whiteBalanceMatrix([0, 0, 1], table.encoding);
    this.exposure = parameters.exposure;
    this.flare = parameters.flare;
    this.srgb = table.encoding === 'srgb';
    const response = this.srgb ? parameters.response ?? null : null;
    this.hasResponse = response !== null;
    this.contrast = response ? response.contrast : 0;
    this.gamma = response ? response.gamma : 1;
    this.saturation = response ? response.saturation : 1;
    this.m = space ? space.matrix : null;
    this.linear = table.rgbLinear;
  }

  /** Fills `out` (3 × PARAMETER_COUNT, row-major: channel, parameter) for table entry `index`. */
  fill(index: number, out: Float64Array): void {
    const { w, dWdR, dWdB, exposure, flare, srgb, linear, dEnc, tone, m, plain } = this;
    const o = index * 3;
    const r = linear[o];
    const g = linear[o + 1];
    const b = linear[o + 2];
    dEnc.fill(0);
    for (let c = 0; c < 3; c++) {
      const wl = w[c * 3] * r + w[c * 3 + 1] * g + w[c * 3 + 2] * b;
      const value = exposure * wl + flare[c];
      const row = c * PARAMETER_COUNT;
      const clamped = value < 0 ? 0 : value > 1 ? 1 : value;
      const slope = value < 0 || value > 1 ? 0 : srgb ? encodeSlope(clamped) : 1;
      tone[c] = srgb ? encodeValue(clamped) : clamped;
      if (slope === 0) continue;
      dEnc[row] = slope * wl;
      dEnc[row + 1] = slope * exposure * (dWdR[c * 3] * r + dWdR[c * 3 + 1] * g + dWdR[c * 3 + 2] * b);
      dEnc[row + 2] = slope * exposure * (dWdB[c * 3] * r + dWdB[c * 3 + 1] * g + dWdB[c * 3 + 2] * b);
      dEnc[row + 3 + c] = slope;
    }
    if (srgb && this.hasResponse) responseChain(out, dEnc, tone, this.toneSlope, this.dToneContrast, this.dToneGamma, this.outputLive, this.contrast, this.gamma, this.saturation);
    else out.set(dEnc);
    if (m) {
      plain.set(out);
      for (let c = 0; c < 3; c++) {
        for (let k = 0; k < PARAMETER_COUNT; k++) {
          out[c * PARAMETER_COUNT + k] = m[c * 3] * plain[k] + m[c * 3 + 1] * plain[PARAMETER_COUNT + k] + m[c * 3 + 2] * plain[2 * PARAMETER_COUNT + k];
        }
      }
    }
  }
}

function encodeValue(linear: number): number {
  return linear <= 0.0031308 ? 12.92 * linear : 1.055 * Math.pow(linear, 1 / 2.4) - 0.055;
}

/**
 * The response's part of the chain: `encoded` holds enc_c on entry (overwritten with t_c); writes
 * d o_c / d p into `out` from d enc_c / d p in `dEnc`.
 */
function responseChain(
  out: Float64Array,
  dEnc: Float64Array,
  encoded: Float64Array,
  toneSlope: Float64Array,
  dToneContrast: Float64Array,
  dToneGamma: Float64Array,
  outputLive: Uint8Array,
  contrast: number,
  gamma: number,
  saturation: number,
): void {
  for (let c = 0; c < 3; c++) {
    const e = encoded[c];
    if (e <= 0) {
      encoded[c] = 0;
      toneSlope[c] = 0;
      dToneContrast[c] = 0;
      dToneGamma[c] = 0;
      continue;
    }
    const u = Math.pow(e, gamma);
    const v = 1 - u;
    const denominator = u * u + v * v;
    const s = (u * u) / denominator;
    const sSlope = (2 * u * v) / (denominator * denominator);
    const dTdu = 1 - contrast + contrast * sSlope;
    encoded[c] = (1 - contrast) * u + contrast * s;
    toneSlope[c] = dTdu * gamma * Math.pow(e, gamma - 1);
    dToneContrast[c] = s - u;
    dToneGamma[c] = dTdu * u * Math.log(e);
  }
  const t = encoded;
  const y = LUMA_BT601[0] * t[0] + LUMA_BT601[1] * t[1] + LUMA_BT601[2] * t[2];
  for (let c = 0; c < 3; c++) {
    const value = y + saturation * (t[c] - y);
    outputLive[c] = value < 0 || value > 1 ? 0 : 1;
  }
  const P = PARAMETER_COUNT;
  for (let c = 0; c < 3; c++) {
    const row = c * P;
    if (!outputLive[c]) {
      for (let k = 0; k < P; k++) out[row + k] = 0;
      continue;
    }
    // d o_c / d t_j = (1 − s)·β_j + s·δ_cj
    const a0 = (1 - saturation) * LUMA_BT601[0] + (c === 0 ? saturation : 0);
    const a1 = (1 - saturation) * LUMA_BT601[1] + (c === 1 ? saturation : 0);
    const a2 = (1 - saturation) * LUMA_BT601[2] + (c === 2 ? saturation : 0);
    const w0 = a0 * toneSlope[0];
    const w1 = a1 * toneSlope[1];
    const w2 = a2 * toneSlope[2];
    for (let k = 0; k < 6; k++) out[row + k] = w0 * dEnc[k] + w1 * dEnc[P + k] + w2 * dEnc[2 * P + k];
    out[row + 6] = a0 * dToneContrast[0] + a1 * dToneContrast[1] + a2 * dToneContrast[2];
    out[row + 7] = a0 * dToneGamma[0] + a1 * dToneGamma[1] + a2 * dToneGamma[2];
    out[row + 8] = t[c] - y;
  }
}
