/**
 * From what a user types to a Stack: a preset name or a stack-file path, then optional overrides
 * of the film layer (material and index scale).
 */
import { existsSync } from 'node:fs';
import { constantMaterial, scaleMaterialIndex, type MaterialOptions } from './material.js';
import { loadMaterialFile } from './materialFile.js';
import { getMaterial, isMaterialName, listMaterialNames } from './materialLibrary.js';
import { isStackPresetName, listStackPresetNames, presetStack } from './presets.js';
import { loadStackFile } from './stackFile.js';
import type { Material, Stack } from './types.js';

export interface StackOverrides extends MaterialOptions {
  /** Replaces the material of every 'film' layer: library name, material file, number or numeric string. */
  readonly filmMaterial?: string | number;
  /** Multiplies n(λ) of the film material (k unchanged). */
  readonly filmIndexScale?: number;
}

/** A film material from a library name, a material file path, or a number such as `1.40`. */
export function resolveFilmMaterial(spec: string | number, options: MaterialOptions = {}): Material {
  if (typeof spec === 'number') return constantMaterial(spec);
  const text = spec.trim();
  if (text !== '' && Number.isFinite(Number(text))) return constantMaterial(Number(text));
  if (isMaterialName(text)) return getMaterial(text, options);
  if (/\.(json|csv)$/i.test(text) || existsSync(text)) return loadMaterialFile(text, options);
  throw new RangeError(`unknown film material '${spec}': expected a number, a material file (.json/.csv) or one of ${listMaterialNames().join(', ')}`);
}

/** Resolves `spec` (preset name or stack-file path) and applies `overrides` to the film layer(s). */
export function resolveStack(spec: string, overrides: StackOverrides = {}): Stack {
  if (typeof spec !== 'string' || spec.trim() === '') {
    throw new TypeError(`stack must be a preset name or a stack file path, received ${JSON.stringify(spec)}`);
  }
  const options: MaterialOptions = { extrapolate: overrides.extrapolate, onWarning: overrides.onWarning };
  let stack: Stack;
  if (isStackPresetName(spec)) stack = presetStack(spec, options);
  else if (/\.json$/i.test(spec) || existsSync(spec)) stack = loadStackFile(spec, options);
  else {
    throw new RangeError(`unknown stack '${spec}': expected a preset (${listStackPresetNames().join(', ')}) or a path to a stack JSON file`);
  }
  const replacement = overrides.filmMaterial === undefined ? undefined : resolveFilmMaterial(overrides.filmMaterial, options);
  const scale = overrides.filmIndexScale ?? 1;
  if (replacement === undefined && scale === 1) return stack;
  return {
    ...stack,
    layers: stack.layers.map((layer) => {
      if (layer.thicknessNm !== 'film') return layer;
      return { ...layer, material: scaleMaterialIndex(replacement ?? layer.material, scale) };
    }),
  };
}
