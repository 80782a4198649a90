/**
 * Median of a stretch of a typed array without sorting it: copy into scratch space, then Hoare's
 * selection. Hoare (1961), Communications of the ACM 4:321-322 (Algorithm 65, FIND; citation from memory).
 */

let scratch = new Float64Array(1024);

function kthSmallest(a: Float64Array, n: number, k: number): number {
  let left = 0;
  let right = n - 1;
  while (right > left) {
    const pivot = a[(left + right) >> 1]!;
    let i = left;
    let j = right;
    while (i <= j) {
      while (a[i]! < pivot) i++;
      while (a[j]! > pivot) j--;
      if (i <= j) {
        const s = a[i]!;
        a[i] = a[j]!;
        a[j] = s;
        i++;
        j--;
      }
    }
    if (k <= j) right = j;
    else if (k >= i) left = i;
    else return a[k]!;
  }
  return a[k]!;
}

/** Median of values[from..to) (NaN for an empty range); `values` is not changed. */
export function medianOfRange(values: Float64Array, from: number, to: number): number {
  const n = to - from;
  if (n <= 0) return Number.NaN;
  if (scratch.length < n) scratch = new Float64Array(Math.max(n, scratch.length * 2));
  scratch.set(values.subarray(from, to));
  const m = n >> 1;
  const upper = kthSmallest(scratch, n, m);
  if (n % 2) return upper;
  // The lower middle is the largest value left of position m after selection.
  let lower = -Infinity;
  for (let i = 0; i < m; i++) if (scratch[i]! > lower) lower = scratch[i]!;
  return (lower + upper) / 2;
}
