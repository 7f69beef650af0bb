/**
 * `mapPhoto`: the library's one call for what `lamella map` does to one photo, with the result in
 * memory (write it with `writeMapOutputs`).
 */
import { resolveStack } from '../optics/index.js';
import type { Stack } from '../optics/types.js';
import { DEFAULT_MAX_THICKNESS_NM, defaultThinBelowNm } from '../map/mapDefaults.js';
import { InputError } from '../errors.js';
import { mapDecodedPhoto, readMask, type MappedPhoto } from '../map/mapPhoto.js';
import type { MapOptions } from '../map/types.js';
import { photoFromInput, type PhotoInput, type PhotoInputOptions } from './photoInput.js';


/** MapOptions with the stack by preset name or as a Stack, and the mask as a file or in memory. */
export type MapPhotoOptions = Omit<MapOptions, 'stack' | 'maskPath' | 'angleRad' | 'thinBelowNm' | 'maxThicknessNm'> &
  PhotoInputOptions & {
    /** The film stack: a preset name (`soap-film`, `oxide-on-silicon`, …), a stack file, or a resolved Stack. */
    readonly stack: Stack | string;
    /** Viewing angle in the ambient medium (default 0: along the normal). */
    readonly angleRad?: number;
    /** Thin (rupture-risk) threshold, nm (default as the CLI: 50 for the `soap-film` preset, else none). */
    readonly thinBelowNm?: number | null;
    /** Largest thickness considered, nm (default 2000, as the CLI). */
    readonly maxThicknessNm?: number;
    /** Only where the mask is non-zero is film: a mask image's path, or one byte per pixel (row by row). */
    readonly mask?: string | Uint8Array | null;
  };

/**
 * Maps the film thickness of one photo: fits the photo formation (exposure, white balance, flare,
 * camera response, light field), finds the film area, resolves the interference orders and
 * matches every pixel. Returns the thickness map (nm, NaN = no estimate), confidence, pixel
 * statuses, statistics, thin regions and the fitted parameters; writes nothing.
 *
 * @param input a photo file's path, the bytes of a photo file, or a decoded photo
 * @param options the film, the light and how to map (see MapOptions)
 * @throws InputError when the photo cannot be read or the mask does not fit it
 * @example
 * const result = await mapPhoto(readFileSync('film.jpg'), { stack: 'soap-film', light: 'D65', thinBelowNm: 100 });
 * console.log(result.stats.median_nm, result.thinRegions.length);
 */
export async function mapPhoto(input: PhotoInput, options: MapPhotoOptions): Promise<MappedPhoto> {
  const { photo, name } = await photoFromInput(input, options);
  const stack = typeof options.stack === 'string' ? resolveStack(options.stack) : options.stack;
  let mask: Uint8Array | null = null;
  if (typeof options.mask === 'string') mask = await readMask(options.mask, photo.width, photo.height);
  else if (options.mask) {
    if (options.mask.length !== photo.width * photo.height) {
      throw new InputError(name, `the mask holds ${options.mask.length} values but the photo has ${photo.width}×${photo.height} pixels`);
    }
    mask = options.mask;
  }
  const { mask: _mask, name: _name, allowDamaged: _allowDamaged, ...mapOptions } = options;
  return mapDecodedPhoto(
    photo,
    {
      ...mapOptions,
      stack,
      angleRad: options.angleRad ?? 0,
      thinBelowNm: options.thinBelowNm !== undefined ? options.thinBelowNm : defaultThinBelowNm(options.stack),
      maxThicknessNm: options.maxThicknessNm ?? DEFAULT_MAX_THICKNESS_NM,
      maskPath: typeof options.mask === 'string' ? options.mask : null,
    },
    mask,
    name,
  );
}
