/**
 * Image bytes as a `data:` URI for an `<img>` in the self-contained page. The type is taken from
 * the file signature: PNG (ISO/IEC 15948:2004 §5.2, 8-byte signature) or JPEG (ISO/IEC 10918-1,
 * SOI marker FF D8 FF); anything else is refused so a broken image never reaches the page.
 */

const pngSignature = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];

/** MIME type of PNG or JPEG bytes, or null when the bytes are neither. */
export function sniffImageType(bytes: Uint8Array): 'image/png' | 'image/jpeg' | null {
  if (bytes.length >= 8 && pngSignature.every((b, i) => bytes[i] === b)) return 'image/png';
  if (bytes.length >= 3 && bytes[0] === 0xff && bytes[1] === 0xd8 && bytes[2] === 0xff) return 'image/jpeg';
  return null;
}

/** `data:image/png;base64,...` for PNG or JPEG bytes; `name` is the field named in errors. */
export function imageDataUri(bytes: Uint8Array, name: string): string {
  if (!(bytes instanceof Uint8Array)) {
    throw new TypeError(`${name} must be a Buffer of PNG bytes, received ${bytes === null ? 'null' : typeof bytes}`);
  }
  const type = sniffImageType(bytes);
  if (type === null) {
    const head = Array.from(bytes.subarray(0, 4), (b) => b.toString(16).padStart(2, '0')).join(' ');
    throw new TypeError(`${name} must hold PNG (or JPEG) bytes, received ${bytes.length} bytes starting ${head || '(empty)'}`);
  }
  return `data:${type};base64,${Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('base64')}`;
}
