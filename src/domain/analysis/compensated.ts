/**
 * Error-free transformations and compensated dot products, used to compute residuals of least
 * squares in about twice the working precision during iterative refinement.
 */
// Ogita, Rump & Oishi (2005), SIAM J. Sci. Comput. 26:1955-1988 (Dot2, TwoSum, TwoProduct)

const SPLITTER = 134217729; // 2^27 + 1, Veltkamp / Dekker splitting constant

/** Σ a[aOff + i·aStride]·b[bOff + i] for i < len, in about twice the working precision. */
export function dot2(a: ArrayLike<number>, aOff: number, aStride: number, b: ArrayLike<number>, bOff: number, len: number, init = 0): number {
  let p = init;
  let s = 0;
  for (let i = 0; i < len; i++) {
    const x = a[aOff + i * aStride]!;
    const y = b[bOff + i]!;
    // TwoProduct(x, y) by Dekker's algorithm
    const h = x * y;
    let c = SPLITTER * x;
    const xh = c - (c - x);
    const xl = x - xh;
    c = SPLITTER * y;
    const yh = c - (c - y);
    const yl = y - yh;
    const r = xl * yl - (((h - xh * yh) - xl * yh) - xh * yl);
    // TwoSum(p, h)
    const t = p + h;
    const z = t - p;
    const q = (p - (t - z)) + (h - z);
    p = t;
    s += q + r;
  }
  return p + s;
}

/** Compensated sum of xs (Neumaier's variant of Kahan summation). */
export function compensatedSum(xs: ArrayLike<number>): number {
  let sum = 0;
  let comp = 0;
  for (let i = 0; i < xs.length; i++) {
    const x = xs[i]!;
    const t = sum + x;
    if (Math.abs(sum) >= Math.abs(x)) comp += (sum - t) + x;
    else comp += (x - t) + sum;
    sum = t;
  }
  return sum + comp;
}

/** Mean of xs to nearly full precision: compensated sum, then one correcting pass. */
export function accurateMean(xs: ArrayLike<number>): number {
  const n = xs.length;
  if (n === 0) return NaN;
  const m0 = compensatedSum(xs) / n;
  let corr = 0;
  let comp = 0;
  for (let i = 0; i < n; i++) {
    const x = xs[i]! - m0;
    const t = corr + x;
    if (Math.abs(corr) >= Math.abs(x)) comp += (corr - t) + x;
    else comp += (x - t) + corr;
    corr = t;
  }
  return m0 + (corr + comp) / n;
}

/** Σ (x − centre)² with compensated accumulation. */
export function sumOfSquaredDeviations(xs: ArrayLike<number>, centre: number): number {
  let sum = 0;
  let comp = 0;
  for (let i = 0; i < xs.length; i++) {
    const d = xs[i]! - centre;
    const x = d * d;
    const t = sum + x;
    if (sum >= x) comp += (sum - t) + x;
    else comp += (x - t) + sum;
    sum = t;
  }
  return sum + comp;
}

/** Double-double product (hi, lo) · x, returned as [hi, lo]. */
export function ddTimes(hi: number, lo: number, x: number): [number, number] {
  const h = hi * x;
  let c = SPLITTER * hi;
  const ah = c - (c - hi);
  const al = hi - ah;
  c = SPLITTER * x;
  const bh = c - (c - x);
  const bl = x - bh;
  const err = al * bl - (((h - ah * bh) - al * bh) - ah * bl);
  const l = err + lo * x;
  const s = h + l;
  return [s, l - (s - h)];
}

/**
 * The part of an exact product that a double `rounded` misses: (Π factors) − rounded, computed in
 * double-double arithmetic. Used to carry the low-order parts of model-matrix entries like x^10.
 */
export function productRemainder(factors: ArrayLike<number>, rounded: number): number {
  let hi = 1;
  let lo = 0;
  for (let i = 0; i < factors.length; i++) [hi, lo] = ddTimes(hi, lo, factors[i]!);
  return (hi - rounded) + lo;
}

/**
 * The decimal a number was written as (its shortest round-trip form, e.g. 1000000000000.4) minus
 * the double that holds it: the low-order part that lets sums treat data as the decimals entered.
 * Returns 0 when the decimal has more than 15 significant digits or an exponent out of easy reach.
 */
export function decimalRemainder(v: number): number {
  if (!Number.isFinite(v) || Number.isInteger(v)) return 0;
  const m = /^(-?)(\d+)(?:\.(\d+))?(?:e([+-]\d+))?$/.exec(String(v));
  if (!m) return 0;
  const digits = (m[2]! + (m[3] ?? '')).replace(/^0+/, '');
  const k = (m[3]?.length ?? 0) - Number(m[4] ?? 0);
  if (digits.length > 15 || k <= 0 || k > 22) return 0;
  const mant = Number(digits) * (m[1] ? -1 : 1); // exact: at most 15 digits
  const pow = Math.pow(10, k); // exact for k ≤ 22
  // mant − v·pow exactly, by TwoProduct; then divide by pow.
  const h = v * pow;
  let c = SPLITTER * v;
  const vh = c - (c - v);
  const vl = v - vh;
  c = SPLITTER * pow;
  const ph = c - (c - pow);
  const pl = pow - ph;
  const err = vl * pl - (((h - vh * ph) - vl * ph) - vh * pl);
  return ((mant - h) - err) / pow;
}
