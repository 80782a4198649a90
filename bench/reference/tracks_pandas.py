"""Reference for bench/cases/tracks.ts: pandas read_csv of a track CSV, then a vectorised numpy
segmentation of flight phases (threshold above the ground level, parabola and line fits per flight
from segment sums). Prints one JSON line {"seconds": median, "hops": n}."""
import json
import sys
import time

import numpy as np
import pandas as pd

G = 9.80665


def segment(t, x, y, z):
    # Ground level and noise from the lowest samples (same ideas as the TypeScript code).
    stride = max(1, len(z) // 200_000)
    zs = np.sort(z[::stride])
    low = zs[int(0.02 * (len(zs) - 1))]
    r = z[1:-1] - 0.5 * (z[:-2] + z[2:])
    sub = r[::stride]
    sigma = np.median(np.abs(sub[z[1:-1][::stride] <= low + 0.008])) / 0.6745 / np.sqrt(1.5)
    band = max(8 * sigma, 0.001)
    ground = np.median(zs[zs <= low + band])
    enter = max(6 * sigma, 0.002)
    above = z > ground + enter
    edges = np.diff(above.astype(np.int8))
    starts = np.flatnonzero(edges == 1) + 1
    ends = np.flatnonzero(edges == -1) + 1
    if above[0]:
        ends = ends[1:]
    if above[-1]:
        starts = starts[:-1]
    n = min(len(starts), len(ends))
    starts, ends = starts[:n], ends[:n]
    # Short excursions (noise spikes) cannot carry a parabola fit.
    long_enough = ends - starts >= 5
    starts, ends = starts[long_enough], ends[long_enough]
    # Per-segment sums with reduceat: z = a + b tau + c tau^2 with tau = t - t_start.
    seg_id = np.zeros(len(z), dtype=np.int64)
    seg_id[starts] += 1
    seg_id[ends[ends < len(z)]] -= 1
    inside = np.cumsum(seg_id) > 0
    idx = np.flatnonzero(inside)
    t0 = np.repeat(t[starts], ends - starts)
    tau = t[idx] - t0
    zi = z[idx]
    offsets = np.concatenate(([0], np.cumsum(ends - starts)[:-1]))
    tau2 = tau * tau
    sums = [np.add.reduceat(v, offsets) for v in (np.ones_like(tau), tau, tau2, tau2 * tau, tau2 * tau2, zi, tau * zi, tau2 * zi,
                                                    x[idx], tau * x[idx], y[idx], tau * y[idx])]
    s0, s1, s2, s3, s4, sz, stz, st2z, sx, stx, sy, sty = sums
    normal = np.stack([np.stack([s0, s1, s2], -1), np.stack([s1, s2, s3], -1), np.stack([s2, s3, s4], -1)], -2)
    coef = np.linalg.solve(normal, np.stack([sz, stz, st2z], -1)[..., None])[..., 0]
    a, b, c = coef[:, 0], coef[:, 1], coef[:, 2]
    det = s0 * s2 - s1 * s1
    qx = (s0 * stx - s1 * sx) / det
    qy = (s0 * sty - s1 * sy) / det
    disc = np.sqrt(np.maximum(b * b - 4 * c * (a - ground), 0))
    r1 = (-b + disc) / (2 * c)
    r2 = (-b - disc) / (2 * c)
    flight = np.abs(r2 - r1)
    apex = a - b * b / (4 * c) - ground
    hop_length = np.hypot(qx, qy) * flight
    return len(a), float(np.mean(apex)), float(np.mean(-2 * c)), float(np.mean(hop_length))


def once(path):
    df = pd.read_csv(path, usecols=['t', 'x', 'y', 'z'], dtype=np.float64)
    return segment(df['t'].to_numpy(), df['x'].to_numpy(), df['y'].to_numpy(), df['z'].to_numpy())


def main():
    path = sys.argv[1]
    repeats = int(sys.argv[2]) if len(sys.argv) > 2 else 3
    once(path)
    times = []
    cpu = []
    result = None
    for _ in range(repeats):
        start = time.perf_counter()
        start_cpu = time.process_time()
        result = once(path)
        times.append(time.perf_counter() - start)
        cpu.append(time.process_time() - start_cpu)
    hops, mean_apex, mean_g, _ = result
    print(json.dumps({"seconds": float(np.median(times)), "hops": hops, "meanApexM": round(mean_apex, 5),
                      "meanGravity": round(mean_g, 4), "cpuSeconds": round(float(np.median(cpu)), 3)}))


if __name__ == '__main__':
    main()
