/**
 * Minimal reader/writer of 2-D little-endian float32 arrays in the NumPy `.npy` format, version
 * 1.0 (NumPy Enhancement Proposal NEP 1, "A simple file format for NumPy arrays"): magic
 * `\x93NUMPY`, version bytes, a little-endian uint16 header length, an ASCII dict header padded
 * with spaces and a newline to a multiple of 64 bytes, then the raw C-order data.
 * Used for the per-frame thickness maps a series stores and reads back as priors.
 */
const MAGIC = Buffer.from([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]);

export function encodeNpyFloat32(data: Float32Array, height: number, width: number): Buffer {
  if (data.length !== height * width) throw new RangeError(`npy data length must be height*width = ${height * width}, received ${data.length}`);
  let header = `{'descr': '<f4', 'fortran_order': False, 'shape': (${height}, ${width}), }`;
  const unpadded = MAGIC.length + 2 + 2 + header.length + 1;
  header += ' '.repeat((64 - (unpadded % 64)) % 64) + '\n';
  const head = Buffer.alloc(MAGIC.length + 4);
  MAGIC.copy(head, 0);
  head[6] = 1;
  head[7] = 0;
  head.writeUInt16LE(header.length, 8);
  const body = Buffer.alloc(data.length * 4);
  for (let i = 0; i < data.length; i++) body.writeFloatLE(data[i], i * 4);
  return Buffer.concat([head, Buffer.from(header, 'latin1'), body]);
}

export interface NpyFloat32 {
  readonly data: Float32Array;
  readonly height: number;
  readonly width: number;
}

export function decodeNpyFloat32(bytes: Buffer, file = 'npy data'): NpyFloat32 {
  if (bytes.length < 10 || !bytes.subarray(0, 6).equals(MAGIC)) throw new RangeError(`${file}: not a .npy file (magic bytes missing)`);
  const major = bytes[6];
  const headerLength = major === 1 ? bytes.readUInt16LE(8) : bytes.readUInt32LE(8);
  const offset = major === 1 ? 10 : 12;
  const header = bytes.subarray(offset, offset + headerLength).toString('latin1');
  if (!/'descr':\s*'<f4'/.test(header) || /'fortran_order':\s*True/.test(header)) {
    throw new RangeError(`${file}: expected little-endian float32 in C order, received header ${header.trim()}`);
  }
  const shape = /'shape':\s*\((\d+),\s*(\d+)\)/.exec(header);
  if (!shape) throw new RangeError(`${file}: expected a 2-D shape, received header ${header.trim()}`);
  const height = Number(shape[1]);
  const width = Number(shape[2]);
  const start = offset + headerLength;
  if (bytes.length - start !== height * width * 4) throw new RangeError(`${file}: expected ${height * width * 4} data bytes, received ${bytes.length - start}`);
  const data = new Float32Array(height * width);
  for (let i = 0; i < data.length; i++) data[i] = bytes.readFloatLE(start + i * 4);
  return { data, height, width };
}
