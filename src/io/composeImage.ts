/**
 * Places an 8-bit RGB raster on a larger canvas and draws SVG overlays (labels, colour bars,
 * scale bars) on top, returning PNG bytes. Used for the map and flag previews, where the
 * picture is large and the annotations are vector graphics with text.
 */
import sharp from 'sharp';
import { checkRasterImage } from './checkRasterImage.js';
import type { RasterImage } from './photo.js';

export interface ComposeRequest {
  readonly canvasWidth: number;
  readonly canvasHeight: number;
  /** sRGB background, e.g. '#ffffff'. */
  readonly background: string;
  readonly image: RasterImage;
  readonly imageLeft: number;
  readonly imageTop: number;
  /** SVG documents the size of the canvas, drawn over everything. */
  readonly overlays: readonly string[];
}

export async function composeImagePng(request: ComposeRequest): Promise<Buffer> {
  const { image } = request;
  checkRasterImage(image);
  if (!(image.data instanceof Uint8Array)) {
    throw new TypeError('composeImagePng() takes 8-bit images: image.data must be a Uint8Array, received Uint16Array');
  }
  // Without overlays, and when the picture fills the canvas, encode it directly.
  if (request.overlays.length === 0 && request.imageLeft === 0 && request.imageTop === 0 &&
      image.width === request.canvasWidth && image.height === request.canvasHeight) {
    return sharp(Buffer.from(image.data.buffer, image.data.byteOffset, image.data.byteLength), {
      raw: { width: image.width, height: image.height, channels: image.channels },
    })
      .png({ compressionLevel: 3, adaptiveFiltering: false })
      .toBuffer();
  }
  return sharp({
    create: {
      width: request.canvasWidth,
      height: request.canvasHeight,
      channels: 3,
      background: request.background,
    },
  })
    .composite([
      {
        input: Buffer.from(image.data.buffer, image.data.byteOffset, image.data.byteLength),
        raw: { width: image.width, height: image.height, channels: image.channels },
        left: request.imageLeft,
        top: request.imageTop,
      },
      ...request.overlays.map((svg) => ({ input: Buffer.from(svg, 'utf8'), left: 0, top: 0 })),
    ])
    .png({ compressionLevel: 3, adaptiveFiltering: false })
    .toBuffer();
}
