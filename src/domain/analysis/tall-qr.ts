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
  const q = p + 1;
  const ld = chunkRows;
  const buf = new Float64Array(ld * q);
  const r = new Float64Array(q * q);
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

  for (let i0 = 0; i0 < n; i0 += ld) {
    const mc = Math.min(ld, n - i0);
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
