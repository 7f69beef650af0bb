/**
 * Unit tests of the report's SVG helpers: nice ticks, escaping, number text, colour ramp,
 * line chart and histogram structure.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { colourAtNm, checkColourStops } from '../src/report/colourRamp.js';
import { escapeHtml, jsonForScript } from '../src/report/escapeHtml.js';
import { niceDomain, niceTicks, niceTickStep } from '../src/report/niceTicks.js';
import { renderLineChart } from '../src/report/svgChart.js';
import { formatTick } from '../src/report/svgFrame.js';
import { renderHistogram } from '../src/report/svgHistogram.js';

describe('niceTicks() (cases from the d3-array README examples, Bostock, from memory, and hand-computed with its 1-2-5 rule)', () => {
  it('niceTicks(0, 1, 10) gives 0, 0.1, …, 1 printed exactly (d3-array README: d3.ticks(0, 1, 10))', () => {
    const t = niceTicks(0, 1, 10);
    expect(t.values).toEqual([0, 0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 1]);
    expect(t.step).toBe(0.1);
    expect(t.decimals).toBe(1);
  });
  it('niceTicks() of a span that is not a power of ten picks 2 or 5 (hand-computed: 8/5 = 1.6 ≥ √2 → step 2)', () => {
    expect(niceTicks(1, 9, 5).values).toEqual([2, 4, 6, 8]);
    expect(niceTicks(-10, 10, 10).values).toEqual([-10, -8, -6, -4, -2, 0, 2, 4, 6, 8, 10]);
    // 230/8 = 28.75 = 2.875·10; √2 ≤ 2.875 < √10 → step 2·10 = 20
    expect(niceTicks(0, 230, 8).values).toEqual([0, 20, 40, 60, 80, 100, 120, 140, 160, 180, 200, 220]);
  });
  it('niceTickStep() follows the √50, √10, √2 thresholds (d3-array ticks.js)', () => {
    expect(niceTickStep(0, 10, 10)).toBe(1);
    expect(niceTickStep(0, 14.2, 10)).toBe(2); // 1.42 ≥ √2
    expect(niceTickStep(0, 14.1, 10)).toBe(1); // 1.41 < √2
    expect(niceTickStep(0, 31.7, 10)).toBe(5); // 3.17 ≥ √10
    expect(niceTickStep(0, 70.8, 10)).toBe(10); // 7.08 ≥ √50
    expect(niceTickStep(0, 0.003, 3)).toBe(0.001);
  });
  it('niceTicks() with min > max returns the same ascending ticks', () => {
    expect(niceTicks(9, 1, 5).values).toEqual(niceTicks(1, 9, 5).values);
  });
  it('niceTicks() with min == max returns that one value', () => {
    expect(niceTicks(3, 3, 5).values).toEqual([3]);
  });
  it('niceTicks() rejects non-finite bounds naming them', () => {
    expect(() => niceTicks(0, NaN)).toThrow(/min and max must be finite numbers, received 0 and NaN/);
  });
  it('property: ticks lie in [min, max], are evenly spaced by step, and print back exactly with `decimals`', () => {
    fc.assert(fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.double({ min: 1e-3, max: 1e6, noNaN: true }),
      fc.integer({ min: 2, max: 12 }), (lo, span, count) => {
        const hi = lo + span;
        if (!(hi > lo)) return;
        const t = niceTicks(lo, hi, count);
        for (const v of t.values) {
          expect(v).toBeGreaterThanOrEqual(lo);
          expect(v).toBeLessThanOrEqual(hi);
          expect(Number(formatTick(v, t.decimals))).toBeCloseTo(v, 9);
        }
        for (let i = 1; i < t.values.length; i++) expect(t.values[i] - t.values[i - 1]).toBeCloseTo(t.step, 6);
        expect(t.values.length).toBeGreaterThanOrEqual(1);
        expect(t.values.length).toBeLessThanOrEqual(count * 2.5 + 2);
      }), { numRuns: 300 });
  });
  it('niceDomain() widens to multiples of the step and contains the data', () => {
    expect(niceDomain(3.2, 97.1, 5)).toEqual([0, 100]);
    expect(niceDomain(0.013, 0.087, 5)).toEqual([0, 0.1]);
    const [a, b] = niceDomain(5, 5, 5);
    expect(a).toBeLessThan(5);
    expect(b).toBeGreaterThan(5);
  });
});

describe('escapeHtml() (the five characters of the OWASP XSS Prevention Cheat Sheet, rule 1; WHATWG HTML §13.1.2)', () => {
  it('escapes & < > " \' and nothing else', () => {
    expect(escapeHtml(`<a href="x">Tom & 'Jerry'</a>`)).toBe('&lt;a href=&quot;x&quot;&gt;Tom &amp; &#39;Jerry&#39;&lt;/a&gt;');
    expect(escapeHtml('frame_007 – 5 µm²')).toBe('frame_007 – 5 µm²');
  });
  it('escapes an ampersand once (no double escaping of the result is done by the function itself)', () => {
    expect(escapeHtml('&amp;')).toBe('&amp;amp;');
  });
  it('rejects a non-string naming the parameter', () => {
    expect(() => escapeHtml(3 as unknown as string)).toThrow(/text must be a string, received number/);
  });
  it('jsonForScript() cannot close a script element and parses back to the same value', () => {
    const value = { name: '</script><script>alert(1)</script> & <!-- \u2028' };
    const text = jsonForScript(value);
    expect(text).not.toMatch(/<|>|&/);
    expect(JSON.parse(text)).toEqual(value);
  });
});

describe('colourAtNm()', () => {
  const stops = checkColourStops([{ nm: 100, hex: '#ff0000' }, { nm: 0, hex: '#000000' }]);
  it('sorts stops and interpolates halfway between them (0x80 = round(255/2))', () => {
    expect(colourAtNm(stops, 50)).toBe('#800000');
  });
  it('clamps below the first and above the last stop', () => {
    expect(colourAtNm(stops, -5)).toBe('#000000');
    expect(colourAtNm(stops, 500)).toBe('#ff0000');
  });
  it('checkColourStops() names the bad stop', () => {
    expect(() => checkColourStops([{ nm: 0, hex: 'red' }])).toThrow(/colourBar.stops\[0\].hex must be a colour like #1a2b3c, received "red"/);
  });
});

describe('renderLineChart()', () => {
  const svg = renderLineChart({
    title: 'T <1>', xLabel: 'Time (s)', yLabel: 'Thickness (nm)', id: 'c1', xDomain: [0, 10], yDomain: [0, 100],
    series: [{ label: 'mean <&>', colour: '#123456', points: [[0, 10], [1, 20], [2, null], [3, 40], [4, 50]] }],
    horizontalLines: [{ value: 50, label: 'thin', colour: '#ff0000' }],
  });
  it('labels both axes with their units and escapes all text', () => {
    expect(svg).toContain('>Time (s)</text>');
    expect(svg).toContain('>Thickness (nm)</text>');
    expect(svg).toContain('mean &lt;&amp;&gt;');
    expect(svg).toContain('T &lt;1&gt;');
    expect(svg).not.toContain('<1>');
  });
  it('breaks the line at a null value (two move-to commands)', () => {
    const d = /class="series-line" d="([^"]+)"/.exec(svg)?.[1] ?? '';
    expect(d.match(/M/g)?.length).toBe(2);
    expect(d.match(/L/g)?.length).toBe(2);
  });
  it('prints the nice tick labels of both axes (x: 0–10 in steps of 1, since 10/8 = 1.25 < √2; y: 0–100 in steps of 20)', () => {
    const labels = [...svg.matchAll(/class="tick-label"[^>]*>([^<]+)</g)].map((m) => m[1]);
    const expected = [...niceTicks(0, 10, 8).values.map((v) => formatTick(v, 0)), ...niceTicks(0, 100, 5).values.map((v) => formatTick(v, 0))];
    expect(labels).toEqual(expected);
  });
  it('draws the reference line at y = 50 in the middle of the plot', () => {
    const plot = /data-top="([\d.]+)" data-width="([\d.]+)" data-height="([\d.]+)"/.exec(svg)!;
    const mid = Number(plot[1]) + Number(plot[3]) / 2;
    const y = Number(/class="ref-line"[^>]*y1="([\d.]+)"/.exec(svg)![1]);
    expect(y).toBeCloseTo(mid, 1);
  });
});

describe('renderHistogram()', () => {
  it('draws one bar per bin, heights proportional to counts', () => {
    const svg = renderHistogram({ title: 'h', xLabel: 'Thickness (nm)', yLabel: 'Pixels (count)', edges: [0, 10, 20, 30], counts: [5, 10, 0] });
    const heights = [...svg.matchAll(/class="bar"[^>]*height="([\d.]+)"/g)].map((m) => Number(m[1]));
    expect(heights).toHaveLength(3);
    expect(heights[1]).toBeCloseTo(2 * heights[0], 0);
    expect(heights[2]).toBe(0);
  });
  it('rejects edges that do not match the counts, naming both lengths', () => {
    expect(() => renderHistogram({ title: 'h', xLabel: 'x', yLabel: 'y', edges: [0, 1], counts: [1, 2] }))
      .toThrow(/edgesNm must have counts.length \+ 1 = 3 entries, received 2/);
  });
  it('rejects decreasing edges', () => {
    expect(() => renderHistogram({ title: 'h', xLabel: 'x', yLabel: 'y', edges: [0, 2, 1], counts: [1, 2] }))
      .toThrow(/edgesNm must be finite and increasing/);
  });
});
