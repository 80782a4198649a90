/**
 * Triangular factor of a tall matrix [X y] by Householder reflections over row chunks (a sequential
 * tall-skinny QR): the running triangle R sits above each chunk of rows, and the reflectors that
 * fold the chunk into R touch only R's row k and the chunk. A chunk of 128 rows of up to ~30
 * columns stays in the first-level cache, so the trailing-column updates run from cache instead of
 * streaming the whole matrix once per reflector, and reflectors are applied two at a time (each
 * pass over a column does the work of two). Q is not kept: the caller gets R and Qᵀy, which is all
 * a least-squares solution without refinement needs. Column pivoting and rank detection then run on
 * the small triangle, which has the same singular values as X.
 */
// Demmel, Grigori, Hoemmen & Langou (2012), SIAM J. Sci. Comput. 34:A206-A239 (tall-skinny QR)
// Schreiber & Van Loan (1989), SIAM J. Sci. Stat. Comput. 10:53-57 (applying reflectors in blocks)

/** Rows per chunk: 128 rows × 31 columns × 8 bytes ≈ 31 KB, inside a first-level data cache. */
export const CHUNK_ROWS = 128;

/**
 * R (column-major q × q with q = p + 1, upper triangular) of the n × q matrix whose first p columns
 * are X (column-major n × p) and whose last column is y. R's last column holds Qᵀy (its last entry
 * is ± the norm of the part of y that X leaves unexplained, when X has full column rank).
 */
export function chunkedTriangle(x: Float64Array, y: Float64Array, n: number, p: number, chunkRows = CHUNK_ROWS): Float64Array {
  return triangleOfRows(x, y, n, p, 0, n, new Float64Array((p + 1) * (p + 1)), chunkRows);
}

/**
 * Rows [from, to) of [X y] folded into the triangle `r` (q × q column-major, zero for a fresh start),
 * which is updated in place and returned.
 */
export function triangleOfRows(x: Float64Array, y: Float64Array, n: number, p: number, from: number, to: number, r: Float64Array, chunkRows = CHUNK_ROWS): Float64Array {
  const q = p + 1;
  const ld = chunkRows;
  const buf = new Float64Array(ld * q);
  const h = new Float64Array(2);

  /** Reflector for column k: [v0 at R's row k; chunk part in buf], h = [v0, β]; R[k,k] = α. */
  const reflector = (k: number, mc: number): void => {
    const ok = k * ld;
    let ss = 0;
    for (let i = 0; i < mc; i++) {
      const v = buf[ok + i]!;
      ss += v * v;
    }
    if (ss === 0) {
      // The chunk part is already zero: the identity (β = 0).
      h[0] = 0;
      h[1] = 0;
      return;
    }
    const x0 = r[k * q + k]!;
    const xnorm = Math.sqrt(x0 * x0 + ss);
    const alpha = x0 >= 0 ? -xnorm : xnorm;
    const v0 = x0 - alpha;
    h[0] = v0;
    h[1] = -1 / (alpha * v0);
    r[k * q + k] = alpha;
  };

  for (let i0 = from; i0 < to; i0 += ld) {
    const mc = Math.min(ld, to - i0);
    for (let j = 0; j < p; j++) buf.set(x.subarray(j * n + i0, j * n + i0 + mc), j * ld);
    buf.set(y.subarray(i0, i0 + mc), p * ld);
    let k = 0;
    for (; k + 1 < q; k += 2) {
      const ok = k * ld;
      const ok1 = ok + ld;
      reflector(k, mc);
      const v0a = h[0]!;
      const ba = h[1]!;
      // Reflector k applied to column k + 1, whose reflector comes next.
      {
        const rr = (k + 1) * q + k;
        let d = v0a * r[rr]!;
        for (let i = 0; i < mc; i++) d += buf[ok + i]! * buf[ok1 + i]!;
        const w = ba * d;
        r[rr] -= w * v0a;
        for (let i = 0; i < mc; i++) buf[ok1 + i] -= w * buf[ok + i]!;
      }
      reflector(k + 1, mc);
      const v0b = h[0]!;
      const bb = h[1]!;
      // The two reflectors overlap only in the chunk rows: γ = v_{k+1}ᵀ v_k.
      let g = 0;
      for (let i = 0; i < mc; i++) g += buf[ok + i]! * buf[ok1 + i]!;
      // Trailing columns, six (then four, then one) at a time: one pass for both dot products, one
      // for both updates; twelve accumulators and the two reflectors fit the registers.
      // (H_{k+1} H_k a = a − d v_k − e v_{k+1} with d = β_k v_kᵀa, e = β_{k+1}(v_{k+1}ᵀa − d γ).)
      let j = k + 2;
      for (; j + 5 < q; j += 6) {
        const o0 = j * ld;
        const o1 = o0 + ld;
        const o2 = o1 + ld;
        const o3 = o2 + ld;
        const o4 = o3 + ld;
        const o5 = o4 + ld;
        const ra = j * q + k;
        let d0 = v0a * r[ra]!;
        let d1 = v0a * r[ra + q]!;
        let d2 = v0a * r[ra + 2 * q]!;
        let d3 = v0a * r[ra + 3 * q]!;
        let d4 = v0a * r[ra + 4 * q]!;
        let d5 = v0a * r[ra + 5 * q]!;
        let e0 = v0b * r[ra + 1]!;
        let e1 = v0b * r[ra + q + 1]!;
        let e2 = v0b * r[ra + 2 * q + 1]!;
        let e3 = v0b * r[ra + 3 * q + 1]!;
        let e4 = v0b * r[ra + 4 * q + 1]!;
        let e5 = v0b * r[ra + 5 * q + 1]!;
        for (let i = 0; i < mc; i++) {
          const u = buf[ok + i]!;
          const w = buf[ok1 + i]!;
          const a0 = buf[o0 + i]!;
          const a1 = buf[o1 + i]!;
          const a2 = buf[o2 + i]!;
          const a3 = buf[o3 + i]!;
          const a4 = buf[o4 + i]!;
          const a5 = buf[o5 + i]!;
          d0 += u * a0;
          d1 += u * a1;
          d2 += u * a2;
          d3 += u * a3;
          d4 += u * a4;
          d5 += u * a5;
          e0 += w * a0;
          e1 += w * a1;
          e2 += w * a2;
          e3 += w * a3;
          e4 += w * a4;
          e5 += w * a5;
        }
        d0 *= ba;
        d1 *= ba;
        d2 *= ba;
        d3 *= ba;
        d4 *= ba;
        d5 *= ba;
        e0 = bb * (e0 - d0 * g);
        e1 = bb * (e1 - d1 * g);
        e2 = bb * (e2 - d2 * g);
        e3 = bb * (e3 - d3 * g);
        e4 = bb * (e4 - d4 * g);
        e5 = bb * (e5 - d5 * g);
        r[ra] -= d0 * v0a;
        r[ra + q] -= d1 * v0a;
        r[ra + 2 * q] -= d2 * v0a;
        r[ra + 3 * q] -= d3 * v0a;
        r[ra + 4 * q] -= d4 * v0a;
        r[ra + 5 * q] -= d5 * v0a;
        r[ra + 1] -= e0 * v0b;
        r[ra + q + 1] -= e1 * v0b;
        r[ra + 2 * q + 1] -= e2 * v0b;
        r[ra + 3 * q + 1] -= e3 * v0b;
        r[ra + 4 * q + 1] -= e4 * v0b;
        r[ra + 5 * q + 1] -= e5 * v0b;
        for (let i = 0; i < mc; i++) {
          const u = buf[ok + i]!;
          const w = buf[ok1 + i]!;
          buf[o0 + i] -= d0 * u + e0 * w;
          buf[o1 + i] -= d1 * u + e1 * w;
          buf[o2 + i] -= d2 * u + e2 * w;
          buf[o3 + i] -= d3 * u + e3 * w;
          buf[o4 + i] -= d4 * u + e4 * w;
          buf[o5 + i] -= d5 * u + e5 * w;
        }
      }
      for (; j + 3 < q; j += 4) {
        const o0 = j * ld;
        const o1 = o0 + ld;
        const o2 = o1 + ld;
        const o3 = o2 + ld;
        const ra = j * q + k;
        let d0 = v0a * r[ra]!;
        let d1 = v0a * r[ra + q]!;
        let d2 = v0a * r[ra + 2 * q]!;
        let d3 = v0a * r[ra + 3 * q]!;
        let e0 = v0b * r[ra + 1]!;
        let e1 = v0b * r[ra + q + 1]!;
        let e2 = v0b * r[ra + 2 * q + 1]!;
        let e3 = v0b * r[ra + 3 * q + 1]!;
        for (let i = 0; i < mc; i++) {
          const u = buf[ok + i]!;
          const w = buf[ok1 + i]!;
          const a0 = buf[o0 + i]!;
          const a1 = buf[o1 + i]!;
          const a2 = buf[o2 + i]!;
          const a3 = buf[o3 + i]!;
          d0 += u * a0;
          d1 += u * a1;
          d2 += u * a2;
          d3 += u * a3;
          e0 += w * a0;
          e1 += w * a1;
          e2 += w * a2;
          e3 += w * a3;
        }
        d0 *= ba;
        d1 *= ba;
        d2 *= ba;
        d3 *= ba;
        e0 = bb * (e0 - d0 * g);
        e1 = bb * (e1 - d1 * g);
        e2 = bb * (e2 - d2 * g);
        e3 = bb * (e3 - d3 * g);
        r[ra] -= d0 * v0a;
        r[ra + q] -= d1 * v0a;
        r[ra + 2 * q] -= d2 * v0a;
        r[ra + 3 * q] -= d3 * v0a;
        r[ra + 1] -= e0 * v0b;
        r[ra + q + 1] -= e1 * v0b;
        r[ra + 2 * q + 1] -= e2 * v0b;
        r[ra + 3 * q + 1] -= e3 * v0b;
        for (let i = 0; i < mc; i++) {
          const u = buf[ok + i]!;
          const w = buf[ok1 + i]!;
          buf[o0 + i] -= d0 * u + e0 * w;
          buf[o1 + i] -= d1 * u + e1 * w;
          buf[o2 + i] -= d2 * u + e2 * w;
          buf[o3 + i] -= d3 * u + e3 * w;
        }
      }
      for (; j < q; j++) {
        const o0 = j * ld;
        const ra = j * q + k;
        let d0 = v0a * r[ra]!;
        let e0 = v0b * r[ra + 1]!;
        for (let i = 0; i < mc; i++) {
          const a0 = buf[o0 + i]!;
          d0 += buf[ok + i]! * a0;
          e0 += buf[ok1 + i]! * a0;
        }
        d0 *= ba;
        e0 = bb * (e0 - d0 * g);
        r[ra] -= d0 * v0a;
        r[ra + 1] -= e0 * v0b;
        for (let i = 0; i < mc; i++) buf[o0 + i] -= d0 * buf[ok + i]! + e0 * buf[ok1 + i]!;
      }
    }
    if (k < q) reflector(k, mc); // last column (y when q is odd): no trailing columns
  }
  return r;
}

/**
 * Rows per block of a large fit. The rows are cut into fixed blocks whose triangles are formed
 * independently and then folded in block order, so the answer does not depend on which thread
 * formed which block: one thread or several give the same bits.
 */
export const BLOCK_ROWS = 8192;

/** Blocks of n rows (at least one). */
export function blockCount(n: number, blockRows = BLOCK_ROWS): number {
  return Math.max(1, Math.ceil(n / blockRows));
}

/** Block b's triangle, written into `out` (q × q), which is returned. */
export function blockTriangle(x: Float64Array, y: Float64Array, n: number, p: number, b: number, out: Float64Array, blockRows = BLOCK_ROWS): Float64Array {
  out.fill(0);
  return triangleOfRows(x, y, n, p, b * blockRows, Math.min(n, (b + 1) * blockRows), out);
}

/**
 * The triangle of the stacked blocks, from their triangles (`blocks` holds k of them, q × q each, in
 * block order): each next triangle is folded into the running one as q more rows.
 */
export function foldTriangles(blocks: Float64Array, k: number, p: number): Float64Array {
  const q = p + 1;
  const qq = q * q;
  const r = blocks.slice(0, qq);
  for (let b = 1; b < k; b++) {
    const t = blocks.subarray(b * qq, (b + 1) * qq);
    // t is a q × q column-major matrix: its first p columns are the X part, its last the y part.
    triangleOfRows(t.subarray(0, p * q), t.subarray(p * q, qq), q, p, 0, q, r);
  }
  return r;
}

/** Block triangles one after another on this thread, then folded. */
export function sequentialBlockTriangle(x: Float64Array, y: Float64Array, n: number, p: number): Float64Array {
  const q = p + 1;
  const k = blockCount(n);
  const blocks = new Float64Array(k * q * q);
  for (let b = 0; b < k; b++) blockTriangle(x, y, n, p, b, blocks.subarray(b * q * q, (b + 1) * q * q));
  return foldTriangles(blocks, k, p);
}

/**
 * How the block triangles of a large fit are formed: on this thread by default; a host with threads
 * (the server) may install a runner that forms them on several, which must return the same result as
 * `sequentialBlockTriangle` (same blocks, same fold order).
 */
export type TriangleRunner = (x: Float64Array, y: Float64Array, n: number, p: number) => Float64Array;

// Kept on the global object: a bundler may load this module more than once in one process.
const installed = globalThis as { saltusTriangleRunner?: TriangleRunner };

export function setTriangleRunner(next: TriangleRunner | null): void {
  installed.saltusTriangleRunner = next ?? undefined;
}

/** R of [X y] (q × q) for a large fit, by the installed runner. */
export function largeTriangle(x: Float64Array, y: Float64Array, n: number, p: number): Float64Array {
  return (installed.saltusTriangleRunner ?? sequentialBlockTriangle)(x, y, n, p);
}

/**
 * A Float64Array of the given length that other threads can read without a copy (backed by a
 * SharedArrayBuffer) when the length is large and the host has shared memory; a plain one otherwise.
 */
export function largeColumnArray(length: number, sharedFrom = 1 << 16): Float64Array {
  if (length >= sharedFrom && typeof SharedArrayBuffer === 'function') {
    try {
      return new Float64Array(new SharedArrayBuffer(length * 8));
    } catch {
      // Shared memory refused (e.g. a page that is not cross-origin isolated): a plain array.
    }
  }
  return new Float64Array(length);
}
