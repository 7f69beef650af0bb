/** Validates a LeastSquaresProblem and fills its defaults in one place. */
import type { LeastSquaresProblem } from './types.js';

export interface CheckedProblem {
  x: Float64Array;
  y: Float64Array;
  /** √w per observation. */
  sqrtWeights: Float64Array;
  model: LeastSquaresProblem['model'];
  modelVector: LeastSquaresProblem['modelVector'] | null;
  initial: number[];
  lower: number[];
  upper: number[];
  scale: number[];
  maxIterations: number;
  tolerance: number;
  restartFromInitial: boolean;
  jacobian: LeastSquaresProblem['jacobian'] | null;
}

function finiteArray(name: string, values: ArrayLike<number>, length?: number): Float64Array {
  if (values === null || typeof values !== 'object' || typeof values.length !== 'number') {
    throw new TypeError(`${name} must be an array of numbers, received ${values === null ? 'null' : typeof values}`);
  }
  if (length !== undefined && values.length !== length) {
    throw new RangeError(`${name} must have ${length} entries, received ${values.length}`);
  }
  const out = Float64Array.from(values);
  const bad = out.findIndex((v) => !Number.isFinite(v));
  if (bad >= 0) throw new RangeError(`${name}[${bad}] must be a finite number, received ${values[bad]}`);
  return out;
}

export function checkProblem(problem: LeastSquaresProblem): CheckedProblem {
  if (typeof problem !== 'object' || problem === null) throw new TypeError(`problem must be an object, received ${String(problem)}`);
  if (typeof problem.model !== 'function') throw new TypeError(`problem.model must be a function, received ${typeof problem.model}`);
  const initial = Array.from(finiteArray('initial', problem.initial));
  const p = initial.length;
  if (p === 0) throw new RangeError('initial must hold at least one parameter, received []');
  const x = finiteArray('x', problem.x);
  const n = x.length;
  const y = finiteArray('y', problem.y, n);
  if (n <= p) throw new RangeError(`need more observations than parameters: ${n} observations for ${p} parameters`);
  const weights = problem.weights === undefined ? new Float64Array(n).fill(1) : finiteArray('weights', problem.weights, n);
  const negative = weights.findIndex((w) => w < 0);
  if (negative >= 0) throw new RangeError(`weights[${negative}] must be >= 0 (weights are 1/σ²), received ${weights[negative]}`);
  const sqrtWeights = weights.map(Math.sqrt);
  const lower = problem.lower === undefined ? new Array<number>(p).fill(-Infinity) : Array.from(problem.lower);
  const upper = problem.upper === undefined ? new Array<number>(p).fill(Infinity) : Array.from(problem.upper);
  if (lower.length !== p) throw new RangeError(`lower must have ${p} entries, received ${lower.length}`);
  if (upper.length !== p) throw new RangeError(`upper must have ${p} entries, received ${upper.length}`);
  for (let k = 0; k < p; k++) {
    if (Number.isNaN(lower[k]) || Number.isNaN(upper[k]) || lower[k] > upper[k]) {
      throw new RangeError(`bounds of parameter ${k} must satisfy lower <= upper, received [${lower[k]}, ${upper[k]}]`);
    }
    if (initial[k] < lower[k] || initial[k] > upper[k]) {
      throw new RangeError(`initial[${k}] must lie within [${lower[k]}, ${upper[k]}], received ${initial[k]}`);
    }
  }
  const scale = problem.scale === undefined ? initial.map((v) => (v !== 0 ? Math.abs(v) : 1)) : Array.from(finiteArray('scale', problem.scale, p));
  const badScale = scale.findIndex((s) => !(s > 0));
  if (badScale >= 0) throw new RangeError(`scale[${badScale}] must be > 0, received ${scale[badScale]}`);
  const maxIterations = problem.maxIterations ?? 200;
  if (!Number.isInteger(maxIterations) || maxIterations < 1) throw new RangeError(`maxIterations must be an integer >= 1, received ${maxIterations}`);
  const tolerance = problem.tolerance ?? 1e-12;
  if (!(tolerance > 0 && tolerance < 1)) throw new RangeError(`tolerance must be a number in (0, 1), received ${tolerance}`);
  if (problem.restartFromInitial !== undefined && typeof problem.restartFromInitial !== 'boolean') {
    throw new TypeError(`restartFromInitial must be a boolean, received ${typeof problem.restartFromInitial}`);
  }
  const restartFromInitial = problem.restartFromInitial ?? true;
  if (problem.modelVector !== undefined && typeof problem.modelVector !== 'function') {
    throw new TypeError(`problem.modelVector must be a function, received ${typeof problem.modelVector}`);
  }
  if (problem.jacobian !== undefined && typeof problem.jacobian !== 'function') {
    throw new TypeError(`problem.jacobian must be a function, received ${typeof problem.jacobian}`);
  }
  return { x, y, sqrtWeights, model: problem.model, modelVector: problem.modelVector ?? null, initial, lower, upper, scale, maxIterations, tolerance, restartFromInitial, jacobian: problem.jacobian ?? null };
}
