/**
 * The report's stylesheet (inline; system fonts only, no external resources). Our own look:
 * a dark header with a thin-film colour strip, light cards on a pale sage page, compact tables.
 */

export const pageStyle = String.raw`
:root { --ink: #17262b; --text: #1d2528; --muted: #5b6a70; --page: #eceeea; --card: #fbfcfa;
  --line: #d3dad5; --accent: #0e6b70; --warn-bg: #fdeeee; --warn: #9d2a2a; --care-bg: #fff5e6; --care: #a85400; }
* { box-sizing: border-box; }
[hidden] { display: none !important; }
html { -webkit-text-size-adjust: 100%; }
body { margin: 0; background: var(--page); color: var(--text);
  font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", "Liberation Sans", sans-serif; }
header.top { background: var(--ink); color: #f3f6f4; padding: 22px 28px 18px; position: relative; }
header.top::after { content: ""; position: absolute; left: 0; right: 0; bottom: 0; height: 5px;
  background: linear-gradient(90deg, #1b1b1b 0%, #6c6f78 6%, #e9e7dc 12%, #e7c36a 20%, #a8552c 27%, #5b2b7a 33%,
    #2b4fb8 38%, #3fa7c9 45%, #9fd25e 52%, #f1dd63 58%, #e58a8e 64%, #8a4fa6 70%, #4f86c9 76%, #6cc6a4 84%, #e7dfa0 92%, #e2a0b9 100%); }
header.top h1 { margin: 0 0 4px; font-size: 24px; font-weight: 650; letter-spacing: 0.01em; word-break: break-word; }
header.top .kind { text-transform: uppercase; letter-spacing: 0.14em; font-size: 11px; color: #9fc7c4; margin: 0 0 6px; }
header.top .meta { margin: 0; color: #b9c6c3; font-size: 13px; }
header.top .meta a { color: #d9ecea; }
nav.sections { position: sticky; top: 0; z-index: 5; background: rgba(236, 238, 234, 0.94); border-bottom: 1px solid var(--line);
  padding: 6px 28px; font-size: 13px; display: flex; flex-wrap: wrap; gap: 4px 18px; }
nav.sections a { color: var(--accent); text-decoration: none; }
nav.sections a:hover { text-decoration: underline; }
main { max-width: 1280px; margin: 0 auto; padding: 18px 20px 40px; display: grid; gap: 18px; }
section.card { background: var(--card); border: 1px solid var(--line); border-radius: 10px; padding: 16px 20px 18px; min-width: 0; }
section.card > h2 { margin: 0 0 12px; font-size: 17px; font-weight: 650; color: var(--ink); display: flex; flex-wrap: wrap; align-items: baseline; gap: 2px 10px; }
section.card > h2 .sub { font-size: 13px; font-weight: 400; color: var(--muted); }
.two-col { display: grid; grid-template-columns: repeat(auto-fit, minmax(min(100%, 480px), 1fr)); gap: 18px; }
.tiles { display: grid; grid-template-columns: repeat(auto-fit, minmax(150px, 1fr)); gap: 10px; }
.tile { background: var(--card); border: 1px solid var(--line); border-left: 4px solid var(--accent); border-radius: 8px; padding: 10px 14px; }
.tile .label { font-size: 12px; color: var(--muted); text-transform: uppercase; letter-spacing: 0.06em; }
.tile .value { font-size: 22px; font-weight: 650; color: var(--ink); font-variant-numeric: tabular-nums; }
.tile .tile-note { font-size: 12.5px; color: var(--muted); }
.tile.alert { border-left-color: var(--care); }
.pair { display: grid; grid-template-columns: repeat(auto-fit, minmax(min(100%, 360px), 1fr)); gap: 14px; }
figure { margin: 0; }
.pair figure { width: 100%; margin: 0 auto; }
figcaption { font-size: 13px; color: var(--muted); margin-top: 6px; }
.stage { position: relative; line-height: 0; cursor: crosshair; background: #222; box-shadow: 0 1px 3px rgba(0, 0, 0, 0.25); }
.stage img { display: block; width: 100%; height: auto; }
.stage.map img { image-rendering: pixelated; }
.stage svg.marks { position: absolute; inset: 0; width: 100%; height: 100%; pointer-events: none; overflow: visible; }
.marks line, .marks rect { vector-effect: non-scaling-stroke; fill: none; }
.marks .cross-h, .marks .cross-v { stroke: #ffffff; stroke-width: 1; filter: drop-shadow(0 0 1px #000); }
.marks .profile-line { stroke: #ffffff; stroke-width: 1.5; stroke-dasharray: 6 5; opacity: 0.85; }
.marks .region-shadow { stroke: rgba(0, 0, 0, 0.75); stroke-width: 3.5; }
.marks .region { stroke: #fff14a; stroke-width: 1.6; }
.marks .region.highlight { stroke: #ff3d8b; stroke-width: 3; }
.readout { margin: 12px 0 4px; padding: 8px 12px; border-radius: 8px; background: #e5ebe7; font-size: 14px;
  display: flex; flex-wrap: wrap; gap: 4px 18px; align-items: baseline; min-height: 40px; }
.readout.active { background: #dcefed; }
.readout .hint { color: var(--muted); }
.readout b { font-variant-numeric: tabular-nums; font-family: ui-monospace, "SFMono-Regular", Menlo, Consolas, "Liberation Mono", monospace; font-weight: 600; }
.readout .flag { color: var(--care); font-weight: 600; }
h2.part { margin: 10px 0 -4px; font-size: 19px; color: var(--ink); border-bottom: 2px solid var(--line); padding-bottom: 6px; }
.note { font-size: 13px; color: var(--muted); margin: 8px 0 0; }
svg.chart, svg.colour-bar { display: block; width: 100%; height: auto; font-size: 12px; }
svg.colour-bar { max-width: 1000px; margin: 8px auto 0; }
svg text { fill: #44535a; }
svg .axis-label { font-size: 12.5px; fill: #26343a; font-weight: 600; }
svg .grid { stroke: #e4e9e5; stroke-width: 1; }
svg .axis, svg .tick { stroke: #56656b; stroke-width: 1; }
svg .series-line { fill: none; stroke-width: 2; stroke-linejoin: round; }
svg .ref-line { stroke-width: 1.5; }
svg .ref-label { font-size: 11.5px; paint-order: stroke; stroke: #fbfcfa; stroke-width: 3px; stroke-linejoin: round; }
svg .band { opacity: 0.16; }
svg .legend line { stroke-width: 2.5; }
svg .legend text { font-size: 12px; fill: #26343a; }
svg .frame-marker { stroke: var(--ink); stroke-width: 1.5; stroke-dasharray: 2 3; }
svg .bar-fill { stroke: #56656b; stroke-width: 0.5; }
svg .thin-mark { stroke: #c0392b; stroke-width: 2; }
svg .thin-mark-label { fill: #c0392b; font-size: 11px; font-weight: 600; }
table { border-collapse: collapse; width: 100%; font-size: 13.5px; }
th, td { text-align: left; padding: 5px 8px; border-bottom: 1px solid #e3e8e4; vertical-align: top; }
thead th { font-size: 12.5px; color: var(--muted); font-weight: 600; border-bottom: 1.5px solid var(--line); }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
table.values th { width: 38%; font-weight: 600; color: #33444a; word-break: break-word; }
table.values td { word-break: break-word; }
table.nested { font-size: 12.5px; margin: 0; }
table.nested th, table.nested td { padding: 2px 6px; }
ol.nested { margin: 0; padding-left: 18px; }
tr[data-region]:hover { background: #fff9d6; }
.scroll { max-height: 420px; overflow: auto; }
.muted { color: var(--muted); }
.no-film { font-size: 17px; font-weight: 650; color: var(--warn); margin: 0 0 10px; }
section.card h3 { font-size: 14px; margin: 14px 0 6px; color: var(--ink); }
table.fit-quality.verdict-poor tr:first-child td { color: var(--warn); font-weight: 600; }
.warnings { background: var(--warn-bg); border-color: #e8b9b9; }
.warnings ul { margin: 0; padding-left: 20px; color: var(--warn); }
.cautions { background: var(--care-bg); border-color: #f0cf9f; border-left: 5px solid var(--care); }
.cautions p { margin: 0 0 8px; }
.frame-viewer { display: grid; grid-template-columns: minmax(0, 3fr) minmax(220px, 2fr); gap: 16px; align-items: start; }
@media (max-width: 760px) { .frame-viewer { grid-template-columns: 1fr; } }
.thumb-stage { background: #222; border-radius: 6px; overflow: hidden; line-height: 0; min-height: 80px; display: grid; place-items: center; }
.thumb-stage img { width: 100%; height: auto; max-height: 460px; object-fit: contain; image-rendering: pixelated; }
.thumb-stage .empty { color: #c9d2cf; line-height: 1.5; padding: 30px; font-size: 13px; }
.controls { display: flex; align-items: center; gap: 12px; margin-top: 10px; }
.controls input[type=range] { flex: 1; accent-color: var(--accent); }
.controls button { font: inherit; font-size: 13px; padding: 4px 14px; border-radius: 6px; border: 1px solid var(--accent); background: var(--card); color: var(--accent); cursor: pointer; }
.frame-name { font-weight: 650; word-break: break-all; }
details > summary { cursor: pointer; color: var(--accent); margin: 6px 0; }
footer { max-width: 1280px; margin: 0 auto; padding: 0 20px 30px; color: var(--muted); font-size: 12.5px; }
@media print { nav.sections, .controls { display: none; } body { background: #fff; } section.card { break-inside: avoid; } }
`;
