/**
 * CIE standard colorimetric observers as data records: the CIE 1931 2° and CIE 1964 10°
 * colour-matching functions, 360–830 nm at 1 nm (CIE 018:2019 / ISO/CIE 11664-1:2019; CIE data
 * sets DOI 10.25039/CIE.DS.xvudnb9b and 10.25039/CIE.DS.sqksu2n5; see shared/cie/SOURCES.md).
 * Each table is read once, on first use.
 */
import { sharedPath } from '../data/sharedDir.js';
import { readNumericCsv } from './readNumericCsv.js';
import { resampleLinear } from './spectralGrid.js';

export type ObserverName = '1931' | '1964';

export interface ObserverInfo {
  readonly description: string;
  readonly file: string;
  readonly source: string;
}

export const OBSERVERS = {
  '1931': {
    description: 'CIE 1931 2° standard colorimetric observer',
    file: 'cmf_cie1931_2deg.csv',
    source: 'CIE 018:2019 / ISO/CIE 11664-1:2019, DOI 10.25039/CIE.DS.xvudnb9b',
  },
  '1964': {
    description: 'CIE 1964 10° standard colorimetric observer',
    file: 'cmf_cie1964_10deg.csv',
    source: 'CIE 018:2019 / ISO/CIE 11664-1:2019, DOI 10.25039/CIE.DS.sqksu2n5',
  },
} as const satisfies Record<ObserverName, ObserverInfo>;

export const OBSERVER_NAMES = Object.keys(OBSERVERS) as ObserverName[];

export interface ColourMatchingFunctions {
  readonly observer: ObserverName;
  readonly wavelengthsNm: Float64Array;
  readonly xBar: Float64Array;
  readonly yBar: Float64Array;
  readonly zBar: Float64Array;
}

const cache = new Map<ObserverName, ColourMatchingFunctions>();

/** Checks an observer name; throws a RangeError listing the valid names. */
export function checkObserver(observer: unknown): ObserverName {
  if (typeof observer === 'string' && Object.hasOwn(OBSERVERS, observer)) return observer as ObserverName;
  throw new RangeError(`observer must be one of ${OBSERVER_NAMES.join(', ')}, received ${JSON.stringify(observer)}`);
}

/** The observer's tabulated colour-matching functions (1 nm, 360–830 nm), loaded once. */
export function colourMatchingFunctions(observer: ObserverName = '1931'): ColourMatchingFunctions {
  const name = checkObserver(observer);
  let cmf = cache.get(name);
  if (!cmf) {
    const table = readNumericCsv(sharedPath('cie', OBSERVERS[name].file), 4);
    const [wavelengthsNm, xBar, yBar, zBar] = table.columns;
    cmf = { observer: name, wavelengthsNm, xBar, yBar, zBar };
    cache.set(name, cmf);
  }
  return cmf;
}

/** The colour-matching functions sampled on a grid (linear interpolation; 0 outside 360–830). */
export function colourMatchingFunctionsOn(gridNm: Float64Array, observer: ObserverName = '1931'): ColourMatchingFunctions {
  const cmf = colourMatchingFunctions(observer);
  return {
    observer: cmf.observer,
    wavelengthsNm: gridNm,
    xBar: resampleLinear(cmf.wavelengthsNm, cmf.xBar, gridNm),
    yBar: resampleLinear(cmf.wavelengthsNm, cmf.yBar, gridNm),
    zBar: resampleLinear(cmf.wavelengthsNm, cmf.zBar, gridNm),
  };
}
