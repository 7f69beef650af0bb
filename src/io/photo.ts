/** Plain records exchanged with the image adapter. Only `src/io` touches the image codec. */

/** Capture time read from EXIF (DateTimeOriginal + SubSecTimeOriginal). */
export interface PhotoTime {
  /** EXIF DateTimeOriginal exactly as written, `YYYY:MM:DD HH:MM:SS`. */
  dateTimeOriginal?: string;
  /** EXIF SubSecTimeOriginal digits, e.g. `25` meaning 0.25 s. */
  subSecTimeOriginal?: string;
  /** Seconds since 1970-01-01, the camera's local time treated as UTC, with sub-seconds. */
  timestampS?: number;
  /** Set when DateTimeOriginal is present but impossible (e.g. 0000:00:00, month 13): no timestampS then. */
  problem?: string;
}

/** A decoded photograph with upright pixels. */
export interface Photo {
  width: number;
  height: number;
  /**
   * Interleaved RGB, encoded values scaled to 0..1 (8-bit / 255, 16-bit / 65535). readPhoto()
   * allocates it in a SharedArrayBuffer (the mapper's threads read it in place).
   */
  rgb: Float32Array;
  /**
   * RGB photos without alpha, as readPhoto() returns them: the decoded codes (interleaved, 0..255
   * or, 16-bit, 0..65535), which the mapper reads in place of `rgb` (a 12-MP photo is 36 MB as
   * 8-bit codes, 72 MB as 16-bit codes, 144 MB as floats). readPhoto() makes `rgb` on first read;
   * reading or setting `rgb` drops the codes, so that a map then reads the floats, changes
   * included. Code that builds a Photo leaves it out.
   */
  codes?: Uint8Array | Uint16Array;
  bitDepth: 8 | 16;
  /** Decoder that read the content: 'jpeg' | 'png' | 'tiff' | 'webp' | … (sniffed, not the suffix). */
  format: string;
  /** The source had one or two channels (grey, grey + alpha), or all three channels equal everywhere. */
  isGrey: boolean;
  hadAlpha: boolean;
  /** 0..1 per pixel, present when the source had an alpha channel. */
  alpha?: Float32Array;
  /** EXIF orientation 1–8 that was applied to make the pixels upright (1 when absent). */
  orientationApplied: number;
  exif: PhotoTime;
  /** JPEG chroma subsampling as the file states it, e.g. '4:2:0' (colour at half resolution). */
  chromaSubsampling?: string;
  /** Things the caller should tell the user about this file (e.g. a colour profile not applied). */
  warnings?: string[];
}

/** What can be learnt from a photo's header without decoding its pixels. */
export interface PhotoMetadata {
  /** Upright size (after EXIF orientation). */
  width: number;
  height: number;
  format: string;
  bitDepth: 8 | 16;
  channels: number;
  hasAlpha: boolean;
  orientation: number;
  exif: PhotoTime;
  /** Pages (images) in the file: more than 1 for a multi-page TIFF stack. */
  pages: number;
  /** Height of one page (equal to `height` for single-page files). */
  pageHeight: number;
}

export interface ReadPhotoOptions {
  /** Refuse images with more pixels than this (default and upper bound: MAX_PIXELS). */
  maxPixels?: number;
  /**
   * Decode a file the decoder reports as damaged (corrupt data, fewer rows than the header says)
   * instead of refusing it: rows the decoder filled in are made transparent (so they get no
   * estimate) and `warnings` says so. Default false: any decoder warning is an error.
   */
  allowDamaged?: boolean;
  /** Page (image) of a multi-page file to decode, from 0 (default 0; a stack's frames). */
  page?: number;
}

/** Plain raster for writing: interleaved samples, 8-bit (Uint8Array) or 16-bit (Uint16Array). */
export interface RasterImage {
  data: Uint8Array | Uint16Array;
  width: number;
  height: number;
  /** 1 grey, 2 grey + alpha, 3 RGB, 4 RGBA. */
  channels: 1 | 2 | 3 | 4;
}
