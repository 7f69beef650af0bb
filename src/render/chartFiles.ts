/**
 * A colour chart as the files `lamella chart` writes: a CSV table, a JSON record
 * (schemas/chart.schema.json) or a PNG picture to hold next to a sample.
 */
import type { Light } from '../colour/light.js';
import type { ObserverName } from '../colour/observers.js';
import { rasteriseSvg } from '../io/rasteriseSvg.js';
import type { Polarisation, Stack } from '../optics/types.js';
import { LAMELLA_VERSION } from '../version.js';
import { chartSvg } from './chartSvg.js';
import type { ChartTable } from './chartTable.js';

/** Version of the `chart --format json` record (schemas/chart.schema.json). */
export const CHART_SCHEMA_VERSION = 1;

/** What a chart was computed for, as its JSON record and picture state it. */
export interface ChartSettings {
  readonly stack: string;
  readonly film: string | null;
  readonly ambient: string;
  readonly substrate: string;
  readonly light: string;
  readonly light_description: string;
  readonly white_balance: string;
  readonly angle_deg: number;
  readonly polarisation: Polarisation;
  readonly observer: ObserverName;
  readonly exposure: number;
  readonly lab_white: string;
  readonly order_rule: string;
}

export function chartSettings(
  table: ChartTable,
  setting: { stack: Stack; light: Light; whiteBalance?: Light; angleRad: number; polarisation: Polarisation; observer: ObserverName },
): ChartSettings {
  const { stack, light } = setting;
  const film = stack.layers.find((layer) => layer.thicknessNm === 'film');
  return {
    stack: stack.name,
    film: film?.material.name ?? null,
    ambient: stack.ambient.name,
    substrate: stack.substrate.name,
    light: light.name,
    light_description: light.description,
    white_balance: setting.whiteBalance?.name ?? light.name,
    angle_deg: (setting.angleRad * 180) / Math.PI,
    polarisation: setting.polarisation,
    observer: setting.observer,
    exposure: table.exposure,
    lab_white: 'D65 (sRGB white, Y = 100), after Bradford adaptation from the white-balance light',
    order_rule: 'an order begins at each local minimum of the luminance Y',
  };
}

function fixed(value: number, digits: number): string {
  const text = value.toFixed(digits);
  return /^-0\.?0*$/.test(text) ? text.slice(1) : text;
}

function hex(r8: number, g8: number, b8: number): string {
  return `#${[r8, g8, b8].map((v) => v.toString(16).padStart(2, '0')).join('')}`;
}

/** The CSV table: thickness_nm, X, Y, Z, L, a, b, r8, g8, b8, hex, order (one row per thickness). */
export function chartCsv(table: ChartTable): string {
  const lines = ['thickness_nm,X,Y,Z,L,a,b,r8,g8,b8,hex,order'];
  const { xyz, lab, srgb8 } = table;
  for (let i = 0; i < table.thicknessesNm.length; i++) {
    const k = i * 3;
    lines.push(
      [
        String(Number(table.thicknessesNm[i].toFixed(6))),
        fixed(xyz[k], 4), fixed(xyz[k + 1], 4), fixed(xyz[k + 2], 4),
        fixed(lab[k], 3), fixed(lab[k + 1], 3), fixed(lab[k + 2], 3),
        srgb8[k], srgb8[k + 1], srgb8[k + 2], hex(srgb8[k], srgb8[k + 1], srgb8[k + 2]), table.order[i],
      ].join(','),
    );
  }
  return `${lines.join('\n')}\n`;
}

/** The JSON record: settings, order boundaries and one row per thickness. */
export function chartRecord(table: ChartTable, settings: ChartSettings): Record<string, unknown> {
  const rows = Array.from(table.thicknessesNm, (thicknessNm, i) => {
    const k = i * 3;
    const [r8, g8, b8] = [table.srgb8[k], table.srgb8[k + 1], table.srgb8[k + 2]];
    return {
      thickness_nm: thicknessNm,
      // CIE XYZ (Y = 100 for the white), CIELAB L*, a*, b*, and the 8-bit sRGB code values.
      xyz: [table.xyz[k], table.xyz[k + 1], table.xyz[k + 2]],
      lab: [table.lab[k], table.lab[k + 1], table.lab[k + 2]],
      srgb_8bit: [r8, g8, b8],
      hex: hex(r8, g8, b8),
      order: table.order[i],
    };
  });
  return { schema_version: CHART_SCHEMA_VERSION, lamella_version: LAMELLA_VERSION, ...settings, order_boundaries_nm: table.boundariesNm, rows };
}

function formatNumber(value: number): string {
  return String(Number(value.toFixed(3)));
}

/** The chart as a PNG picture; `resolution` is the pixel-density factor (1: 1240 px wide). */
export async function chartPng(table: ChartTable, settings: ChartSettings, resolution = 1): Promise<Uint8Array> {
  const first = table.thicknessesNm[0];
  const last = table.thicknessesNm[table.thicknessesNm.length - 1];
  const svg = chartSvg(table, {
    title: `Interference colours: ${settings.stack}`,
    details: [
      `film ${settings.film ?? '?'} between ${settings.ambient} and ${settings.substrate} · ${formatNumber(first)}–${formatNumber(last)} nm`,
      `light ${settings.light} (${settings.light_description}) · angle of incidence ${formatNumber(settings.angle_deg)}° · ${settings.polarisation} polarisation`,
      `CIE ${settings.observer} observer · camera white-balanced to ${settings.white_balance} · exposure ×${formatNumber(settings.exposure)} · sRGB display`,
    ],
  });
  return rasteriseSvg(svg, { density: 72 * resolution });
}
