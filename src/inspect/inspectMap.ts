/**
 * Coating inspection of one thickness map (issue 19): the scale (given, or from a part of known
 * size), the inspected area (the film area less an edge band), its statistics and uniformity
 * figures, the share in spec and the pass/fail verdict, points and profiles.
 */
import { UsageError } from '../errors.js';
import { PixelStatus, type MapResult } from '../map/types.js';
import { insideEdgeBand } from './edgeExclusion.js';
import { filmAreaGeometry, scaleFromPart, type PartSize } from './partScale.js';
import { resolvePoints, sampleProfile, samplePoints, type PointSample, type PointsRequest, type ProfileLine, type ProfileSample } from './samplePoints.js';
import { DEFAULT_PASS_RULE, passRuleText, type PassRule, type ThicknessSpec } from './spec.js';
import { UNIFORMITY_FORMULAS, uniformityOf, valueStatistics, type UniformityFigures, type ValueStatistics } from './uniformity.js';

export interface InspectOptions {
  readonly spec?: ThicknessSpec | null;
  /** Default `in-spec>=99%`. */
  readonly passIf?: PassRule;
  /** Band along the film area's outline left out of the inspection, mm (needs a scale). */
  readonly edgeExclusionMm?: number | null;
  /** A part of known size: sets the pixel size from the film area (overrides none: a given pixel size wins). */
  readonly part?: PartSize | null;
  readonly points?: PointsRequest | null;
  readonly profiles?: readonly ProfileLine[];
  /** Radius of the disc a point's thickness is averaged over, mm (default 1; 3 px without a scale). */
  readonly pointRadiusMm?: number;
}

/** Whether any inspection was asked for (otherwise the map's record has no `inspection` block). */
export function inspectionRequested(o: InspectOptions | null | undefined): boolean {
  return !!o && (!!o.spec || !!o.edgeExclusionMm || !!o.part || !!o.points || (o.profiles?.length ?? 0) > 0);
}

/** A usage error when the options cannot work together (checked before any photo is read). */
export function checkInspectOptions(o: InspectOptions, pixelSizeUm: number | null): void {
  if (o.edgeExclusionMm !== undefined && o.edgeExclusionMm !== null) {
    if (!(o.edgeExclusionMm >= 0)) throw new UsageError(`--edge-exclusion must be a number of mm >= 0, received ${o.edgeExclusionMm}`);
    if (pixelSizeUm === null && !o.part) throw new UsageError('--edge-exclusion needs a scale: give --pixel-size, --part-diameter or --part-width');
  }
  if (o.part && !(o.part.sizeMm > 0)) throw new UsageError(`--part-${o.part.kind} must be a number of mm > 0, received ${o.part.sizeMm}`);
  if (o.points?.kind === 'list' && o.points.points.some((p) => p.unit === 'mm') && pixelSizeUm === null && !o.part) {
    throw new UsageError(`--points ${o.points.source}: points in mm need a scale (--pixel-size, --part-diameter or --part-width)`);
  }
}

export interface SpecShare {
  readonly spec: ThicknessSpec;
  /** Shares of the inspected film area: measured in spec, measured below, above, and not measured. */
  readonly inSpec: number;
  readonly below: number;
  readonly above: number;
  readonly unmeasured: number;
}

export interface Verdict {
  readonly pass: boolean;
  readonly rule: string;
  readonly reason: string;
}

export interface Inspection {
  readonly scale: { readonly pixelSizeUm: number | null; readonly source: 'pixel-size' | 'part-diameter' | 'part-width' | 'none'; readonly partPx: number | null; readonly partMm: number | null };
  /** The part's centre (film area centroid), px; null without film. */
  readonly centrePx: readonly [number, number] | null;
  readonly filmPx: number;
  readonly inspectedPx: number;
  readonly edgeExclusionMm: number | null;
  readonly edgeBandPx: number | null;
  /** Measured pixels of the inspected area / its pixels. */
  readonly coverage: number;
  readonly statistics: ValueStatistics;
  readonly uniformity: UniformityFigures;
  readonly spec: SpecShare | null;
  readonly verdict: Verdict | null;
  /** Inspected pixels measured out of spec (for the map picture's outline); null without a spec. */
  readonly outOfSpec: Uint8Array | null;
  readonly points: PointSample[] | null;
  readonly pointRadiusPx: number | null;
  readonly profiles: ProfileSample[][];
  readonly profileLines: readonly ProfileLine[];
}

/**
 * Inspects a map. `pixelSizeUm` is the scale given by the user (it wins over a part's size);
 * the result's `scale` says which was used.
 */
export function inspectMap(result: Pick<MapResult, 'width' | 'height' | 'thicknessNm' | 'status' | 'confidence' | 'darkLimitNm'>, options: InspectOptions, pixelSizeUm: number | null): Inspection {
  const { width, height, thicknessNm, status } = result;
  const geometry = filmAreaGeometry(status, width, height);
  let scale: Inspection['scale'] = { pixelSizeUm, source: pixelSizeUm !== null ? 'pixel-size' : 'none', partPx: null, partMm: null };
  if (pixelSizeUm === null && options.part) {
    const fromPart = scaleFromPart(status, width, height, options.part);
    if (fromPart) scale = { pixelSizeUm: fromPart.pixelSizeUm, source: options.part.kind === 'diameter' ? 'part-diameter' : 'part-width', partPx: fromPart.partPx, partMm: fromPart.sizeMm };
  }
  const px = scale.pixelSizeUm;
  const edgeMm = options.edgeExclusionMm ?? null;
  const bandPx = edgeMm !== null && edgeMm > 0 && px !== null ? (edgeMm * 1000) / px : edgeMm === null ? null : 0;
  const inspected = insideEdgeBand(status, width, height, bandPx ?? 0);
  let inspectedPx = 0;
  let measured = 0;
  for (let i = 0; i < inspected.length; i++) {
    if (!inspected[i]) continue;
    inspectedPx++;
    if (status[i] === PixelStatus.ok) measured++;
  }
  const values = new Float64Array(measured);
  const spec = options.spec ?? null;
  const outOfSpec = spec ? new Uint8Array(width * height) : null;
  let inSpec = 0;
  let below = 0;
  let above = 0;
  // Too dark on a film that darkens as it thins means "thinner than the dark limit"; washed-out colours mean thicker than the table.
  const darkIsBelow = spec !== null && result.darkLimitNm > 0 && result.darkLimitNm <= spec.minNm;
  for (let i = 0, m = 0; i < inspected.length; i++) {
    if (!inspected[i]) continue;
    const s = status[i];
    if (s === PixelStatus.ok) {
      const v = thicknessNm[i];
      values[m++] = v;
      if (spec && outOfSpec) {
        if (v < spec.minNm) { below++; outOfSpec[i] = 1; }
        else if (v > spec.maxNm) { above++; outOfSpec[i] = 1; }
        else inSpec++;
      }
    } else if (spec && outOfSpec) {
      if (s === PixelStatus.dark && darkIsBelow) { below++; outOfSpec[i] = 1; }
      else if (s === PixelStatus.tooThick) { above++; outOfSpec[i] = 1; }
    }
  }
  const statistics = valueStatistics(values);
  const uniformity = uniformityOf(statistics);
  const share = (k: number): number => (inspectedPx > 0 ? k / inspectedPx : 0);
  const specShare: SpecShare | null = spec
    ? { spec, inSpec: share(inSpec), below: share(below), above: share(above), unmeasured: share(inspectedPx - inSpec - below - above) }
    : null;
  const verdict = specShare ? verdictOf(specShare, statistics, options.passIf ?? DEFAULT_PASS_RULE, inspectedPx) : null;
  const usableRadiusPx = geometry.areaPx > 0 ? Math.sqrt(geometry.areaPx / Math.PI) - (bandPx ?? 0) : 0;
  const part = { centreX: geometry.centreX, centreY: geometry.centreY, usableRadiusPx, pixelSizeUm: px };
  const pointRadiusPx = px !== null ? Math.max(1, ((options.pointRadiusMm ?? 1) * 1000) / px) : 3;
  const points = options.points ? samplePoints(result, resolvePoints(options.points, result, part, pointRadiusPx), pointRadiusPx, part) : null;
  const profileLines = options.profiles ?? [];
  const profiles = profileLines.map((line, k) => sampleProfile(result, line, `--profile ${k + 1}`));
  return {
    scale,
    centrePx: geometry.areaPx > 0 ? [geometry.centreX, geometry.centreY] : null,
    filmPx: geometry.areaPx,
    inspectedPx,
    edgeExclusionMm: edgeMm,
    edgeBandPx: bandPx,
    coverage: share(measured),
    statistics,
    uniformity,
    spec: specShare,
    verdict,
    outOfSpec,
    points,
    pointRadiusPx: points ? pointRadiusPx : null,
    profiles,
    profileLines,
  };
}

function verdictOf(share: SpecShare, stats: ValueStatistics, rule: PassRule, inspectedPx: number): Verdict {
  const text = passRuleText(rule);
  const pct = (v: number): string => `${(v * 100).toFixed(1)} %`;
  if (inspectedPx === 0) return { pass: false, rule: text, reason: 'no film area to inspect' };
  if (rule.kind === 'mean') {
    const mean = stats.mean_nm;
    if (mean === null) return { pass: false, rule: text, reason: 'nothing measured' };
    const ok = mean >= share.spec.minNm && mean <= share.spec.maxNm;
    return { pass: ok, rule: text, reason: `mean ${mean.toFixed(1)} nm ${ok ? 'within' : 'outside'} ${share.spec.text}` };
  }
  if (rule.kind === 'all') {
    const ok = share.inSpec >= 1;
    return { pass: ok, rule: text, reason: ok ? 'every inspected pixel measured and in spec' : `${pct(1 - share.inSpec)} of the inspected area out of spec or not measured` };
  }
  const ok = share.inSpec >= rule.minShare;
  return { pass: ok, rule: text, reason: `${pct(share.inSpec)} in spec (${ok ? 'at least' : 'below'} ${pct(rule.minShare)})` };
}

/** The JSON `inspection` block of a map record (snake_case, units in the names). */
export function inspectionJson(i: Inspection): Record<string, unknown> {
  const s = i.spec;
  return {
    scale: { pixel_size_um: i.scale.pixelSizeUm, source: i.scale.source, part_px: i.scale.partPx, part_mm: i.scale.partMm },
    centre_px: i.centrePx ? [round(i.centrePx[0]), round(i.centrePx[1])] : null,
    film_area_px: i.filmPx,
    inspected_px: i.inspectedPx,
    edge_exclusion_mm: i.edgeExclusionMm,
    edge_band_px: i.edgeBandPx === null ? null : round(i.edgeBandPx),
    coverage: i.coverage,
    statistics: { ...i.statistics },
    uniformity: { ...i.uniformity },
    uniformity_formulas: { ...UNIFORMITY_FORMULAS },
    spec: s
      ? {
          text: s.spec.text,
          min_nm: s.spec.minNm,
          max_nm: s.spec.maxNm,
          nominal_nm: s.spec.nominalNm,
          tolerance_nm: s.spec.toleranceNm,
          in_spec_fraction: s.inSpec,
          below_fraction: s.below,
          above_fraction: s.above,
          unmeasured_fraction: s.unmeasured,
        }
      : null,
    verdict: i.verdict ? { pass: i.verdict.pass, rule: i.verdict.rule, reason: i.verdict.reason } : null,
    points: i.points ? { count: i.points.length, disc_radius_px: i.pointRadiusPx === null ? null : round(i.pointRadiusPx) } : null,
    profiles: i.profileLines.map((l, k) => ({ index: k + 1, from_px: [l.x0, l.y0], to_px: [l.x1, l.y1], samples: i.profiles[k].length })),
  };
}

/** The inspection's part of a photo's summary line (empty when only the scale was asked for). */
export function inspectionSummaryText(i: Inspection): string {
  const parts: string[] = [];
  if (i.scale.source === 'part-diameter' || i.scale.source === 'part-width') parts.push(`scale ${(i.scale.pixelSizeUm! / 1000).toFixed(4)} mm/px from the part`);
  if (i.edgeExclusionMm) parts.push(`edge exclusion ${i.edgeExclusionMm} mm`);
  const u = i.uniformity.range_over_twice_mean;
  if (u !== null && (i.spec || i.edgeExclusionMm)) parts.push(`uniformity ±${(u * 100).toFixed(2)} % (max-min)/(2*mean)`);
  if (i.spec && i.verdict) parts.push(`in spec ${(i.spec.inSpec * 100).toFixed(1)} % of ${i.spec.spec.text}: ${i.verdict.pass ? 'PASS' : 'FAIL'} (${i.verdict.rule})`);
  return parts.join(', ');
}

/** `<stem>.points.csv`. */
export function pointsCsv(points: readonly PointSample[]): string {
  const rows = ['label,x_px,y_px,x_mm,y_mm,thickness_nm,std_nm,measured_px,disc_px'];
  for (const p of points) {
    rows.push([csvLabel(p.label), num(p.xPx, 2), num(p.yPx, 2), num(p.xMm, 3), num(p.yMm, 3), num(p.thicknessNm, 2), num(p.stdNm, 2), p.measuredPx, p.discPx].join(','));
  }
  return `${rows.join('\n')}\n`;
}

/** `<stem>.profile-K.csv`. */
export function profileCsv(samples: readonly ProfileSample[], pixelSizeUm: number | null): string {
  const rows = ['distance_px,distance_mm,x_px,y_px,thickness_nm,confidence,status'];
  for (const s of samples) {
    rows.push([num(s.distancePx, 3), num(pixelSizeUm === null ? null : (s.distancePx * pixelSizeUm) / 1000, 4), num(s.xPx, 2), num(s.yPx, 2), num(s.thicknessNm, 2), num(s.confidence, 3), s.status].join(','));
  }
  return `${rows.join('\n')}\n`;
}

function num(v: number | null, digits: number): string {
  return v === null || !Number.isFinite(v) ? '' : String(Math.round(v * 10 ** digits) / 10 ** digits);
}

function csvLabel(label: string): string {
  // A label is text from the user's file: quoted, and never read as a formula by a spreadsheet.
  const safe = /^[=+\-@\t\r]/.test(label) ? `'${label}` : label;
  return `"${safe.replace(/"/g, '""')}"`;
}

function round(v: number): number {
  return Math.round(v * 100) / 100;
}
