/**
 * Float32 arrays to base64 text of their little-endian bytes, for embedding in the page
 * (the page decodes with `atob` into a `Float32Array`; every current browser runs little-endian).
 */
import { endianness } from 'node:os';

/** Base64 of the array's values as IEEE-754 float32, little-endian, no padding between values. */
export function encodeFloat32Base64(values: Float32Array): string {
  if (!(values instanceof Float32Array)) {
    throw new TypeError(`encodeFloat32Base64: values must be a Float32Array, received ${describe(values)}`);
  }
  if (endianness() === 'LE') {
    return Buffer.from(values.buffer, values.byteOffset, values.byteLength).toString('base64');
  }
  const bytes = Buffer.alloc(values.length * 4);
  for (let i = 0; i < values.length; i++) bytes.writeFloatLE(values[i], i * 4);
  return bytes.toString('base64');
}

/** Inverse of `encodeFloat32Base64` (used by tests and tools reading a report back). */
export function decodeFloat32Base64(text: string): Float32Array {
  const bytes = Buffer.from(text, 'base64');
  if (bytes.length % 4 !== 0) {
    throw new RangeError(`decodeFloat32Base64: byte count must be a multiple of 4, received ${bytes.length}`);
  }
  const values = new Float32Array(bytes.length / 4);
  for (let i = 0; i < values.length; i++) values[i] = bytes.readFloatLE(i * 4);
  return values;
}

function describe(value: unknown): string {
  if (value === null) return 'null';
  if (typeof value === 'object') return (value as object).constructor?.name ?? 'object';
  return typeof value;
}
