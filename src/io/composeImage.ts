/**
 * Places an 8-bit RGB raster on a larger canvas and draws SVG overlays (labels, colour bars,
 * scale bars) on top, returning PNG bytes. Used for the map and flag previews, where the
 * picture is large and the annotations are vector graphics with text.
 */
import sharp from './sharp.js';
import { checkRasterImage } from './checkRasterImage.js';
import type { RasterImage } from './photo.js';
import { setPngPixelSize } from './pngPixelSize.js';

export interface ComposeRequest {
  readonly canvasWidth: number;
  readonly canvasHeight: number;
  /** sRGB background, '#rrggbb' or '#rgb'. */
  readonly background: string;
  readonly image: RasterImage;
  readonly imageLeft: number;
  readonly imageTop: number;
  /**
   * SVG documents drawn over everything: a string is the size of the canvas; `{ svg, left, top }`
   * is a smaller document placed at that offset (much cheaper to draw on a large canvas).
   */
  readonly overlays: ReadonlyArray<string | { readonly svg: string; readonly left: number; readonly top: number }>;
  /** Size of one image pixel on the sample, µm: written as the PNG's pHYs; absent or null = no pHYs (./pngPixelSize.ts). */
  readonly pixelSizeUm?: number | null;
}

export async function composeImagePng(request: ComposeRequest): Promise<Buffer> {
  const { image, canvasWidth, canvasHeight } = request;
  checkRasterImage(image);
  if (!(image.data instanceof Uint8Array)) {
    throw new TypeError('composeImagePng() takes 8-bit images: image.data must be a Uint8Array, received Uint16Array');
  }
  if (image.channels !== 3) throw new TypeError(`composeImagePng() takes RGB images (3 channels), received ${image.channels}`);
  // Overlays are drawn first (the codec rasterises each small document in its own thread)
  // while the canvas is filled here; then they are blended in and the canvas encoded once.
  const drawn = Promise.all(
    request.overlays.map(async (o) => {
      const { svg, left, top } = typeof o === 'string' ? { svg: o, left: 0, top: 0 } : o;
      const { data, info } = await sharp(Buffer.from(svg, 'utf8')).ensureAlpha().raw().toBuffer({ resolveWithObject: true });
      return { data, width: info.width, height: info.height, left: Math.round(left), top: Math.round(top) };
    }),
  );
  let canvas: Uint8Array;
  if (request.imageLeft === 0 && request.imageTop === 0 && image.width === canvasWidth && image.height === canvasHeight) {
    canvas = request.overlays.length === 0 ? image.data : Uint8Array.from(image.data);
  } else {
    canvas = new Uint8Array(canvasWidth * canvasHeight * 3);
    const [r, g, b] = parseHexColour(request.background);
    for (let i = 0; i < canvas.length; i += 3) {
      canvas[i] = r;
      canvas[i + 1] = g;
      canvas[i + 2] = b;
    }
    const x0 = Math.max(0, request.imageLeft);
    const x1 = Math.min(canvasWidth, request.imageLeft + image.width);
    for (let y = 0; y < image.height; y++) {
      const cy = request.imageTop + y;
      if (cy < 0 || cy >= canvasHeight || x1 <= x0) continue;
      const from = (y * image.width + (x0 - request.imageLeft)) * 3;
      canvas.set(image.data.subarray(from, from + (x1 - x0) * 3), (cy * canvasWidth + x0) * 3);
    }
  }
  for (const overlay of await drawn) blendOver(canvas, canvasWidth, canvasHeight, overlay);
  const png = await sharp(Buffer.from(canvas.buffer, canvas.byteOffset, canvas.byteLength), {
    raw: { width: canvasWidth, height: canvasHeight, channels: 3 },
  })
    .png({ compressionLevel: 3, adaptiveFiltering: false })
    .toBuffer();
  return setPngPixelSize(png, request.pixelSizeUm ?? null);
}

/** Source-over blending of an RGBA raster (straight alpha) into an RGB canvas, clipped. */
function blendOver(
  canvas: Uint8Array,
  canvasWidth: number,
  canvasHeight: number,
  layer: { data: Uint8Array; width: number; height: number; left: number; top: number },
): void {
  for (let y = 0; y < layer.height; y++) {
    const cy = layer.top + y;
    if (cy < 0 || cy >= canvasHeight) continue;
    for (let x = 0; x < layer.width; x++) {
      const cx = layer.left + x;
      if (cx < 0 || cx >= canvasWidth) continue;
      const s = (y * layer.width + x) * 4;
      const a = layer.data[s + 3];
      if (a === 0) continue;
      const d = (cy * canvasWidth + cx) * 3;
      if (a === 255) {
        canvas[d] = layer.data[s];
        canvas[d + 1] = layer.data[s + 1];
        canvas[d + 2] = layer.data[s + 2];
      } else {
        const t = a / 255;
        canvas[d] = Math.round(layer.data[s] * t + canvas[d] * (1 - t));
        canvas[d + 1] = Math.round(layer.data[s + 1] * t + canvas[d + 1] * (1 - t));
        canvas[d + 2] = Math.round(layer.data[s + 2] * t + canvas[d + 2] * (1 - t));
      }
    }
  }
}

/** '#rgb' or '#rrggbb' → [r, g, b]. */
function parseHexColour(colour: string): [number, number, number] {
  const short = /^#([0-9a-f])([0-9a-f])([0-9a-f])$/i.exec(colour);
  if (short) return [1, 2, 3].map((k) => parseInt(short[k] + short[k], 16)) as [number, number, number];
  const long = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(colour);
  if (long) return [1, 2, 3].map((k) => parseInt(long[k], 16)) as [number, number, number];
  throw new RangeError(`background must be a colour '#rrggbb' or '#rgb', received ${JSON.stringify(colour)}`);
}
