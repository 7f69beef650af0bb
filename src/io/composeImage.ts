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
  const picture = await sharp(new Uint8Array(image.data), {
    raw: { width: image.width, height: image.height, channels: image.channels },
  })
    .png({ compressionLevel: 1 })
    .toBuffer();
  return sharp({
    create: {
      width: request.canvasWidth,
      height: request.canvasHeight,
      channels: 3,
      background: request.background,
    },
  })
    .composite([
      { input: picture, left: request.imageLeft, top: request.imageTop },
      ...request.overlays.map((svg) => ({ input: Buffer.from(svg, 'utf8'), left: 0, top: 0 })),
    ])
    .png({ compressionLevel: 6, adaptiveFiltering: false })
    .toBuffer();
}
