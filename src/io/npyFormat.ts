/**
 * NumPy `.npy` file format, as specified in NumPy Enhancement Proposal 1 (NEP 1, R. Kern, 2007,
 * "A Simple File Format for NumPy Arrays") and the format description in NumPy's
 * `numpy/lib/format.py` documentation:
 *   magic "\x93NUMPY" · major version byte · minor version byte ·
 *   header length (v1.0: uint16 little-endian; v2.0 and v3.0: uint32 little-endian) ·
 *   header: an ASCII (v3.0: UTF-8) Python dict literal with keys 'descr', 'fortran_order', 'shape',
 *   ended by '\n' and padded with spaces ·
 *   the array data, C order unless fortran_order is True.
 * Alignment: NEP 1 asked for the header to be padded so the data start at a multiple of 16 bytes.
 * The current format description (NumPy 2.4, numpy/lib/_format_impl.py, checked on the copy
 * installed on our build machine) says "evenly divisible by 64" and sets ARRAY_ALIGN = 64; the
 * release that moved from 16 to 64 was around 1.14 (from memory).
 * We WRITE 64-byte alignment (a multiple of 16 too, so both readings are met) and READ any padding.
 */

export const NPY_MAGIC = Uint8Array.from([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]); // \x93NUMPY
export const NPY_ALIGN = 64;

export type NpyData = Float32Array | Float64Array | Uint8Array | Uint16Array | Int32Array;

/** Little-endian descr strings we write, by typed array. */
export function descrFor(data: NpyData): string {
  if (data instanceof Float32Array) return '<f4';
  if (data instanceof Float64Array) return '<f8';
  if (data instanceof Uint8Array) return '|u1';
  if (data instanceof Uint16Array) return '<u2';
  if (data instanceof Int32Array) return '<i4';
  throw new TypeError(`data must be a Float32Array, Float64Array, Uint8Array, Uint16Array or Int32Array, received ${Object.prototype.toString.call(data)}`);
}

/** Validates a shape and returns the element count it implies. */
export function checkShape(shape: readonly number[]): number {
  if (!Array.isArray(shape)) throw new TypeError(`shape must be an array of integers, received ${typeof shape}`);
  let count = 1;
  for (const dim of shape) {
    if (!Number.isInteger(dim) || dim < 0) throw new RangeError(`shape must hold integers >= 0, received [${shape.join(', ')}]`);
    count *= dim;
  }
  return count;
}
