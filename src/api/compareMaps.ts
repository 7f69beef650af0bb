/**
 * `compareMaps`: the library's one call for what `lamella compare` does: read two thickness maps
 * (`.npy`, float TIFF) or map two photos with the same settings, take after − before (a rate with
 * a duration), and write the difference set into `outDir` (replaced all together or not at all):
 * `difference.npy`, `difference.tif`, `rate.npy` (with a duration), `difference.png`,
 * `compare.json` and `report.html`.
 */
import { basename, extname, join } from 'node:path';
import { UsageError } from '../errors.js';
import { atomicWriteFile } from '../io/atomicWriteFile.js';
import { writeNpy } from '../io/encodeNpy.js';
import { writeFloatTiff } from '../io/encodeFloatTiff.js';
import { assertNoInputOverwritten, ensureOutputDir } from '../io/ensureOutputDir.js';
import { MAP_MAX_PIXELS } from '../io/limits.js';
import { readPhoto } from '../io/readPhoto.js';
import { readThicknessGrid } from '../io/readThicknessGrid.js';
import { recoverStagedSets, writeOutputSet } from '../io/writeOutputSet.js';
import { compareGrids, type Comparison, type CompareOptions, type ThicknessGrid } from '../inspect/compareMaps.js';
import { compareJson, compareReport, differencePng } from '../inspect/compareOutputs.js';
import { mapDecodedPhoto, readMask } from '../map/mapPhoto.js';
import type { MapOptions } from '../map/types.js';

export interface CompareMapsOptions extends CompareOptions {
  readonly outDir: string;
  /** How to map inputs that are photos (the same settings for both); null: only maps are accepted. */
  readonly map?: MapOptions | null;
  /** Told a warning in plain words. */
  readonly onWarning?: (message: string) => void;
}

export interface CompareMapsResult {
  readonly comparison: Comparison;
  readonly record: Record<string, unknown>;
  readonly written: string[];
}

const MAP_EXTENSIONS = new Set(['.npy', '.tif', '.tiff']);

/** A thickness map by its name (`.npy`, `.tif`/`.tiff` holding float values), else a photo. */
function isMapFile(path: string): boolean {
  return MAP_EXTENSIONS.has(extname(path).toLowerCase());
}

async function loadGrid(path: string, role: string, map: MapOptions | null, warnings: string[]): Promise<{ grid: ThicknessGrid; kind: 'map' | 'photo' }> {
  if (isMapFile(path)) {
    try {
      return { grid: await readThicknessGrid(path), kind: 'map' };
    } catch (error) {
      // A TIFF photo (8 or 16-bit colour) is not a map: mapped like any photo when settings are given.
      if (!(extname(path).toLowerCase() !== '.npy' && map)) throw error;
    }
  }
  if (!map) throw new UsageError(`compare: ${role} ${path} is a photo; give --stack (and --light) to map it, or compare two maps (.npy or float .tif)`);
  const photo = await readPhoto(path, { maxPixels: MAP_MAX_PIXELS });
  const mask = map.maskPath ? await readMask(map.maskPath, photo.width, photo.height) : null;
  const result = mapDecodedPhoto(photo, map, mask, path);
  for (const w of [...(photo.warnings ?? []), ...result.warnings]) warnings.push(`${basename(path)}: ${w}`);
  return { grid: { data: result.thicknessNm, width: result.width, height: result.height }, kind: 'photo' };
}

/**
 * Compares two maps (see the module comment).
 * @throws UsageError when the maps differ in size, the shift or duration is bad, or a photo is given without map settings
 * @throws InputError when a file cannot be read
 * @example
 * const { comparison } = await compareMaps('before.thickness.npy', 'after.thickness.npy', { outDir: 'etch', durationS: 120 });
 * console.log(comparison.statistics.mean_nm);
 */
export async function compareMaps(beforePath: string, afterPath: string, options: CompareMapsOptions): Promise<CompareMapsResult> {
  const names = ['difference.npy', 'difference.tif', ...(options.durationS ? ['rate.npy'] : []), 'difference.png', 'compare.json', 'report.html'];
  const planned = names.map((n) => join(options.outDir, n));
  const inputs = [{ path: beforePath, role: 'BEFORE' }, { path: afterPath, role: 'AFTER' }];
  assertNoInputOverwritten(inputs, planned);
  const warnings: string[] = [];
  const before = await loadGrid(beforePath, 'BEFORE', options.map ?? null, warnings);
  const after = await loadGrid(afterPath, 'AFTER', options.map ?? null, warnings);
  const comparison = compareGrids(before.grid, after.grid, options, [beforePath, afterPath]);
  if (comparison.comparedPx === 0) warnings.push('no pixel has a value in both maps: nothing to compare');
  for (const w of warnings) options.onWarning?.(w);
  const record = compareJson(comparison, { path: basename(beforePath), kind: before.kind }, { path: basename(afterPath), kind: after.kind }, warnings);
  const outDir = await ensureOutputDir(options.outDir, { inputs, outputs: planned });
  recoverStagedSets(outDir);
  const title = `${basename(afterPath)} − ${basename(beforePath)}`;
  const { width, height } = comparison;
  const pixelSizeUm = options.map?.pixelSizeUm ?? null;
  await writeOutputSet(planned, async (staging) => {
    const png = await differencePng(comparison, comparison.rateNmPerMin ? `${title}, per minute` : title);
    await Promise.all([
      writeNpy(join(staging, 'difference.npy'), comparison.differenceNm, [height, width]),
      writeFloatTiff(join(staging, 'difference.tif'), comparison.differenceNm, width, height, { pixelSizeUm, description: `Lamella difference map; quantity: after - before film thickness; unit: nm; sample: 32-bit float; NaN: no value in one of the maps${pixelSizeUm ? `; pixel size ${pixelSizeUm} um` : ''}` }),
      ...(comparison.rateNmPerMin ? [writeNpy(join(staging, 'rate.npy'), comparison.rateNmPerMin, [height, width])] : []),
      atomicWriteFile(join(staging, 'difference.png'), png),
      atomicWriteFile(join(staging, 'compare.json'), Buffer.from(`${JSON.stringify(record, null, 2)}\n`, 'utf8')),
      atomicWriteFile(join(staging, 'report.html'), Buffer.from(compareReport(comparison, record, png, `Change ${title}`), 'utf8')),
    ]);
  });
  return { comparison, record, written: planned };
}
