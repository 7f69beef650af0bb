/**
 * fitLeastSquares() against the NIST Statistical Reference Datasets, Nonlinear Regression
 * (NIST ITL, StRD; data and certified values in shared/refdata/nist-strd/, see README there).
 * Every dataset is fitted from both of NIST's starting points (start1 far, start2 near).
 *
 * Tolerances are relative and stated per dataset. NIST certifies 11 significant digits; the usual
 * reading (McCullough, "Assessing the reliability of statistical software", The American
 * Statistician 52(4), 1998) is that 4–6 correct digits of the parameters is a sound result and
 * more is better. We ask for about two digits less than we reach in IEEE double, so that the test
 * guards the level we have without being fragile:
 *   RSS: 1e-9 for every dataset;
 *   parameters and their certified standard deviations: per dataset below, looser for NIST's
 *   "higher" difficulty problems (MGH09 is nearly singular, so its standard deviations depend on
 *   the finite-difference Jacobian at the 1e-5 level).
 * No start is known to fail; if one did, it would be listed in KNOWN_FAILURES with `it.fails`.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { fitLeastSquares } from '../src/fit/index.js';
import { fitLeastSquaresWithJacobian } from '../src/fit/fitLeastSquaresWithJacobian.js';
import { sharedPath } from '../src/data/sharedDir.js';

type Model = (b: readonly number[]) => (x: number) => number;

interface Case {
  name: string;
  /** NIST's formula as printed in the JSON, to tie the hand-written model to the data. */
  formula: string;
  model: Model;
  parameterTolerance: number;
  sdTolerance: number;
}

const CASES: Case[] = [
  { name: 'Misra1a', formula: 'y = b1*(1-exp[-b2*x])', model: (b) => (x) => b[0] * (1 - Math.exp(-b[1] * x)), parameterTolerance: 1e-8, sdTolerance: 1e-7 },
  { name: 'Chwirut2', formula: 'y = exp(-b1*x)/(b2+b3*x)', model: (b) => (x) => Math.exp(-b[0] * x) / (b[1] + b[2] * x), parameterTolerance: 1e-8, sdTolerance: 1e-7 },
  { name: 'DanWood', formula: 'y = b1*x**b2', model: (b) => (x) => b[0] * x ** b[1], parameterTolerance: 1e-8, sdTolerance: 1e-7 },
  { name: 'MGH09', formula: 'y = b1*(x**2+x*b2) / (x**2+x*b3+b4)', model: (b) => (x) => (b[0] * (x * x + x * b[1])) / (x * x + x * b[2] + b[3]), parameterTolerance: 1e-5, sdTolerance: 1e-4 },
  {
    name: 'Thurber',
    formula: 'y = (b1 + b2*x + b3*x**2 + b4*x**3) / (1 + b5*x + b6*x**2 + b7*x**3)',
    model: (b) => (x) => (b[0] + b[1] * x + b[2] * x ** 2 + b[3] * x ** 3) / (1 + b[4] * x + b[5] * x ** 2 + b[6] * x ** 3),
    parameterTolerance: 1e-6,
    sdTolerance: 1e-5,
  },
  { name: 'BoxBOD', formula: 'y = b1*(1-exp[-b2*x])', model: (b) => (x) => b[0] * (1 - Math.exp(-b[1] * x)), parameterTolerance: 1e-6, sdTolerance: 1e-6 },
  { name: 'Eckerle4', formula: 'y = (b1/b2) * exp[-0.5*((x-b3)/b2)**2]', model: (b) => (x) => (b[0] / b[1]) * Math.exp(-0.5 * ((x - b[2]) / b[1]) ** 2), parameterTolerance: 1e-7, sdTolerance: 1e-5 },
  { name: 'Rat43', formula: 'y = b1 / ((1+exp[b2-b3*x])**(1/b4))', model: (b) => (x) => b[0] / (1 + Math.exp(b[1] - b[2] * x)) ** (1 / b[3]), parameterTolerance: 1e-6, sdTolerance: 1e-5 },
];

/** Starts that our fitter does not bring to the certified values (none at present). */
const KNOWN_FAILURES = new Set<string>([]);

interface Certified {
  model: string;
  start1: number[];
  start2: number[];
  certified: number[];
  certified_sd: number[];
  residual_sum_of_squares: number;
  degrees_of_freedom: number;
  number_of_observations: number;
}

function load(name: string): { meta: Certified; x: number[]; y: number[] } {
  const meta = JSON.parse(readFileSync(sharedPath('refdata', 'nist-strd', `${name}.json`), 'utf8')) as Certified;
  const rows = readFileSync(sharedPath('refdata', 'nist-strd', `${name}.csv`), 'utf8').trim().split(/\r?\n/).slice(1);
  const x = rows.map((row) => Number(row.split(',')[0]));
  const y = rows.map((row) => Number(row.split(',')[1]));
  return { meta, x, y };
}

function relativeError(value: number, reference: number): number {
  return Math.abs(value - reference) / Math.abs(reference);
}

describe('fitLeastSquares() reaches NIST StRD certified values (NIST ITL Statistical Reference Datasets, Nonlinear Regression)', () => {
  for (const testCase of CASES) {
    const { meta, x, y } = load(testCase.name);
    it(`${testCase.name}: data file matches the model formula and size`, () => {
      expect(meta.model).toBe(testCase.formula);
      expect(x.length).toBe(meta.number_of_observations);
      expect(x.every(Number.isFinite) && y.every(Number.isFinite)).toBe(true);
    });
    for (const start of ['start1', 'start2'] as const) {
      const title = `${testCase.name} from ${start}: parameters to ${testCase.parameterTolerance}, RSS to 1e-9, standard deviations to ${testCase.sdTolerance} (relative)`;
      const run = KNOWN_FAILURES.has(`${testCase.name}/${start}`) ? it.fails : it;
      run(title, () => {
        const result = fitLeastSquares({ x, y, model: testCase.model, initial: meta[start] });
        expect(result.converged).toBe(true);
        expect(result.degreesOfFreedom).toBe(meta.degrees_of_freedom);
        expect(relativeError(result.residualSumOfSquares, meta.residual_sum_of_squares)).toBeLessThan(1e-9);
        meta.certified.forEach((value, k) => {
          expect(relativeError(result.parameters[k], value), `b${k + 1}`).toBeLessThan(testCase.parameterTolerance);
          expect(relativeError(result.standardErrors[k], meta.certified_sd[k]), `sd b${k + 1}`).toBeLessThan(testCase.sdTolerance);
          expect(relativeError(result.covariance[k][k], result.standardErrors[k] ** 2)).toBeLessThan(1e-12);
        });
        expect(result.warnings).toEqual([]);
      });
    }
  }
});

describe('fitLeastSquares({ restartFromInitial: false }): the single descent for a good start', () => {
  // NIST's start2 is the "near" start; from it one descent reaches the certified values of these
  // datasets as well (NIST StRD, as above; MGH09 is left out: nearly singular, see the header).
  for (const name of ['Misra1a', 'Chwirut2', 'DanWood', 'Thurber'] as const) {
    it(`${name} from start2: the certified parameters and RSS without the restart`, () => {
      const testCase = CASES.find((c) => c.name === name)!;
      const { meta, x, y } = load(name);
      const result = fitLeastSquares({ x, y, model: testCase.model, initial: meta.start2, restartFromInitial: false });
      expect(result.converged).toBe(true);
      expect(relativeError(result.residualSumOfSquares, meta.residual_sum_of_squares)).toBeLessThan(1e-9);
      meta.certified.forEach((value, k) => expect(relativeError(result.parameters[k], value), `b${k + 1}`).toBeLessThan(testCase.parameterTolerance));
    });
  }
  it('refuses a non-boolean', () => {
    expect(() =>
      fitLeastSquares({ x: [1, 2, 3], y: [1, 2, 3], model: (b) => (x) => b[0] * x, initial: [1], restartFromInitial: 'no' as unknown as boolean }),
    ).toThrow(/restartFromInitial must be a boolean, received string/);
  });
});

/** ∂f/∂b of the models above, written out by hand (calculus; each is also checked against central differences below). */
const DERIVATIVES: Record<string, (b: readonly number[], x: number) => number[]> = {
  Misra1a: (b, x) => [1 - Math.exp(-b[1] * x), b[0] * x * Math.exp(-b[1] * x)],
  BoxBOD: (b, x) => [1 - Math.exp(-b[1] * x), b[0] * x * Math.exp(-b[1] * x)],
  DanWood: (b, x) => [x ** b[1], b[0] * x ** b[1] * Math.log(x)],
  Chwirut2: (b, x) => {
    const d = b[1] + b[2] * x;
    const f = Math.exp(-b[0] * x) / d;
    return [-x * f, -f / d, (-x * f) / d];
  },
  Eckerle4: (b, x) => {
    const z = (x - b[2]) / b[1];
    const e = Math.exp(-0.5 * z * z);
    return [e / b[1], ((b[0] * e) / (b[1] * b[1])) * (z * z - 1), ((b[0] / b[1]) * e * z) / b[1]];
  },
};

describe('fitLeastSquares({ jacobian }): the model\'s own derivatives instead of finite differences', () => {
  // Same datasets and certified values (NIST StRD, as above). With a Jacobian the wrapped library
  // is skipped and our Marquardt loop does all the work.
  for (const [name, derivative] of Object.entries(DERIVATIVES)) {
    const testCase = CASES.find((c) => c.name === name)!;
    const { meta, x, y } = load(name);
    const jacobian = (b: readonly number[], out: Float64Array): void => {
      x.forEach((xi, i) => derivative(b, xi).forEach((d, k) => (out[i * b.length + k] = d)));
    };
    it(`${name}: the hand derivatives equal central differences at the certified values`, () => {
      const b = meta.certified;
      for (const xi of [x[0], x[Math.floor(x.length / 2)], x[x.length - 1]]) {
        derivative(b, xi).forEach((d, k) => {
          const h = 1e-6 * Math.abs(b[k]);
          const up = b.map((v, j) => (j === k ? v + h : v));
          const down = b.map((v, j) => (j === k ? v - h : v));
          const numeric = (testCase.model(up)(xi) - testCase.model(down)(xi)) / (2 * h);
          expect(Math.abs(d - numeric)).toBeLessThan(1e-6 * Math.max(1, Math.abs(numeric)));
        });
      }
    });
    it(`${name}: fitLeastSquaresWithJacobian (the map's fit, without the wrapped library) gives fitLeastSquares' result to the last bit`, () => {
      const problem = { x, y, model: testCase.model, jacobian, initial: meta.start2 };
      expect(fitLeastSquaresWithJacobian(problem)).toEqual(fitLeastSquares(problem));
    });
    it(`${name}: with modelVector (all observations at once) the same result to the last bit, and the model is no longer called per observation`, () => {
      let perObservation = 0;
      const counted = (b: readonly number[]) => {
        const f = testCase.model(b);
        return (xi: number): number => {
          perObservation++;
          return f(xi);
        };
      };
      const modelVector = (b: readonly number[]) => Array.from(x, testCase.model(b));
      const plain = fitLeastSquaresWithJacobian({ x, y, model: testCase.model, jacobian, initial: meta.start2 });
      const vectored = fitLeastSquaresWithJacobian({ x, y, model: counted, modelVector, jacobian, initial: meta.start2 });
      expect(vectored).toEqual(plain);
      expect(perObservation).toBe(0);
      expect(() => fitLeastSquaresWithJacobian({ x, y, model: testCase.model, modelVector: 3 as never, jacobian, initial: meta.start2 })).toThrow(/modelVector must be a function/);
    });
    it(`${name} from start2: certified parameters to ${testCase.parameterTolerance}, RSS to 1e-9, standard deviations to ${testCase.sdTolerance}`, () => {
      const result = fitLeastSquares({ x, y, model: testCase.model, jacobian, initial: meta.start2 });
      expect(result.converged).toBe(true);
      expect(relativeError(result.residualSumOfSquares, meta.residual_sum_of_squares)).toBeLessThan(1e-9);
      meta.certified.forEach((value, k) => {
        expect(relativeError(result.parameters[k], value), `b${k + 1}`).toBeLessThan(testCase.parameterTolerance);
        expect(relativeError(result.standardErrors[k], meta.certified_sd[k]), `sd b${k + 1}`).toBeLessThan(testCase.sdTolerance);
      });
    });
  }
  it('with a Jacobian the model is evaluated far fewer times (no finite differences)', () => {
    const testCase = CASES.find((c) => c.name === 'Chwirut2')!;
    const { meta, x, y } = load('Chwirut2');
    let calls = 0;
    const counted = (b: readonly number[]): ((x: number) => number) => {
      calls++;
      return testCase.model(b);
    };
    fitLeastSquares({ x, y, model: counted, initial: meta.start2 });
    const withDifferences = calls;
    calls = 0;
    const jacobian = (b: readonly number[], out: Float64Array): void => {
      x.forEach((xi, i) => DERIVATIVES.Chwirut2(b, xi).forEach((d, k) => (out[i * 3 + k] = d)));
    };
    fitLeastSquares({ x, y, model: counted, jacobian, initial: meta.start2 });
    expect(calls).toBeLessThan(withDifferences / 4);
  });
  it('fitLeastSquaresWithJacobian refuses a problem without a jacobian', () => {
    expect(() => fitLeastSquaresWithJacobian({ x: [1, 2, 3], y: [1, 2, 3], model: (b) => (x) => b[0] * x, initial: [1] })).toThrow(/needs problem\.jacobian/);
  });
  it('refuses a jacobian that is not a function', () => {
    expect(() =>
      fitLeastSquares({ x: [1, 2, 3], y: [1, 2, 3], model: (b) => (x) => b[0] * x, initial: [1], jacobian: 'no' as unknown as () => void }),
    ).toThrow(/problem\.jacobian must be a function, received string/);
  });
});
