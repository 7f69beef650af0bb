/**
 * The frame slider of a series report: one thumbnail (or a placeholder) per frame, a range input
 * and a play button, and the selected frame's figures; the page script switches between them.
 * Where the series has a flow (`lamella flow`), a frame's picture is its flow overlay: arrows of
 * the motion to the next frame over its thickness map.
 */
import { escapeHtml } from './escapeHtml.js';
import { imageDataUri } from './imageDataUri.js';
import type { SeriesFrameRow } from './types.js';

export function renderFrameViewer(frames: SeriesFrameRow[]): string {
  if (frames.length === 0) return '<section class="card" id="frames"><h2>Frames</h2><p class="muted">No frames.</p></section>';
  const last = frames.length - 1;
  const thumbs = frames.map((f, i) => {
    const hidden = i === last ? '' : ' hidden';
    if (f.flowPng !== undefined) {
      return `<img data-frame-index="${i}"${hidden} src="${imageDataUri(f.flowPng, `frames[${i}].flowPng`)}" alt="Flow from ${escapeHtml(f.frame)} to the next frame, arrows over its thickness map"/>`;
    }
    if (f.mapPng === undefined) {
      return `<div class="empty" data-frame-index="${i}"${hidden}>No thumbnail for ${escapeHtml(f.frame)}</div>`;
    }
    return `<img data-frame-index="${i}"${hidden} src="${imageDataUri(f.mapPng, `frames[${i}].mapPng`)}" alt="Thickness map of ${escapeHtml(f.frame)}"/>`;
  });
  const row = (label: string, id: string) => `<tr><th scope="row">${label}</th><td class="num" id="${id}">—</td></tr>`;
  return `<section class="card" id="frames"><h2>Frames <span class="sub">${frames.length} frames; drag the slider or press Play</span></h2>
<div class="frame-viewer">
<div><div class="thumb-stage">${thumbs.join('')}</div>
<div class="controls"><button type="button" id="frame-play">Play</button>`
    + `<input type="range" id="frame-slider" min="0" max="${last}" step="1" value="${last}" aria-label="Frame"/>`
    + `<span id="frame-position" class="muted">${frames.length} / ${frames.length}</span></div></div>
<div><p class="frame-name" id="frame-name">${escapeHtml(frames[last].frame)}</p>
<table class="values"><tbody>${row('Time', 'frame-time')}${row('Mean', 'frame-mean')}${row('Median', 'frame-median')}`
    + `${row('Minimum', 'frame-min')}${row('Thin fraction', 'frame-thin')}${row('Thin regions', 'frame-regions')}${row('Coverage', 'frame-coverage')}${row('Film area', 'frame-film')}</tbody></table></div>
</div></section>`;
}
