/**
 * Reads what the flow needs from a finished `lamella series` output folder: `series.json` (format
 * `lamella-series`: settings such as thin_below_nm and pixel_size_um), `series.csv` (frames in
 * order, with their times) and `frames/<stem>.json` (each frame's record: its name, stem and
 * settings hash). Frames without a thickness map are left out (and listed). Errors name the file:
 * a folder that is not a series output, or one with fewer than two mapped frames.
 */
import { readFile, readdir } from 'node:fs/promises';
import { join } from 'node:path';
import { InputError } from '../errors.js';
import { exists, framesDir, frameNpyPath } from '../series/frameFiles.js';

export interface SeriesFrameForFlow {
  readonly name: string;
  readonly stem: string;
  readonly timeS: number;
  readonly thicknessPath: string;
  readonly statusPath: string;
  /** The frame record's settings hash: changes when the frame is mapped again. */
  readonly settingsHash: string;
}

export interface SeriesForFlow {
  readonly dir: string;
  readonly frames: readonly SeriesFrameForFlow[];
  /** Frames listed in series.csv without a thickness map. */
  readonly missing: readonly string[];
  readonly thinBelowNm: number | null;
  readonly pixelSizeUm: number | null;
  readonly width: number | null;
  readonly height: number | null;
}

/** RFC 4180 CSV (quoted fields, doubled quotes) into rows of cells. */
export function parseCsv(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let cell = '';
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') {
        cell += '"';
        i++;
      } else if (ch === '"') quoted = false;
      else cell += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === ',') {
      row.push(cell);
      cell = '';
    } else if (ch === '\n' || ch === '\r') {
      if (ch === '\r' && text[i + 1] === '\n') i++;
      row.push(cell);
      rows.push(row);
      row = [];
      cell = '';
    } else cell += ch;
  }
  if (cell !== '' || row.length > 0) {
    row.push(cell);
    rows.push(row);
  }
  return rows;
}

/** A text cell as Lamella wrote it (../io/csvCell.ts): the apostrophe before a formula-like start removed. */
function uncell(text: string): string {
  return /^'[=+\-@\t\r]/.test(text) ? text.slice(1) : text;
}

export async function readSeriesForFlow(dir: string): Promise<SeriesForFlow> {
  const jsonPath = join(dir, 'series.json');
  let json: Record<string, unknown>;
  try {
    json = JSON.parse(await readFile(jsonPath, 'utf8')) as Record<string, unknown>;
  } catch (error) {
    const code = (error as { code?: string }).code;
    if (code === 'ENOENT' || code === 'ENOTDIR') throw new InputError(dir, 'not a lamella series output folder (no series.json; run `lamella series ... --out` first)');
    throw new InputError(jsonPath, `cannot read the series record (${error instanceof Error ? error.message : String(error)})`);
  }
  if (json === null || typeof json !== 'object' || json.format !== 'lamella-series') {
    throw new InputError(jsonPath, 'not a lamella series record (format is not "lamella-series")');
  }
  const settings = (json.settings ?? {}) as Record<string, unknown>;
  const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
  const size = (json.frames ?? {}) as Record<string, unknown>;
  const csvPath = join(dir, 'series.csv');
  let csv: string;
  try {
    csv = await readFile(csvPath, 'utf8');
  } catch {
    throw new InputError(dir, 'not a complete lamella series output folder (no series.csv)');
  }
  const rows = parseCsv(csv);
  const header = rows[0] ?? [];
  const frameCol = header.indexOf('frame');
  const timeCol = header.indexOf('time_s');
  if (frameCol < 0 || timeCol < 0) throw new InputError(csvPath, 'expected columns frame and time_s');
  // Frame name → record (stem, settings hash), from the frame records.
  const records = new Map<string, { stem: string; hash: string }>();
  let names: string[] = [];
  try {
    names = await readdir(framesDir(dir));
  } catch {
    throw new InputError(dir, 'not a lamella series output folder (no frames/ folder)');
  }
  for (const file of names.sort()) {
    if (!file.endsWith('.json') || file.startsWith('.')) continue;
    try {
      const r = JSON.parse(await readFile(join(framesDir(dir), file), 'utf8')) as Record<string, unknown>;
      if (r.format === 'lamella-series-frame' && typeof r.frame === 'string' && typeof r.stem === 'string') {
        records.set(r.frame, { stem: r.stem, hash: String(r.settings_hash ?? '') });
      }
    } catch {
      // An unreadable record counts as a frame without results.
    }
  }
  const frames: SeriesFrameForFlow[] = [];
  const missing: string[] = [];
  for (const row of rows.slice(1)) {
    if (row.length < header.length) continue;
    const name = uncell(row[frameCol]);
    const timeS = Number(row[timeCol]);
    const record = records.get(name);
    const thicknessPath = record ? frameNpyPath(dir, record.stem, 'thickness') : '';
    if (!record || !Number.isFinite(timeS) || !(await exists(thicknessPath))) {
      missing.push(name);
      continue;
    }
    frames.push({ name, stem: record.stem, timeS, thicknessPath, statusPath: frameNpyPath(dir, record.stem, 'status'), settingsHash: record.hash });
  }
  if (frames.length < 2) {
    throw new InputError(dir, `a series with ${frames.length} mapped frame(s): the flow needs at least two`);
  }
  return {
    dir,
    frames,
    missing,
    thinBelowNm: num(settings.thin_below_nm),
    pixelSizeUm: num(settings.pixel_size_um),
    width: num(size.width),
    height: num(size.height),
  };
}
