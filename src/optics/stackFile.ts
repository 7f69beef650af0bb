/**
 * Stack files (Lamella's own JSON schema):
 *   {
 *     "name": "optional label",
 *     "ambient": <material>,
 *     "layers": [ { "material": <material>, "thicknessNm": <number> | "film" }, ... ],  // ambient side first
 *     "substrate": <material>,
 *     "backSide": { "exitMedium": <material>, "thicknessMm": <number> }                  // optional
 *   }
 * where <material> is a library name ("water", "glycerol-water:20"), a path to a material file
 * (.json / .csv, relative to the stack file), a number (constant real index), `{ "n": 2.0, "k": 0.01 }`
 * (constant complex index) or an inline formula in the schema of `shared/materials/*.json`.
 * At least one layer must be "film". `backSide` makes the substrate a thick slab whose back surface
 * adds its reflection incoherently.
 */
import { dirname, isAbsolute, resolve } from 'node:path';
import { DataFileError } from './dataFileError.js';
import { constantMaterial, type MaterialOptions } from './material.js';
import { loadMaterialFile, readJsonFile } from './materialFile.js';
import { getMaterial, isMaterialName, listMaterialNames } from './materialLibrary.js';
import { materialFromRecord } from './materialRecord.js';
import type { Layer, Material, Stack } from './types.js';

function isObject(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/** Resolves one <material> entry of a stack file. */
export function materialFromSpec(spec: unknown, file: string, field: string, options: MaterialOptions = {}): Material {
  const wrap = (error: unknown): never => {
    if (error instanceof DataFileError) throw error;
    throw new DataFileError(file, `${field}: ${(error as Error).message}`);
  };
  if (typeof spec === 'number') {
    try {
      return constantMaterial(spec);
    } catch (error) {
      return wrap(error);
    }
  }
  if (typeof spec === 'string') {
    if (isMaterialName(spec)) {
      try {
        return getMaterial(spec, options);
      } catch (error) {
        return wrap(error);
      }
    }
    if (/\.(json|csv)$/i.test(spec)) {
      try {
        return loadMaterialFile(isAbsolute(spec) ? spec : resolve(dirname(file), spec), options);
      } catch (error) {
        // Name the referring stack file and field too: the material file alone may be a mystery.
        if (error instanceof DataFileError) throw new DataFileError(error.file, `${error.detail} (referred to by ${file}, ${field})`);
        throw error;
      }
    }
    throw new DataFileError(file, `${field}: unknown material "${spec}"; expected a number, a material file (.json/.csv) or one of ${listMaterialNames().join(', ')}`);
  }
  if (isObject(spec) && spec.formula === undefined && spec.n !== undefined) {
    if (typeof spec.n !== 'number' || !Number.isFinite(spec.n) || spec.n <= 0) {
      throw new DataFileError(file, `${field}.n must be a finite number > 0, received ${JSON.stringify(spec.n)}`);
    }
    const k = spec.k ?? 0;
    if (typeof k !== 'number' || !Number.isFinite(k) || k < 0) {
      throw new DataFileError(file, `${field}.k must be a finite number >= 0, received ${JSON.stringify(spec.k)}`);
    }
    return constantMaterial(spec.n, k);
  }
  if (isObject(spec)) {
    try {
      return materialFromRecord(spec, file, typeof spec.material === 'string' ? spec.material : `${field} (inline)`, options);
    } catch (error) {
      if (error instanceof DataFileError) throw new DataFileError(file, `${field}: ${error.detail}`);
      throw error;
    }
  }
  throw new DataFileError(file, `${field} must be a material name, file, number, { n, k } or formula object, received ${JSON.stringify(spec) ?? 'nothing'}`);
}

/** Reads and checks a stack file. */
export function loadStackFile(path: string, options: MaterialOptions = {}): Stack {
  const record = readJsonFile(path, '--stack file');
  if (!isObject(record)) throw new DataFileError(path, 'expected a JSON object with ambient, layers and substrate');
  for (const key of ['ambient', 'layers', 'substrate']) {
    if (record[key] === undefined) throw new DataFileError(path, `missing field "${key}"`);
  }
  if (!Array.isArray(record.layers) || record.layers.length === 0) {
    throw new DataFileError(path, 'layers must be a non-empty array');
  }
  const layers: Layer[] = record.layers.map((entry: unknown, i: number) => {
    const field = `layers[${i}]`;
    if (!isObject(entry)) throw new DataFileError(path, `${field} must be an object with material and thicknessNm`);
    if (entry.material === undefined) throw new DataFileError(path, `missing field "${field}.material"`);
    const d = entry.thicknessNm;
    if (d === undefined) throw new DataFileError(path, `missing field "${field}.thicknessNm" (a number in nm or "film")`);
    if (d !== 'film' && (typeof d !== 'number' || !Number.isFinite(d) || d < 0)) {
      throw new DataFileError(path, `${field}.thicknessNm must be "film" or a finite number >= 0, received ${JSON.stringify(d)}`);
    }
    return { material: materialFromSpec(entry.material, path, `${field}.material`, options), thicknessNm: d as number | 'film' };
  });
  if (!layers.some((layer) => layer.thicknessNm === 'film')) {
    throw new DataFileError(path, 'layers: at least one layer must have "thicknessNm": "film"');
  }
  let incoherentBack: Stack['incoherentBack'];
  if (record.backSide !== undefined) {
    const back = record.backSide;
    if (!isObject(back) || back.exitMedium === undefined) throw new DataFileError(path, 'backSide must be an object with exitMedium (and optional thicknessMm)');
    const t = back.thicknessMm;
    if (t !== undefined && (typeof t !== 'number' || !Number.isFinite(t) || t < 0)) {
      throw new DataFileError(path, `backSide.thicknessMm must be a finite number >= 0, received ${JSON.stringify(t)}`);
    }
    incoherentBack = { exitMedium: materialFromSpec(back.exitMedium, path, 'backSide.exitMedium', options), ...(t === undefined ? {} : { thicknessMm: t }) };
  }
  return {
    name: typeof record.name === 'string' ? record.name : path,
    ambient: materialFromSpec(record.ambient, path, 'ambient', options),
    layers,
    substrate: materialFromSpec(record.substrate, path, 'substrate', options),
    ...(incoherentBack ? { incoherentBack } : {}),
  };
}
