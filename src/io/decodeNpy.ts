/**
 * Reads NumPy `.npy` files, versions 1.0, 2.0 and 3.0 (see ./npyFormat.ts for the specification).
 * Supported element types: f4, f8 (either byte order), u1, u2, i4. Fortran-ordered arrays are
 * reordered to C order so callers always index row-major.
 */
import { InputError } from '../errors.js';
import { readInputFile } from './readInputFile.js';
import { NPY_MAGIC, checkShape, type NpyData } from './npyFormat.js';

export interface NpyArray {
  data: NpyData;
  shape: number[];
  /** The descr from the file, e.g. '<f4'. */
  dtype: string;
}

const KINDS: Record<string, { size: number; make: (n: number) => NpyData; get: (v: DataView, o: number, le: boolean) => number }> = {
  f4: { size: 4, make: (n) => new Float32Array(n), get: (v, o, le) => v.getFloat32(o, le) },
  f8: { size: 8, make: (n) => new Float64Array(n), get: (v, o, le) => v.getFloat64(o, le) },
  u1: { size: 1, make: (n) => new Uint8Array(n), get: (v, o) => v.getUint8(o) },
  u2: { size: 2, make: (n) => new Uint16Array(n), get: (v, o, le) => v.getUint16(o, le) },
  i4: { size: 4, make: (n) => new Int32Array(n), get: (v, o, le) => v.getInt32(o, le) },
};

function fail(source: string, message: string): never {
  throw new InputError(source, message);
}

/** Decodes `.npy` bytes; `source` names the file in errors. */
export function decodeNpy(bytes: Uint8Array, source = '<npy>'): NpyArray {
  if (bytes.length < 10 || !NPY_MAGIC.every((b, i) => bytes[i] === b)) fail(source, 'not a NumPy .npy file (magic string \\x93NUMPY missing)');
  const major = bytes[6];
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let headerStart: number;
  let headerLength: number;
  if (major === 1) {
    headerLength = view.getUint16(8, true);
    headerStart = 10;
  } else if (major === 2 || major === 3) {
    if (bytes.length < 12) fail(source, 'truncated .npy header');
    headerLength = view.getUint32(8, true);
    headerStart = 12;
  } else {
    fail(source, `unsupported .npy format version ${major}.${bytes[7]} (expected 1.0, 2.0 or 3.0)`);
  }
  const dataStart = headerStart + headerLength;
  if (dataStart > bytes.length) fail(source, 'truncated .npy header');
  const header = Buffer.from(bytes.buffer, bytes.byteOffset + headerStart, headerLength).toString(major === 3 ? 'utf8' : 'latin1');
  const descrMatch = /'descr'\s*:\s*'([<>|=])([a-z])(\d+)'/.exec(header);
  const orderMatch = /'fortran_order'\s*:\s*(True|False)/.exec(header);
  const shapeMatch = /'shape'\s*:\s*\(([^)]*)\)/.exec(header);
  if (!descrMatch || !orderMatch || !shapeMatch) fail(source, `.npy header lacks descr, fortran_order or shape: ${header.trim()}`);
  const [, order, kindLetter, width] = descrMatch;
  const kind = KINDS[`${kindLetter}${width}`];
  if (!kind) fail(source, `unsupported .npy element type '${order}${kindLetter}${width}' (expected f4, f8, u1, u2 or i4)`);
  const shape = shapeMatch[1]
    .split(',')
    .map((s) => s.trim())
    .filter((s) => s.length > 0)
    .map((s) => Number(s.replace(/L$/, '')));
  let count: number;
  try {
    count = checkShape(shape);
  } catch {
    fail(source, `invalid .npy shape (${shapeMatch[1]})`);
  }
  const needed = count * kind.size;
  if (bytes.length - dataStart < needed) fail(source, `truncated .npy data: shape (${shape.join(', ')}) needs ${needed} bytes, file has ${bytes.length - dataStart}`);
  const littleEndian = order !== '>';
  const flat = kind.make(count);
  for (let i = 0; i < count; i++) flat[i] = kind.get(view, dataStart + i * kind.size, littleEndian);
  const data = orderMatch[1] === 'True' && shape.length > 1 ? fortranToC(flat, shape, kind.make) : flat;
  return { data, shape, dtype: `${order}${kindLetter}${width}` };
}

/** Reorders a column-major array to row-major. */
function fortranToC(flat: NpyData, shape: readonly number[], make: (n: number) => NpyData): NpyData {
  const out = make(flat.length);
  const rank = shape.length;
  const index = new Array<number>(rank).fill(0);
  const fStride = new Array<number>(rank);
  fStride[0] = 1;
  for (let d = 1; d < rank; d++) fStride[d] = fStride[d - 1] * shape[d - 1];
  for (let c = 0; c < flat.length; c++) {
    let f = 0;
    for (let d = 0; d < rank; d++) f += index[d] * fStride[d];
    out[c] = flat[f];
    for (let d = rank - 1; d >= 0; d--) {
      if (++index[d] < shape[d]) break;
      index[d] = 0;
    }
  }
  return out;
}

/** Reads a `.npy` file. */
export async function readNpy(path: string): Promise<NpyArray> {
  return decodeNpy(await readInputFile(path), path);
}
