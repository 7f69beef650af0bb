/**
 * Charts of a photo series against time: mean, median and minimum thickness with the fitted
 * drainage curves, the thin threshold and each predicted threshold crossing (with its interval,
 * and marked as extrapolation when it lies beyond the last frame); and the thin fraction.
 * Both carry the class `series-chart` so the page script can mark the frame shown in the slider.
 * When the film ruptured, both mark it: a solid vertical line at the rupture time (the midpoint
 * between the last frame with film and the first without), labelled, over a band spanning those
 * two frames.
 */
import { formatFixed } from './formatNumber.js';
import { niceDomain } from './niceTicks.js';
import { renderLineChart, type LineSeries, type ReferenceBand, type ReferenceLine } from './svgChart.js';
import { thresholdColour } from './mapSections.js';
import type { DrainageFitSummary, SeriesFrameRow, SeriesRupture } from './types.js';

export const quantityColours = { mean: '#0e6b70', median: '#2f6fb0', min: '#7a3e9d' } as const;
export const fitColours = ['#d35400', '#a8327a', '#2c7a3f', '#8a6d0b', '#4d5a9c'] as const;
export const ruptureColour = '#8e1b10';

/** Seconds with up to 3 decimals, trailing zeros dropped: `12.5`, `0.02`. */
export function formatSecondsShort(timeS: number): string {
  const text = timeS.toFixed(3).replace(/\.?0+$/, '');
  return text === '-0' ? '0' : text;
}

/** "Film ruptured between 12.5 s (frame a.jpg) and 13 s (frame b.jpg)" */
export function describeRuptureLine(rupture: SeriesRupture): string {
  return `Film ruptured between ${formatSecondsShort(rupture.lastTimeS)} s (frame ${rupture.lastFrame}) `
    + `and ${formatSecondsShort(rupture.firstTimeS)} s (frame ${rupture.firstFrame})`;
}

/** The rupture marker of a chart: the line at its time and the band between the two frames. */
function ruptureMarks(rupture: SeriesRupture | null | undefined): { lines: ReferenceLine[]; bands: ReferenceBand[] } {
  if (!rupture) return { lines: [], bands: [] };
  const between = `${formatSecondsShort(rupture.lastTimeS)}–${formatSecondsShort(rupture.firstTimeS)} s`;
  return {
    lines: [{ value: rupture.timeS, colour: ruptureColour, dashed: false, tag: `film ruptured (${between})`,
      label: `film ruptured between ${between} (last frame with film ${rupture.lastFrame}, first without ${rupture.firstFrame})` }],
    bands: [{ from: rupture.lastTimeS, to: rupture.firstTimeS, colour: ruptureColour, label: `rupture: between ${between}` }],
  };
}

/** Text of a predicted crossing: `143.2 s (extrapolated)`, or why there is none. */
export function describeCrossing(crossing: DrainageFitSummary['crossing']): string {
  if (!crossing) return 'not computed';
  if (crossing.beyondRupture) return 'the film ruptured first (none predicted past the rupture)';
  if (crossing.timeS === null) return 'no crossing predicted';
  const interval = crossing.lowS !== null && crossing.highS !== null
    ? ` (${formatFixed(crossing.lowS, 1)}–${formatFixed(crossing.highS, 1)} s)` : '';
  return `${formatFixed(crossing.timeS, 1)} s${interval}${crossing.extrapolated ? ', extrapolated' : ''}`;
}

export function renderDrainageChart(frames: SeriesFrameRow[], fits: DrainageFitSummary[], thinBelowNm: number | null, rupture?: SeriesRupture | null): string {
  const series: LineSeries[] = [
    { label: 'mean', points: frames.map((f) => [f.timeS, f.meanNm]), colour: quantityColours.mean, style: 'both' },
    { label: 'median', points: frames.map((f) => [f.timeS, f.medianNm]), colour: quantityColours.median, style: 'line' },
    { label: 'minimum', points: frames.map((f) => [f.timeS, f.minNm]), colour: quantityColours.min, style: 'both' },
  ];
  const marks = ruptureMarks(rupture);
  const verticalLines: ReferenceLine[] = [...marks.lines];
  const bands: ReferenceBand[] = [...marks.bands];
  // Time axis: the observations and crossings up to five times the observed span; crossings
  // further out are named in the legend and the fits table but not drawn (they would squash the data).
  const lastTimeS = frames.reduce((m, f) => Math.max(m, f.timeS), 0);
  const firstTimeS = frames.reduce((m, f) => Math.min(m, f.timeS), Infinity);
  const reachS = Number.isFinite(firstTimeS) ? firstTimeS + 5 * Math.max(lastTimeS - firstTimeS, 1e-9) : lastTimeS;
  let xMax = lastTimeS;
  fits.forEach((fit, i) => {
    const colour = fitColours[i % fitColours.length];
    series.push({ label: `fit: ${fit.model}`, points: fit.curve.filter(([t]) => t <= reachS), colour, dashed: true });
    const c = fit.crossing;
    if (c && c.timeS !== null && Number.isFinite(c.timeS) && c.timeS > reachS) {
      series[series.length - 1].label += ` (crosses the threshold at ${formatFixed(c.timeS, 0)} s, off the chart)`;
    } else if (c && c.timeS !== null && Number.isFinite(c.timeS)) {
      xMax = Math.max(xMax, c.highS !== null && Number.isFinite(c.highS) ? Math.min(c.highS, reachS) : c.timeS);
      verticalLines.push({ value: c.timeS, colour, dashed: true, tag: `${formatFixed(c.timeS, 0)} s${c.extrapolated ? ', extrapolated' : ''}`,
        label: `${c.quantity} reaches threshold at ${formatFixed(c.timeS, 1)} s${c.extrapolated ? ' (extrapolated)' : ''}` });
      if (c.lowS !== null && c.highS !== null && Number.isFinite(c.lowS) && Number.isFinite(c.highS)) {
        bands.push({ from: c.lowS, to: c.highS, colour, label: `interval of the ${c.quantity} crossing` });
      }
    }
  });
  const horizontalLines: ReferenceLine[] = thinBelowNm === null ? []
    : [{ value: thinBelowNm, label: `thin threshold ${formatFixed(thinBelowNm, 1)} nm`, colour: thresholdColour }];
  // y range from the observations and the threshold (fitted curves may run off; the plot clips them)
  const observed = frames.flatMap((f) => [f.meanNm, f.medianNm, f.minNm]).filter((v): v is number => v !== null && Number.isFinite(v));
  if (thinBelowNm !== null) observed.push(thinBelowNm);
  const yDomain = observed.length === 0 ? undefined : niceDomain(Math.min(0, ...observed), Math.max(...observed), 5);
  return renderLineChart({
    title: 'Thickness against time', yDomain, xLabel: 'Time (s)', yLabel: 'Thickness (nm)', id: 'drainage-chart',
    series, horizontalLines, verticalLines, verticalBands: bands, widthPx: 1160, heightPx: 400,
    xDomain: frames.length > 0 ? niceDomain(Math.min(0, firstTimeS), Math.max(xMax, lastTimeS), 6) : undefined,
  }).replace('class="chart line-chart"', 'class="chart line-chart series-chart"');
}

export function renderThinFractionChart(frames: SeriesFrameRow[], rupture?: SeriesRupture | null): string | null {
  if (frames.every((f) => f.thinFraction === null)) return null;
  const marks = ruptureMarks(rupture);
  const firstTimeS = frames.reduce((m, f) => Math.min(m, f.timeS), Infinity);
  const lastTimeS = frames.reduce((m, f) => Math.max(m, f.timeS), -Infinity);
  return renderLineChart({
    title: 'Thin fraction against time', xLabel: 'Time (s)', yLabel: 'Thin fraction (%)', id: 'thin-chart', widthPx: 1160, heightPx: 250,
    yDomain: [0, 100], verticalLines: marks.lines, verticalBands: marks.bands,
    // After a rupture, every frame's time (those without film too), as the thickness chart's data.
    xDomain: rupture ? niceDomain(Math.min(0, firstTimeS), Math.max(lastTimeS, rupture.firstTimeS), 6) : undefined,
    series: [{ label: 'share of film below the thin threshold', colour: thresholdColour, style: 'both',
      points: frames.map((f) => [f.timeS, f.thinFraction === null ? null : f.thinFraction * 100]) }],
  }).replace('class="chart line-chart"', 'class="chart line-chart series-chart"');
}
