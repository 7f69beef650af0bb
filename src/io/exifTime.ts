/**
 * Capture time from an EXIF block. Tags: DateTimeOriginal (0x9003, "YYYY:MM:DD HH:MM:SS",
 * camera local time, no zone) and SubSecTimeOriginal (0x9291, fractional-second digits),
 * as defined in CIPA DC-008 (Exif 2.3), section 4.6.5. Parsing of the block is done by the
 * `exif-reader` package; it returns DateTimeOriginal as a Date built with Date.UTC from the
 * local fields, which is exactly the "local time treated as UTC" convention used here.
 */
import exifReader from 'exif-reader';
import type { PhotoTime } from './photo.js';

function pad(value: number, width: number): string {
  return String(value).padStart(width, '0');
}

/** Formats a Date (built from local fields as UTC) back to the EXIF text form. */
function formatExifDate(date: Date): string {
  return (
    `${pad(date.getUTCFullYear(), 4)}:${pad(date.getUTCMonth() + 1, 2)}:${pad(date.getUTCDate(), 2)} ` +
    `${pad(date.getUTCHours(), 2)}:${pad(date.getUTCMinutes(), 2)}:${pad(date.getUTCSeconds(), 2)}`
  );
}

/**
 * Reads DateTimeOriginal and SubSecTimeOriginal from a raw EXIF buffer (as returned by the
 * codec's metadata). Missing, blank or malformed tags give an empty record, never an error:
 * capture time is optional information.
 */
export function parseExifTime(exifBuffer: Buffer | undefined): PhotoTime {
  if (!exifBuffer || exifBuffer.length === 0) return {};
  let tags: ReturnType<typeof exifReader>;
  try {
    tags = exifReader(exifBuffer);
  } catch {
    return {};
  }
  const photo = tags.Photo ?? {};
  const original = photo.DateTimeOriginal as unknown;
  const subSecRaw = photo.SubSecTimeOriginal as unknown;
  const result: PhotoTime = {};
  if (original instanceof Date && Number.isFinite(original.getTime())) {
    const text = formatExifDate(original);
    // The parser rolls impossible fields over (month 13 becomes January of the next year,
    // 0000:00:00 a date in 1899): a valid date formats back to the text stored in the block.
    if (!exifBuffer.includes(Buffer.from(text, 'latin1'))) {
      result.problem = 'impossible DateTimeOriginal (a field out of range, e.g. month 13 or 0000:00:00)';
      return result;
    }
    result.dateTimeOriginal = text;
    result.timestampS = original.getTime() / 1000;
  }
  if (typeof subSecRaw === 'string') {
    const digits = subSecRaw.trim().replace(/\0+$/, '');
    if (/^\d+$/.test(digits)) {
      result.subSecTimeOriginal = digits;
      if (result.timestampS !== undefined) result.timestampS += Number(`0.${digits}`);
    }
  }
  return result;
}
