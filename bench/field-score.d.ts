// Types of bench/field-score.js (a plain ES module with JSDoc types) for the TypeScript tests.
export interface ScoredScene {
  film: Uint8Array;
  edge: Uint8Array;
  truthNm: Float32Array;
  thinBelowNm: number | null;
  width: number;
  height: number;
  unevenLight?: { gain: Float32Array } | null;
}
export interface ScoredMap {
  status: Uint8Array;
  thicknessNm: Float32Array;
  darkLimitNm: number;
  thinLabels?: Int32Array;
  stats: { thin_fraction: number | null; film_area_px?: number };
  filmArea?: { found: boolean; areaPx: number };
  exposureField?: { logGainCoefficients: readonly number[] } | null;
}
export declare const TARGETS: {
  outsideMeasuredMax: number;
  thinFractionErrorMax: number;
  grossMax: number;
  p95MaxNm: number;
  coverageMin: number;
  notFilmAreaMax: number;
  coatingMedianMaxNm: number;
  anchorErrorMaxNm: number;
  fieldFlatMax: number;
  thinToleranceNm: number;
};
export declare function outsideFilmScore(scene: ScoredScene, result: ScoredMap): { outsidePx: number; measuredPx: number; fraction: number; pass: boolean };
export declare function thinRegionsOutsideFilm(scene: ScoredScene, result: ScoredMap): { regions: number | null; outside: number | null; pass: boolean; note: string };
export declare function thinFractionScore(scene: ScoredScene, result: ScoredMap): { truth: number; reported: number | null; error: number; pass: boolean } | null;
export declare function insideFilmScore(
  scene: ScoredScene,
  result: ScoredMap,
): { medianNm: number; p95Nm: number; gross: number; coverage: number; estimates: number; pass: boolean };
export declare function filmAreaFraction(result: ScoredMap): number;
export declare function notAFilmScore(result: ScoredMap): { found: boolean; areaFraction: number; pass: boolean };
export declare function ruptureFrame(results: readonly Pick<ScoredMap, "filmArea">[]): number | null;
export declare function medianErrorNm(scene: ScoredScene, result: ScoredMap): number;
export declare function anchorScore(
  scene: ScoredScene,
  result: ScoredMap,
  anchor: { x: number; y: number; thicknessNm: number },
): { givenNm: number; mappedNm: number; error: number; pass: boolean };
export declare function filmSceneTargets(scene: ScoredScene, result: ScoredMap): { target: string; value: string; pass: boolean }[];
export interface TargetRow {
  target: string;
  value: string;
  /** null: reported, not a target. */
  pass: boolean | null;
}
export declare function exposureFieldScore(
  scene: ScoredScene,
  result: ScoredMap,
): { fitted: boolean; pixels: number; flatDeviation: number; flatPass: boolean; truthError: number | null; flatTruthError: number };
export declare function fieldFlatRow(scene: ScoredScene, result: ScoredMap): { target: string; value: string; pass: boolean };
export declare function falseThinRegions(scene: ScoredScene, result: ScoredMap): { regions: number | null; falseRegions: number | null; pass: boolean; note: string };
export declare function lightSceneTargets(scene: ScoredScene, result: ScoredMap): TargetRow[];
