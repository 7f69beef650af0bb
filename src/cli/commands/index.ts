/**
 * Every CLI command registers itself here: one module per command, each exporting
 * `register(program)`. Keep this list in the order commands appear in `lamella --help`.
 */
import type { Command } from 'commander';

export type Register = (program: Command) => void;

export const commandModules: ReadonlyArray<() => Promise<{ register: Register }>> = [
  // e.g. () => import('./spectrum.js'),
  () => import('./spectrum.js'),
  () => import('./map.js'),
  () => import('./calibrate.js'),
  () => import('./series.js'),
  () => import('./compare.js'),
  () => import('./flow.js'),
  () => import('./chart.js'),
  () => import('./render.js'),
];
