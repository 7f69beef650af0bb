/**
 * The built-in material library: every entry is data in `shared/materials/` (sources and licence in
 * `shared/materials/SOURCES.md`). `getMaterial('glycerol-water:20')` builds a mixture (see
 * ./glycerolWater.ts).
 */
import { readFileSync } from 'node:fs';
import { sharedPath } from '../data/sharedDir.js';
import { glycerolWaterMaterial } from './glycerolWater.js';
import { constantMaterial, type MaterialOptions } from './material.js';
import { materialFromRecord } from './materialRecord.js';
import { materialFromNkTable, parseNkCsv, type NkTable } from './materialTable.js';
import type { Material } from './types.js';

interface LibraryEntry {
  /** File in `shared/materials/`: `.json` formula record or `.csv` n,k table. */
  readonly file: string;
  /** For tables (the JSON records carry their own). */
  readonly description?: string;
  readonly source?: string;
}

export const materialLibrary = {
  air: { file: 'air_ciddor1996.json' },
  water: { file: 'water_daimon2007_20C.json' },
  'water-hale': {
    file: 'water_hale_querry1973.csv',
    description: 'liquid water, 25 °C (n, k table)',
    source: 'Hale & Querry 1973, Appl. Opt. 12, 555, doi:10.1364/AO.12.000555',
  },
  glycerol: { file: 'glycerol_gupta2022.json' },
  'fused-silica': { file: 'sio2_fused_silica_malitson1965.json' },
  si: {
    file: 'si_crystalline_green2008.csv',
    description: 'crystalline Si, intrinsic, 300 K (n, k table)',
    source: 'Green 2008, Sol. Energy Mater. Sol. Cells 92, 1305, doi:10.1016/j.solmat.2008.06.009',
  },
  si3n4: { file: 'si3n4_luke2015.json' },
  'si3n4-philipp': { file: 'si3n4_philipp1973.json' },
  'tio2-rutile': { file: 'tio2_rutile_o_devore1951.json' },
  'tio2-ald': {
    file: 'tio2_ald_film_siefke2016.csv',
    description: 'TiO2 thin film (ALD, 350 nm) (n, k table)',
    source: 'Siefke et al. 2016, Adv. Opt. Mater. 4, 1780, doi:10.1002/adom.201600250',
  },
  al2o3: { file: 'al2o3_sapphire_o_malitson1962.json' },
  mgf2: { file: 'mgf2_o_dodge1984.json' },
  'n-bk7': { file: 'n-bk7_schott.json' },
  'soda-lime': { file: 'soda_lime_glass_rubin1985.json' },
  pmma: { file: 'pmma_sultanova2009.json' },
  polystyrene: { file: 'polystyrene_sultanova2009.json' },
  al: {
    file: 'al_rakic1998_ld.csv',
    description: 'aluminium (Lorentz–Drude model values, n, k table)',
    source: 'Rakić et al. 1998, Appl. Opt. 37, 5271, doi:10.1364/AO.37.005271',
  },
  ag: {
    file: 'ag_johnson_christy1972.csv',
    description: 'silver, evaporated film (n, k table)',
    source: 'Johnson & Christy 1972, Phys. Rev. B 6, 4370, doi:10.1103/PhysRevB.6.4370',
  },
} satisfies Record<string, LibraryEntry>;

/** Other accepted spellings for library names. */
const aliases: Readonly<Record<string, keyof typeof materialLibrary>> = {
  sio2: 'fused-silica',
  'thermal-sio2': 'fused-silica',
  h2o: 'water',
  bk7: 'n-bk7',
  'si3n4-luke': 'si3n4',
  tio2: 'tio2-ald',
};

const GLYCEROL_WATER = 'glycerol-water';
const GLYCEROL_WATER_FILE = 'glycerol_water_gupta2022.json';

const jsonCache = new Map<string, unknown>();
const tableCache = new Map<string, NkTable>();

function readJson(file: string): unknown {
  let record = jsonCache.get(file);
  if (record === undefined) {
    record = JSON.parse(readFileSync(sharedPath('materials', file), 'utf8')) as unknown;
    jsonCache.set(file, record);
  }
  return record;
}

function readTable(file: string): NkTable {
  let table = tableCache.get(file);
  if (table === undefined) {
    table = parseNkCsv(readFileSync(sharedPath('materials', file), 'utf8'), file);
    tableCache.set(file, table);
  }
  return table;
}

/** Library names (without aliases), plus the mixture pattern `glycerol-water:<wt%>` and `vacuum`. */
export function listMaterialNames(): string[] {
  return ['vacuum', ...Object.keys(materialLibrary), `${GLYCEROL_WATER}:<wt%>`];
}

/** True when `name` is a library name, alias or mixture (without loading anything). */
export function isMaterialName(name: string): boolean {
  const key = name.trim().toLowerCase();
  return key === 'vacuum' || key in materialLibrary || key in aliases || key.startsWith(`${GLYCEROL_WATER}:`);
}

/** A library material by name (case-insensitive); RangeError listing the names if unknown. */
export function getMaterial(name: string, options: MaterialOptions = {}): Material {
  if (typeof name !== 'string') throw new TypeError(`material name must be a string, received ${typeof name}`);
  const key = name.trim().toLowerCase();
  if (key === 'vacuum') return constantMaterial(1, 0, 'vacuum');
  if (key.startsWith(`${GLYCEROL_WATER}:`)) {
    const text = key.slice(GLYCEROL_WATER.length + 1).replace(/%$/, '');
    const weightPercent = text === '' ? Number.NaN : Number(text);
    return glycerolWaterMaterial(readJson(GLYCEROL_WATER_FILE), GLYCEROL_WATER_FILE, weightPercent, options);
  }
  const canonical = (key in materialLibrary ? key : aliases[key]) as keyof typeof materialLibrary | undefined;
  if (canonical === undefined) {
    throw new RangeError(`unknown material '${name}': expected one of ${listMaterialNames().join(', ')}`);
  }
  const entry: LibraryEntry = materialLibrary[canonical];
  if (entry.file.endsWith('.csv')) {
    return materialFromNkTable(
      readTable(entry.file),
      { name: canonical, description: entry.description ?? canonical, source: entry.source ?? entry.file },
      options,
    );
  }
  return materialFromRecord(readJson(entry.file), entry.file, canonical, options);
}
