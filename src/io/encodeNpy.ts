/** Writes arrays as NumPy `.npy` version 1.0 (see ./npyFormat.ts for the specification). */
import { atomicWriteFile } from './atomicWriteFile.js';
import { NPY_ALIGN, NPY_MAGIC, checkShape, descrFor, type NpyData } from './npyFormat.js';

function shapeLiteral(shape: readonly number[]): string {
  // Python tuple syntax: (), (n,), (a, b)
  if (shape.length === 0) return '()';
  if (shape.length === 1) return `(${shape[0]},)`;
  return `(${shape.join(', ')})`;
}

/** Encodes `data` (C order) with the given shape into `.npy` v1.0 bytes, little-endian. */
export function encodeNpy(data: NpyData, shape: readonly number[]): Buffer {
  const [header, body] = npyParts(data, shape);
  return Buffer.concat([header, body]);
}

/**
 * The `.npy` file as two pieces to write one after the other: the header, and the array's own
 * bytes — a view of `data`, not a copy, on little-endian hosts (all that Node runs on in practice).
 */
export function npyParts(data: NpyData, shape: readonly number[]): [Buffer, Uint8Array] {
  const descr = descrFor(data);
  const count = checkShape(shape);
  if (count !== data.length) {
    throw new RangeError(`shape [${shape.join(', ')}] holds ${count} elements but data has ${data.length}`);
  }
  let header = `{'descr': '${descr}', 'fortran_order': False, 'shape': ${shapeLiteral(shape)}, }`;
  const preamble = NPY_MAGIC.length + 2 + 2; // magic, version, uint16 header length
  const unpadded = preamble + header.length + 1; // + '\n'
  const padding = (NPY_ALIGN - (unpadded % NPY_ALIGN)) % NPY_ALIGN;
  header = `${header}${' '.repeat(padding)}\n`;
  if (header.length > 0xffff) throw new RangeError(`npy header too long for format 1.0 (${header.length} bytes)`);
  const head = Buffer.alloc(preamble + header.length);
  head.set(NPY_MAGIC, 0);
  head[6] = 1; // major version
  head[7] = 0; // minor version
  head.writeUInt16LE(header.length, 8);
  head.write(header, preamble, 'latin1');
  if (isLittleEndianHost()) return [head, new Uint8Array(data.buffer, data.byteOffset, data.byteLength)];
  const body = Buffer.alloc(data.byteLength);
  writeLittleEndian(body, 0, data);
  return [head, body];
}

function isLittleEndianHost(): boolean {
  return new Uint8Array(Uint16Array.of(1).buffer)[0] === 1;
}

function writeLittleEndian(out: Buffer, offset: number, data: NpyData): void {
  const view = new DataView(out.buffer, out.byteOffset + offset);
  const size = data.BYTES_PER_ELEMENT;
  for (let i = 0; i < data.length; i++) {
    const v = data[i];
    if (data instanceof Float32Array) view.setFloat32(i * size, v, true);
    else if (data instanceof Float64Array) view.setFloat64(i * size, v, true);
    else if (data instanceof Uint16Array) view.setUint16(i * size, v, true);
    else if (data instanceof Int32Array) view.setInt32(i * size, v, true);
    else view.setUint8(i, v);
  }
}

/** Writes a `.npy` file atomically. */
export async function writeNpy(path: string, data: NpyData, shape: readonly number[]): Promise<void> {
  await atomicWriteFile(path, npyParts(data, shape));
}
