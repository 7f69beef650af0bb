/**
 * The HTML document around a report's sections: a Content-Security-Policy that forbids every
 * request (images only from data: URIs, inline style and script only), header, section links,
 * warnings, cautions, footer, embedded data and the page script. One file, opens offline.
 */
import { renderCautions } from './cautions.js';
import { pageScript } from './clientScript.js';
import { escapeHtml, jsonForScript } from './escapeHtml.js';
import { pageStyle } from './pageStyle.js';
import { LAMELLA_VERSION } from '../version.js';

export interface PageParts {
  kind: string;
  title: string;
  generatedAt: string;
  /** Section links: [anchor id, label]. */
  nav: Array<[string, string]>;
  /** Already-rendered HTML of the sections, in order. */
  sections: string[];
  warnings: string[];
  /** Embedded JSON data blocks: element id → value. */
  data: Record<string, unknown>;
}

const contentPolicy = "default-src 'none'; img-src data:; style-src 'unsafe-inline'; script-src 'unsafe-inline'; base-uri 'none'; form-action 'none'";

export function renderWarnings(warnings: string[]): string {
  if (warnings.length === 0) return '';
  return `<section class="card warnings" id="warnings"><h2>Warnings <span class="sub">${warnings.length}</span></h2><ul>`
    + `${warnings.map((w) => `<li>${escapeHtml(String(w))}</li>`).join('')}</ul></section>`;
}

export function renderPage(parts: PageParts): string {
  const nav = [...parts.nav, ...(parts.warnings.length > 0 ? [['warnings', 'Warnings'] as [string, string]] : []), ['cautions', 'Cautions'] as [string, string]];
  const dataBlocks = Object.entries(parts.data)
    .map(([id, value]) => `<script type="application/json" id="${escapeHtml(id)}">${jsonForScript(value)}</script>`)
    .join('\n');
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${contentPolicy}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="Lamella">
<title>${escapeHtml(parts.title)} · Lamella ${escapeHtml(parts.kind.toLowerCase())}</title>
<link rel="icon" href="data:,">
<style>${pageStyle}</style>
</head>
<body>
<header class="top">
<p class="kind">Lamella · ${escapeHtml(parts.kind)}</p>
<h1>${escapeHtml(parts.title)}</h1>
<p class="meta">Generated ${escapeHtml(parts.generatedAt)} by Lamella ${escapeHtml(LAMELLA_VERSION)} · thickness values are estimates, see <a href="#cautions">cautions</a></p>
</header>
<nav class="sections" aria-label="Sections">${nav.map(([id, label]) => `<a href="#${escapeHtml(id)}">${escapeHtml(label)}</a>`).join('')}</nav>
<main>
${renderWarnings(parts.warnings)}
${parts.sections.join('\n')}
${renderCautions()}
</main>
<footer>Self-contained report written by Lamella: all images and data are inside this file; it makes no network requests.</footer>
${dataBlocks}
<script>${pageScript()}</script>
</body>
</html>
`;
}
