/**
 * What the "next trials" page plots: the surrogate's mean and standard deviation along one factor (others
 * held) or over a grid of two factors, in natural units.
 */
import { invalidInput } from '../errors';
import { codePoint, decodePoint, toNatural, type Factor, type FactorValue, type Point } from '../factors';
import { predict, type GaussianProcessModel } from './gaussian-process';

export interface SlicePoint {
  value: FactorValue;
  mean: number;
  sd: number;
}

export interface SurrogateSlice {
  factor: string;
  points: SlicePoint[];
}

export interface SurrogateGrid {
  xFactor: string;
  yFactor: string;
  x: FactorValue[];
  y: FactorValue[];
  /** mean[j][i] at (x[i], y[j]). */
  mean: number[][];
  sd: number[][];
}

function factorsOf(model: GaussianProcessModel): Factor[] {
  if (!model.factors) throw invalidInput('model', 'this surrogate was fitted without factor definitions; fit it with fitSurrogate');
  return model.factors;
}

function indexOf(factors: readonly Factor[], name: string, field: string): number {
  const k = factors.findIndex((f) => f.name === name);
  if (k < 0) throw invalidInput(field, `unknown factor "${name}"`);
  return k;
}

/** Values along one factor: its levels, or n evenly spaced values (discrete factors: their allowed values). */
function axisValues(f: Factor, n: number): FactorValue[] {
  if (f.kind === 'categorical') return f.levels.slice();
  if (f.kind === 'discrete') return f.values.slice().sort((a, b) => a - b);
  return Array.from({ length: n }, (_, i) => toNatural(f, -1 + (2 * i) / (n - 1)));
}

/** Centre of the space (numeric factors at mid-range, the first level of categorical ones), overridden by `held`. */
function heldPoint(factors: readonly Factor[], held: Point): Point {
  const centre = decodePoint(factors, factors.map(() => 0));
  return { ...centre, ...held };
}

/** Mean and sd of the surrogate along `factor`, the other factors held at `held` (default: centre of the space). */
export function surrogateSlice(model: GaussianProcessModel, factor: string, held: Point = {}, n = 50): SurrogateSlice {
  const factors = factorsOf(model);
  const k = indexOf(factors, factor, 'factor');
  if (!(Number.isInteger(n) && n >= 2 && n <= 2000)) throw invalidInput('n', 'n is a whole number of points from 2 to 2000');
  const base = heldPoint(factors, held);
  const points = axisValues(factors[k]!, n).map((value) => {
    const p = predict(model, codePoint(factors, { ...base, [factor]: value }));
    return { value, mean: p.mean, sd: p.sd };
  });
  return { factor, points };
}

/** Mean and sd over an n × n grid of two factors (levels for categorical ones), the others held. */
export function surrogateGrid(model: GaussianProcessModel, xFactor: string, yFactor: string, held: Point = {}, n = 25): SurrogateGrid {
  const factors = factorsOf(model);
  const kx = indexOf(factors, xFactor, 'xFactor');
  const ky = indexOf(factors, yFactor, 'yFactor');
  if (kx === ky) throw invalidInput('yFactor', 'choose two different factors');
  if (!(Number.isInteger(n) && n >= 2 && n <= 200)) throw invalidInput('n', 'n is a whole number of points from 2 to 200');
  const base = heldPoint(factors, held);
  const x = axisValues(factors[kx]!, n);
  const y = axisValues(factors[ky]!, n);
  const mean: number[][] = [];
  const sd: number[][] = [];
  for (const yv of y) {
    const mr: number[] = [];
    const sr: number[] = [];
    for (const xv of x) {
      const p = predict(model, codePoint(factors, { ...base, [xFactor]: xv, [yFactor]: yv }));
      mr.push(p.mean);
      sr.push(p.sd);
    }
    mean.push(mr);
    sd.push(sr);
  }
  return { xFactor, yFactor, x, y, mean, sd };
}
