/**
 * Typed-array views on codec output. A view needs its byte offset to be a multiple of the element
 * size; the codec's buffers normally start at 0, and when one does not the bytes are copied.
 */

export function uint16View(bytes: Buffer): Uint16Array {
  if (bytes.byteOffset % 2 === 0) return new Uint16Array(bytes.buffer, bytes.byteOffset, bytes.byteLength >> 1);
  return new Uint16Array(Uint8Array.from(bytes).buffer, 0, bytes.byteLength >> 1);
}

export function float32View(bytes: Buffer): Float32Array {
  if (bytes.byteOffset % 4 === 0) return new Float32Array(bytes.buffer, bytes.byteOffset, bytes.byteLength >> 2);
  return new Float32Array(Uint8Array.from(bytes).buffer, 0, bytes.byteLength >> 2);
}
