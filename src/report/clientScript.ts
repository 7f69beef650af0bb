/**
 * The page's own script (inline, no library): decodes the embedded grid, shows thickness and
 * confidence under the pointer with ORIGINAL-image pixel coordinates, moves the crosshairs,
 * redraws the column profile on click, highlights thin regions from the table, and steps a
 * series through its frames. Plain ES2017 that every current browser runs; it reads its data
 * from `<script type="application/json">` blocks and never makes a request.
 */
import { shortestFloat32Text } from './formatNumber.js';

const pageMain = String.raw`
function readJson(id) {
  var el = document.getElementById(id);
  return el ? JSON.parse(el.textContent) : null;
}
function decodeBytes(base64) {
  var text = atob(base64);
  var bytes = new Uint8Array(text.length);
  for (var i = 0; i < text.length; i++) bytes[i] = text.charCodeAt(i);
  return bytes;
}
function decodeFloat32(base64) {
  return new Float32Array(decodeBytes(base64).buffer);
}
function setText(id, text) {
  var el = document.getElementById(id);
  if (el) el.textContent = text;
}
function plotMapping(svg) {
  var g = svg && svg.querySelector('g.plot');
  if (!g) return null;
  var d = function (k) { return Number(g.getAttribute('data-' + k)); };
  var m = { x0: d('x0'), x1: d('x1'), y0: d('y0'), y1: d('y1'), left: d('left'), top: d('top'), width: d('width'), height: d('height'), group: g };
  m.x = function (v) { return m.left + (v - m.x0) / (m.x1 - m.x0) * m.width; };
  m.y = function (v) { return m.top + (1 - (v - m.y0) / (m.y1 - m.y0)) * m.height; };
  return m;
}
var svgNs = 'http://www.w3.org/2000/svg';
function svgEl(name, attrs) {
  var el = document.createElementNS(svgNs, name);
  for (var k in attrs) el.setAttribute(k, attrs[k]);
  return el;
}

function initMap(data) {
  var g = data.grid;
  var thickness = decodeFloat32(g.thicknessB64);
  var confidence = decodeFloat32(g.confidenceB64);
  var status = g.statusB64 ? decodeBytes(g.statusB64) : null;
  var stages = Array.prototype.slice.call(document.querySelectorAll('.stage'));
  function pixelFromEvent(ev, stage) {
    var r = stage.querySelector('img').getBoundingClientRect();
    if (r.width <= 0 || r.height <= 0) return null;
    var x = Math.floor((ev.clientX - r.left) / r.width * g.originalWidth);
    var y = Math.floor((ev.clientY - r.top) / r.height * g.originalHeight);
    if (x < 0 || y < 0 || x >= g.originalWidth || y >= g.originalHeight) return null;
    return { x: x, y: y };
  }
  function cellOf(p) {
    var cx = Math.min(g.width - 1, Math.floor(p.x / g.step));
    var cy = Math.min(g.height - 1, Math.floor(p.y / g.step));
    return { cx: cx, cy: cy, index: cy * g.width + cx };
  }
  function moveCrosshairs(p) {
    stages.forEach(function (stage) {
      var h = stage.querySelector('.cross-h'), v = stage.querySelector('.cross-v');
      if (!h || !v) return;
      if (!p) { h.setAttribute('visibility', 'hidden'); v.setAttribute('visibility', 'hidden'); return; }
      h.setAttribute('y1', p.y + 0.5); h.setAttribute('y2', p.y + 0.5);
      v.setAttribute('x1', p.x + 0.5); v.setAttribute('x2', p.x + 0.5);
      h.setAttribute('visibility', 'visible'); v.setAttribute('visibility', 'visible');
    });
  }
  var profileChart = document.getElementById('profile-chart');
  var profileMap = plotMapping(profileChart);
  // The profile line in original pixel indices (default: the column, top to bottom).
  var line = { x0: Number(data.profileColumn), y0: 0, x1: Number(data.profileColumn), y1: g.originalHeight - 1 };
  function lineLength() { return Math.hypot(line.x1 - line.x0, line.y1 - line.y0); }
  function pointAtDistance(d) {
    var L = lineLength();
    var t = L > 0 ? d / L : 0;
    return { x: Math.round(line.x0 + t * (line.x1 - line.x0)), y: Math.round(line.y0 + t * (line.y1 - line.y0)) };
  }
  function distanceOf(p) {
    var L = lineLength();
    if (L <= 0) return 0;
    var d = ((p.x - line.x0) * (line.x1 - line.x0) + (p.y - line.y0) * (line.y1 - line.y0)) / L;
    return Math.max(0, Math.min(L, d));
  }
  function profileSamples() {
    var L = lineLength();
    var n = Math.max(1, Math.ceil(L / g.step));
    var out = [];
    for (var k = 0; k <= n; k++) {
      var d = k / n * L;
      var p = pointAtDistance(d);
      var c = cellOf(p);
      out.push({ d: d, x: p.x, y: p.y, t: thickness[c.index], q: confidence[c.index] });
    }
    return out;
  }
  var rowMarker = null;
  if (profileMap) {
    rowMarker = svgEl('line', { 'class': 'frame-marker', y1: profileMap.top, y2: profileMap.top + profileMap.height, visibility: 'hidden' });
    profileMap.group.querySelector('.overlay').appendChild(rowMarker);
  }
  function show(p) {
    var box = document.getElementById('readout');
    moveCrosshairs(p);
    if (rowMarker) {
      if (p) {
        var rx = profileMap.x(distanceOf(p)).toFixed(1);
        rowMarker.setAttribute('x1', rx); rowMarker.setAttribute('x2', rx); rowMarker.setAttribute('visibility', 'visible');
      } else rowMarker.setAttribute('visibility', 'hidden');
    }
    if (!p) { if (box) box.classList.remove('active'); return; }
    var c = cellOf(p);
    var t = thickness[c.index], q = confidence[c.index];
    if (box) box.classList.add('active');
    setText('readout-x', String(p.x));
    setText('readout-y', String(p.y));
    setText('readout-thickness', isFinite(t) ? t.toFixed(1) + ' nm' : 'no estimate');
    setText('readout-confidence', isFinite(q) ? q.toFixed(2) : '—');
    var code = status ? status[c.index] : 0;
    setText('readout-status', code && data.statusLabels[code] !== undefined ? data.statusLabels[code] : (code ? 'status ' + code : ''));
    setText('readout-cell', g.step > 1 ? 'grid cell ' + c.cx + ', ' + c.cy + ' (block of ' + g.step + ' × ' + g.step + ' px)' : 'full resolution');
    var thin = data.thinBelowNm;
    var flag = document.getElementById('readout-flag');
    if (flag) flag.textContent = (thin !== null && isFinite(t) && t < thin) ? 'below thin threshold' : '';
  }
  // Click: the profile along that column; drag: along the line drawn (at least 3 px long).
  var dragStart = null, dragged = false;
  stages.forEach(function (stage) {
    // The picture is not dragged away as an image: the drag draws the line.
    stage.addEventListener('dragstart', function (ev) { ev.preventDefault(); });
    stage.addEventListener('pointerdown', function (ev) { dragStart = pixelFromEvent(ev, stage); dragged = false; if (ev.button === 0) ev.preventDefault(); });
    stage.addEventListener('pointermove', function (ev) {
      var p = pixelFromEvent(ev, stage);
      show(p);
      if (dragStart && p && ev.buttons & 1 && Math.hypot(p.x - dragStart.x, p.y - dragStart.y) >= 3) {
        dragged = true;
        drawLine({ x0: dragStart.x, y0: dragStart.y, x1: p.x, y1: p.y });
      }
    });
    stage.addEventListener('pointerup', function (ev) {
      var p = pixelFromEvent(ev, stage);
      if (dragStart && dragged && p) setProfileLine({ x0: dragStart.x, y0: dragStart.y, x1: p.x, y1: p.y });
      dragStart = null;
    });
    stage.addEventListener('pointerleave', function () { show(null); });
    stage.addEventListener('click', function (ev) {
      if (dragged) { dragged = false; return; }
      var p = pixelFromEvent(ev, stage);
      if (p) setProfileColumn(p.x);
    });
  });
  var csvButton = document.getElementById('profile-csv');
  if (csvButton) csvButton.addEventListener('click', function () {
    var rows = ['distance_px,x_px,y_px,thickness_nm,confidence'];
    profileSamples().forEach(function (s) {
      rows.push([s.d.toFixed(3), s.x, s.y, isFinite(s.t) ? s.t.toFixed(2) : '', isFinite(s.q) ? s.q.toFixed(3) : ''].join(','));
    });
    var blob = new Blob([rows.join('\n') + '\n'], { type: 'text/csv' });
    var a = document.createElement('a');
    a.href = URL.createObjectURL(blob);
    a.download = 'profile-' + line.x0 + '-' + line.y0 + '-' + line.x1 + '-' + line.y1 + '.csv';
    document.body.appendChild(a);
    a.click();
    setTimeout(function () { URL.revokeObjectURL(a.href); a.remove(); }, 0);
  });
  if (profileChart && profileMap) {
    profileChart.addEventListener('pointermove', function (ev) {
      var r = profileChart.getBoundingClientRect();
      var vb = profileChart.viewBox.baseVal;
      var sx = (ev.clientX - r.left) / r.width * vb.width;
      var d = profileMap.x0 + (sx - profileMap.left) / profileMap.width * (profileMap.x1 - profileMap.x0);
      show(d >= -0.5 && d <= lineLength() + 0.5 ? pointAtDistance(Math.max(0, Math.min(lineLength(), d))) : null);
    });
    profileChart.addEventListener('pointerleave', function () { show(null); });
  }
  function drawLine(l) {
    stages.forEach(function (stage) {
      var el = stage.querySelector('.profile-line');
      if (el) { el.setAttribute('x1', l.x0 + 0.5); el.setAttribute('y1', l.y0 + 0.5); el.setAttribute('x2', l.x1 + 0.5); el.setAttribute('y2', l.y1 + 0.5); }
    });
  }
  function setProfileLine(l) {
    line = l;
    drawLine(l);
    var chart = document.getElementById('profile-chart');
    var m = plotMapping(chart);
    if (m) {
      var d = '', pen = false;
      profileSamples().forEach(function (s) {
        if (!isFinite(s.t)) { pen = false; return; }
        var yv = Math.max(m.y0, Math.min(m.y1, s.t));
        d += (pen ? 'L' : 'M') + m.x(Math.min(m.x1, s.d)).toFixed(1) + ' ' + m.y(yv).toFixed(1);
        pen = true;
      });
      var path = chart.querySelector('.series-line');
      if (path) path.setAttribute('d', d || 'M0 0');
    }
    var column = l.x0 === l.x1 && l.y0 === 0 && l.y1 === g.originalHeight - 1;
    setText('profile-kind', column ? 'column x = ' : 'line ');
    setText('profile-column', column ? String(l.x0) : '(' + l.x0 + ', ' + l.y0 + ') to (' + l.x1 + ', ' + l.y1 + ')');
  }
  function setProfileColumn(xPx) {
    setProfileLine({ x0: xPx, y0: 0, x1: xPx, y1: g.originalHeight - 1 });
  }
  Array.prototype.forEach.call(document.querySelectorAll('tr[data-region]'), function (row) {
    var id = row.getAttribute('data-region');
    function mark(on) {
      Array.prototype.forEach.call(document.querySelectorAll('.region[data-region="' + id + '"]'), function (r) {
        r.classList.toggle('highlight', on);
      });
    }
    row.addEventListener('mouseenter', function () { mark(true); });
    row.addEventListener('mouseleave', function () { mark(false); });
  });
}

function initSeries(data) {
  var slider = document.getElementById('frame-slider');
  if (!slider || data.frames.length === 0) return;
  var thumbs = Array.prototype.slice.call(document.querySelectorAll('[data-frame-index]'));
  var charts = Array.prototype.slice.call(document.querySelectorAll('svg.series-chart'));
  var markers = charts.map(function (svg) {
    var m = plotMapping(svg);
    if (!m) return null;
    var line = svgEl('line', { 'class': 'frame-marker', y1: m.top, y2: m.top + m.height });
    m.group.querySelector('.overlay').appendChild(line);
    return { m: m, line: line };
  });
  function fmt(v, digits, unit) { return v === null || !isFinite(v) ? '—' : v.toFixed(digits) + unit; }
  function show(i) {
    var f = data.frames[i];
    thumbs.forEach(function (t) { t.hidden = Number(t.getAttribute('data-frame-index')) !== i; });
    setText('frame-name', f.frame);
    setText('frame-position', (i + 1) + ' / ' + data.frames.length);
    setText('frame-time', fmt(f.timeS, 1, ' s'));
    setText('frame-mean', fmt(f.meanNm, 1, ' nm'));
    setText('frame-median', fmt(f.medianNm, 1, ' nm'));
    setText('frame-min', fmt(f.minNm, 1, ' nm'));
    setText('frame-thin', f.thinFraction === null ? '—' : (f.thinFraction * 100).toFixed(1) + ' %');
    setText('frame-regions', String(f.thinRegions));
    setText('frame-coverage', f.coverage === null ? '—' : (f.coverage * 100).toFixed(1) + ' %');
    setText('frame-film', f.filmFound === false ? 'no film' : f.filmAreaPx === null || f.filmAreaPx === undefined ? '—' : Math.round(f.filmAreaPx).toLocaleString('en-US') + ' px');
    markers.forEach(function (k) {
      if (!k) return;
      var x = k.m.x(f.timeS).toFixed(1);
      k.line.setAttribute('x1', x); k.line.setAttribute('x2', x);
    });
  }
  slider.addEventListener('input', function () { show(Number(slider.value)); });
  var play = document.getElementById('frame-play');
  var timer = null;
  if (play) play.addEventListener('click', function () {
    if (timer !== null) { clearInterval(timer); timer = null; play.textContent = 'Play'; return; }
    play.textContent = 'Pause';
    timer = setInterval(function () {
      var next = (Number(slider.value) + 1) % data.frames.length;
      slider.value = String(next);
      show(next);
    }, 450);
  });
  show(Number(slider.value));
}

var mapData = readJson('lamella-map-data');
if (mapData) initMap(mapData);
var seriesData = readJson('lamella-series-data');
if (seriesData) initSeries(seriesData);
`;

/** The complete inline script: shared pure helpers (from their TypeScript source) + page code. */
export function pageScript(): string {
  return `(function () {\n'use strict';\n${shortestFloat32Text.toString()}\n${pageMain}\n})();`;
}
