/**
 * Von Kries-type chromatic adaptation: M⁻¹ · diag(ρ_d/ρ_s) · M, where ρ = M · XYZ_white.
 * Default M is the Bradford cone-response matrix of K. M. Lam, "Metamerism and colour
 * constancy", PhD thesis, University of Bradford (1985), used in its linearised form: the
 * original's non-linear blue exponent is dropped, as ICC.1:2010 (Annex E) recommends.
 * 'xyz-scaling' scales X, Y, Z directly (M = identity), for comparison.
 */
import { type Matrix3, applyMatrix3, diagonalMatrix3, invertMatrix3, matrix3, multiplyMatrix3 } from './matrix3.js';

export type AdaptationMethod = 'bradford' | 'xyz-scaling';

export const ADAPTATION_MATRICES = {
  bradford: matrix3([
    [0.8951, 0.2664, -0.1614],
    [-0.7502, 1.7135, 0.0367],
    [0.0389, -0.0685, 1.0296],
  ]),
  'xyz-scaling': diagonalMatrix3(1, 1, 1),
} as const satisfies Record<AdaptationMethod, Matrix3>;

/** Matrix taking XYZ seen under `sourceWhiteXyz` to the corresponding XYZ under `destinationWhiteXyz`. */
export function chromaticAdaptationMatrix(
  sourceWhiteXyz: ArrayLike<number>,
  destinationWhiteXyz: ArrayLike<number>,
  method: AdaptationMethod = 'bradford',
): Matrix3 {
  const m = ADAPTATION_MATRICES[method];
  if (!m) throw new RangeError(`adaptation method must be one of ${Object.keys(ADAPTATION_MATRICES).join(', ')}, received ${String(method)}`);
  const source = applyMatrix3(m, sourceWhiteXyz);
  const destination = applyMatrix3(m, destinationWhiteXyz);
  const gain = diagonalMatrix3(destination[0] / source[0], destination[1] / source[1], destination[2] / source[2]);
  return multiplyMatrix3(invertMatrix3(m), multiplyMatrix3(gain, m));
}
