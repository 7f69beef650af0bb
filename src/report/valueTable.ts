/**
 * Tables of settings, fitted parameters and calibration records (`Record<string, unknown>`):
 * each key shown as a label with the value's unit beside the value (./fieldLabels.ts), the raw key
 * in the row's tooltip; numbers with a sensible number of digits, arrays inline, nested records as
 * nested tables, everything escaped.
 */
import { escapeHtml } from './escapeHtml.js';
import { fieldLabel } from './fieldLabels.js';
import { formatSignificant, noValue } from './formatNumber.js';

const maxDepth = 4;

/** One value as HTML text (escaped). */
export function formatUnknown(value: unknown, depth = 0): string {
  if (value === null || value === undefined) return noValue;
  if (typeof value === 'number') return escapeHtml(formatSignificant(value, 6));
  if (typeof value === 'string') return escapeHtml(value);
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (typeof value === 'bigint') return escapeHtml(value.toString());
  if (ArrayBuffer.isView(value)) return `${escapeHtml(value.constructor.name)} (${(value as unknown as ArrayLike<unknown>).length ?? value.byteLength} values)`;
  if (Array.isArray(value)) {
    if (value.length === 0) return 'none';
    if (value.every((v) => v === null || typeof v !== 'object')) {
      return `[${value.map((v) => formatUnknown(v, depth + 1)).join(', ')}]`;
    }
    if (depth >= maxDepth) return escapeHtml(safeJson(value));
    return `<ol class="nested">${value.map((v) => `<li>${formatUnknown(v, depth + 1)}</li>`).join('')}</ol>`;
  }
  if (typeof value === 'object') {
    if (depth >= maxDepth) return escapeHtml(safeJson(value));
    return renderValueTable(value as Record<string, unknown>, depth + 1, 'nested');
  }
  return escapeHtml(String(value));
}

/** A two-column table (name, value) of a record; `—` for an empty record. */
export function renderValueTable(record: Record<string, unknown> | null | undefined, depth = 0, className = 'values'): string {
  if (record === null || record === undefined) return `<p class="muted">${noValue}</p>`;
  const entries = Object.entries(record);
  if (entries.length === 0) return '<p class="muted">(none)</p>';
  const rows = entries
    .map(([key, value]) => {
      const { label, unit, help } = fieldLabel(key);
      const shown = formatUnknown(value, depth);
      // The unit goes with a value that is a number or a list of numbers, not with "—" or text.
      const numeric = typeof value === 'number' || (typeof value === 'string' && /^-?\d+(\.\d+)?$/.test(value)) || (Array.isArray(value) && value.length > 0 && value.every((v) => typeof v === 'number'));
      const withUnit = numeric && unit ? `${shown}${unit === '°' ? '' : ' '}${escapeHtml(unit)}` : shown;
      const title = escapeHtml(help ? `${key}: ${help}` : key);
      return `<tr><th scope="row" title="${title}">${escapeHtml(label)}</th><td>${withUnit}</td></tr>`;
    })
    .join('');
  return `<table class="${escapeHtml(className)}"><tbody>${rows}</tbody></table>`;
}

function safeJson(value: unknown): string {
  try {
    return JSON.stringify(value) ?? String(value);
  } catch {
    return String(value);
  }
}
