import { escapeHtml } from '../report/escapeHtml.js';

/** A small self-contained index page linking the per-photo reports of a multi-photo map run. */
export function mapIndexPage(reports: ReadonlyArray<{ stem: string; file: string }>): string {
  // A relative link to a file in the same folder: every character but the unreserved ones
  // percent-encoded (RFC 3986), and `./` first, so no name can become a scheme
  // (`javascript:…`), a fragment (`run#3`) or a query.
  const items = reports.map((r) => `<li><a href="./${escapeHtml(encodeURIComponent(r.file))}">${escapeHtml(r.stem)}</a></li>`).join('\n');
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>Lamella thickness maps</title>
<style>body{font:16px/1.5 system-ui,sans-serif;margin:2rem auto;max-width:40rem;color:#1d2530}a{color:#0b5e6b}</style></head>
<body><h1>Thickness maps</h1><p>One report per photo:</p><ul>
${items}
</ul><p><small>Thickness maps from photographs are estimates: not a substitute for qualified metrology (ellipsometry, reflectometry, profilometry) for release or safety decisions.</small></p></body></html>
`;
}
