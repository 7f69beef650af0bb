/**
 * Reads the profile description text of an embedded ICC profile.
 * ICC.1:2004-10 (profile version 4.2) and ICC.1:2001-04 (version 2): header 128 bytes, then tag
 * count (uint32 BE) and 12-byte tag entries (signature, offset, size); the 'desc' tag holds either
 * type 'desc' (v2 textDescriptionType: uint32 ASCII length at +8, then ASCII) or type 'mluc'
 * (v4 multiLocalizedUnicodeType: record count at +8, record size at +12, records of language,
 * country, length, offset; strings UTF-16BE).
 */

export function iccDescription(profile: Uint8Array | undefined): string | undefined {
  if (!profile || profile.length < 132) return undefined;
  const view = new DataView(profile.buffer, profile.byteOffset, profile.byteLength);
  const ascii = (at: number, length: number) => String.fromCharCode(...profile.subarray(at, at + length));
  const count = view.getUint32(128);
  for (let i = 0; i < count && 132 + i * 12 + 12 <= profile.length; i++) {
    const entry = 132 + i * 12;
    if (ascii(entry, 4) !== 'desc') continue;
    const offset = view.getUint32(entry + 4);
    const size = view.getUint32(entry + 8);
    if (offset + size > profile.length || size < 12) return undefined;
    const type = ascii(offset, 4);
    if (type === 'desc') {
      const length = view.getUint32(offset + 8);
      if (offset + 12 + length > profile.length) return undefined;
      return ascii(offset + 12, length).replace(/\0+$/, '').trim();
    }
    if (type === 'mluc') {
      const records = view.getUint32(offset + 8);
      if (records < 1 || offset + 28 > profile.length) return undefined;
      const length = view.getUint32(offset + 20);
      const start = offset + view.getUint32(offset + 24);
      if (start + length > profile.length) return undefined;
      let text = '';
      for (let k = 0; k + 1 < length; k += 2) text += String.fromCharCode(view.getUint16(start + k));
      return text.replace(/\0+$/, '').trim();
    }
    return undefined;
  }
  return undefined;
}

/** True when a profile description names sRGB (e.g. "sRGB IEC61966-2.1", "sRGB built-in"). */
export function isSrgbDescription(description: string | undefined): boolean {
  return description !== undefined && /\bsRGB\b/i.test(description);
}
