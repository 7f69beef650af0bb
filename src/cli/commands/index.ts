/**
 * Every CLI command registers itself here: one module per command, each exporting
 * `register(program)`. Keep this list in the order commands appear in `lamella --help`; each
 * entry's name must be the one its module registers (a test checks).
 */
import type { Command } from 'commander';

export type Register = (program: Command) => void;

export interface CommandModule {
  /** The command's name, as typed after `lamella`. */
  readonly name: string;
  readonly load: () => Promise<{ register: Register }>;
}

export const commandModules: ReadonlyArray<CommandModule> = [
  { name: 'spectrum', load: () => import('./spectrum.js') },
  { name: 'map', load: () => import('./map.js') },
  { name: 'calibrate', load: () => import('./calibrate.js') },
  { name: 'series', load: () => import('./series.js') },
  { name: 'compare', load: () => import('./compare.js') },
  { name: 'flow', load: () => import('./flow.js') },
  { name: 'chart', load: () => import('./chart.js') },
  { name: 'render', load: () => import('./render.js') },
];
