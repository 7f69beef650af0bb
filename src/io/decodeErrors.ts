/**
 * Maps the image codec's error messages to plain InputError messages that name the file.
 * The codec's wording varies between formats and versions; unknown messages are kept (one line).
 */
import { InputError } from '../errors.js';

export function decodeInputError(path: string, error: unknown, maxPixels: number): InputError {
  const detail = (error instanceof Error ? error.message : String(error)).replace(/\s*\n\s*/g, ' ').replace(/Warning treated as error due to failOn setting\s*/gi, '').trim();
  if (/unsupported image format|not a known file format|bad seek|no loader/i.test(detail)) {
    return new InputError(path, 'is not an image in a readable format (JPEG, PNG, TIFF, WebP, …)');
  }
  if (/pixel limit/i.test(detail)) {
    return new InputError(path, `image has more pixels than the limit of ${maxPixels} pixels; crop or down-sample it first`);
  }
  if (/\bCRC\b/i.test(detail)) {
    return new InputError(path, `damaged PNG: a checksum (CRC) does not match its data (${detail.replace(/^Warning treated as error due to failOn setting\s*/i, '')})`);
  }
  if (/libpng read error/i.test(detail)) {
    return new InputError(path, `damaged PNG: its image data cannot be read (cut short or corrupt) (${detail})`);
  }
  if (/premature end|truncated|unexpected end|read error|end of file|not enough data|corrupt|invalid|incomplete|failed to read|crc/i.test(detail)) {
    return new InputError(path, `image file is truncated or corrupt (${detail})`);
  }
  return new InputError(path, `cannot decode image (${detail})`);
}
