/**
 * Limited-memory BFGS with simple bounds, for smooth objectives with analytic gradients (the
 * Gaussian-process log marginal likelihood). Search directions come from the two-loop recursion on
 * the free variables (those not held at a bound by their gradient); steps follow the projected path
 * with a backtracking Armijo line search.
 */
// Nocedal (1980), Math. Comp. 35:773-782 (two-loop recursion); Byrd, Lu, Nocedal & Zhu (1995), SIAM J. Sci. Comput. 16:1190-1208 (bounds)

export interface ObjectiveWithGradient {
  /**
   * Value and gradient at x; a non-finite value means "outside the usable region" and is backtracked from.
   * The gradient may be a function: it is then called only for points the line search accepts.
   */
  (x: Float64Array): { value: number; gradient: Float64Array | (() => Float64Array) };
}

export interface BoundedMinimizeOptions {
  lower: ArrayLike<number>;
  upper: ArrayLike<number>;
  memory?: number;
  maxIterations?: number;
  /** Stop when the projected gradient's largest component falls below this. */
  gradientTolerance?: number;
  /** Stop when the relative decrease of the value in one iteration falls below this. */
  valueTolerance?: number;
  /** Largest change of any coordinate in one step. */
  maxStep?: number;
}

export interface BoundedMinimizeResult {
  x: Float64Array;
  value: number;
  gradient: Float64Array;
  iterations: number;
  evaluations: number;
  converged: boolean;
}

function clamp(v: number, lo: number, hi: number): number {
  return v < lo ? lo : v > hi ? hi : v;
}

export function minimizeBounded(f: ObjectiveWithGradient, start: ArrayLike<number>, options: BoundedMinimizeOptions): BoundedMinimizeResult {
  const n = start.length;
  const { lower, upper } = options;
  const memory = options.memory ?? 8;
  const maxIterations = options.maxIterations ?? 200;
  const gtol = options.gradientTolerance ?? 1e-5;
  const ftol = options.valueTolerance ?? 1e-9;

  let x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = clamp(start[i]!, lower[i]!, upper[i]!);
  let evaluations = 1;
  const resolve = (g: Float64Array | (() => Float64Array)): Float64Array => (typeof g === 'function' ? g() : g);
  const first = f(x);
  let value = first.value;
  if (!Number.isFinite(value)) return { x, value, gradient: new Float64Array(n), iterations: 0, evaluations, converged: false };
  let gradient = resolve(first.gradient);

  const sList: Float64Array[] = [];
  const yList: Float64Array[] = [];
  const rhoList: number[] = [];
  const free = new Uint8Array(n);
  let converged = false;
  let iterations = 0;

  const projectedGradientNorm = (): number => {
    let m = 0;
    for (let i = 0; i < n; i++) {
      const g = gradient[i]!;
      let pg = g;
      if (x[i]! <= lower[i]! && g > 0) pg = 0;
      if (x[i]! >= upper[i]! && g < 0) pg = 0;
      m = Math.max(m, Math.abs(pg));
    }
    return m;
  };

  for (; iterations < maxIterations; iterations++) {
    if (projectedGradientNorm() < gtol) {
      converged = true;
      break;
    }
    // Free variables: not held at a bound by the gradient.
    for (let i = 0; i < n; i++) {
      const g = gradient[i]!;
      free[i] = (x[i]! <= lower[i]! && g > 0) || (x[i]! >= upper[i]! && g < 0) ? 0 : 1;
    }
    // Two-loop recursion on the free subspace.
    const q = new Float64Array(n);
    for (let i = 0; i < n; i++) q[i] = free[i] ? gradient[i]! : 0;
    const alphas = new Float64Array(sList.length);
    for (let m = sList.length - 1; m >= 0; m--) {
      const s = sList[m]!;
      let a = 0;
      for (let i = 0; i < n; i++) if (free[i]) a += s[i]! * q[i]!;
      a *= rhoList[m]!;
      alphas[m] = a;
      const y = yList[m]!;
      for (let i = 0; i < n; i++) if (free[i]) q[i] = q[i]! - a * y[i]!;
    }
    if (sList.length > 0) {
      const s = sList[sList.length - 1]!;
      const y = yList[yList.length - 1]!;
      let sy = 0;
      let yy = 0;
      for (let i = 0; i < n; i++) {
        sy += s[i]! * y[i]!;
        yy += y[i]! * y[i]!;
      }
      const gamma = yy > 0 ? sy / yy : 1;
      for (let i = 0; i < n; i++) q[i] = q[i]! * gamma;
    } else {
      // No curvature yet: a unit-length steepest-descent step.
      let qn = 0;
      for (let i = 0; i < n; i++) qn += q[i]! * q[i]!;
      qn = Math.sqrt(qn);
      if (qn > 0) for (let i = 0; i < n; i++) q[i] = q[i]! / qn;
    }
    for (let m = 0; m < sList.length; m++) {
      const y = yList[m]!;
      let b = 0;
      for (let i = 0; i < n; i++) if (free[i]) b += y[i]! * q[i]!;
      b *= rhoList[m]!;
      const s = sList[m]!;
      for (let i = 0; i < n; i++) if (free[i]) q[i] = q[i]! + s[i]! * (alphas[m]! - b);
    }
    const direction = new Float64Array(n);
    let slope = 0;
    for (let i = 0; i < n; i++) {
      direction[i] = free[i] ? -q[i]! : 0;
      slope += direction[i]! * gradient[i]!;
    }
    if (!(slope < 0)) {
      // Not a descent direction: forget the curvature pairs and follow the projected steepest descent.
      sList.length = 0;
      yList.length = 0;
      rhoList.length = 0;
      let gnorm = 0;
      for (let i = 0; i < n; i++) {
        direction[i] = free[i] ? -gradient[i]! : 0;
        gnorm += direction[i]! * direction[i]!;
      }
      gnorm = Math.sqrt(gnorm);
      if (gnorm === 0) {
        converged = true;
        break;
      }
      for (let i = 0; i < n; i++) direction[i] = direction[i]! / Math.max(1, gnorm);
    }
    // Backtracking along the projected path x(t) = P(x + t d).
    let longest = 0;
    for (let i = 0; i < n; i++) longest = Math.max(longest, Math.abs(direction[i]!));
    let t = options.maxStep !== undefined && longest > options.maxStep ? options.maxStep / longest : 1;
    let accepted = false;
    let xNew = new Float64Array(n);
    let next: ReturnType<ObjectiveWithGradient> = { value, gradient };
    for (let tries = 0; tries < 40; tries++) {
      let decrease = 0;
      for (let i = 0; i < n; i++) {
        xNew[i] = clamp(x[i]! + t * direction[i]!, lower[i]!, upper[i]!);
        decrease += gradient[i]! * (xNew[i]! - x[i]!);
      }
      evaluations++;
      next = f(xNew);
      if (Number.isFinite(next.value) && next.value <= value + 1e-4 * decrease) {
        accepted = true;
        break;
      }
      // Minimiser of the quadratic through f(x), the slope along the step and f(x(t)), kept within [0.1 t, 0.5 t].
      if (Number.isFinite(next.value) && decrease < 0) {
        const curvature = next.value - value - decrease;
        const ratio = curvature > 0 ? -decrease / (2 * curvature) : 0.5;
        t *= Math.min(0.5, Math.max(0.1, ratio));
      } else {
        t *= 0.5;
      }
    }
    if (!accepted) break;
    const nextGradient = resolve(next.gradient);
    const s = new Float64Array(n);
    const y = new Float64Array(n);
    let sy = 0;
    for (let i = 0; i < n; i++) {
      s[i] = xNew[i]! - x[i]!;
      y[i] = nextGradient[i]! - gradient[i]!;
      sy += s[i]! * y[i]!;
    }
    if (sy > 1e-12) {
      sList.push(s);
      yList.push(y);
      rhoList.push(1 / sy);
      if (sList.length > memory) {
        sList.shift();
        yList.shift();
        rhoList.shift();
      }
    }
    const previous = value;
    x = xNew;
    xNew = new Float64Array(n);
    value = next.value;
    gradient = nextGradient;
    if (Math.abs(previous - value) <= ftol * Math.max(1, Math.abs(value))) {
      converged = true;
      iterations++;
      break;
    }
  }
  return { x, value, gradient, iterations, evaluations, converged };
}
