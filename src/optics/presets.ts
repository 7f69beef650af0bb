/**
 * Named stacks (the names are a contract shared by every command):
 *  - `soap-film`:          air | water film (Daimon & Masumura 2007, 20 °C) | air
 *  - `oxide-on-silicon`:   air | fused silica (Malitson 1965) film | Si (Green 2008)
 *  - `nitride-on-silicon`: air | Si3N4 (Luke 2015) film | Si (Green 2008)
 * Air is Ciddor 1996 standard air. Sources of all data: `shared/materials/SOURCES.md`.
 */
import type { MaterialOptions } from './material.js';
import { getMaterial } from './materialLibrary.js';
import type { Stack } from './types.js';

interface PresetInfo {
  readonly description: string;
  readonly ambient: string;
  readonly film: string;
  readonly substrate: string;
}

export const stackPresets = {
  'soap-film': { description: 'free-standing water film in air', ambient: 'air', film: 'water', substrate: 'air' },
  'oxide-on-silicon': { description: 'thermal SiO2 (fused-silica index) on crystalline silicon', ambient: 'air', film: 'fused-silica', substrate: 'si' },
  'nitride-on-silicon': { description: 'LPCVD Si3N4 on crystalline silicon', ambient: 'air', film: 'si3n4', substrate: 'si' },
} satisfies Record<string, PresetInfo>;

export type StackPresetName = keyof typeof stackPresets;

export function listStackPresetNames(): StackPresetName[] {
  return Object.keys(stackPresets) as StackPresetName[];
}

export function isStackPresetName(name: string): name is StackPresetName {
  return Object.prototype.hasOwnProperty.call(stackPresets, name);
}

/** The preset as a Stack (one 'film' layer). */
export function presetStack(name: StackPresetName, options: MaterialOptions = {}): Stack {
  const info: PresetInfo = stackPresets[name];
  return {
    name,
    ambient: getMaterial(info.ambient, options),
    layers: [{ material: getMaterial(info.film, options), thicknessNm: 'film' }],
    substrate: getMaterial(info.substrate, options),
  };
}
