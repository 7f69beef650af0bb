/**
 * Renders SVG markup to PNG bytes (for reports and previews). Text is drawn with the system's
 * fonts through fontconfig; `density` sets the DPI (72 = one SVG unit per pixel).
 */
import sharp from './sharp.js';

export async function rasteriseSvg(svg: string, options: { density?: number } = {}): Promise<Buffer> {
  if (typeof svg !== 'string' || !/<svg[\s>]/.test(svg)) {
    throw new TypeError(`svg must be a string holding an <svg> element, received ${typeof svg === 'string' ? JSON.stringify(svg.slice(0, 40)) : typeof svg}`);
  }
  const density = options.density ?? 72;
  if (!(Number.isFinite(density) && density >= 1 && density <= 2400)) {
    throw new RangeError(`density must be a number from 1 to 2400, received ${density}`);
  }
  return sharp(Buffer.from(svg, 'utf8'), { density }).png().toBuffer();
}
