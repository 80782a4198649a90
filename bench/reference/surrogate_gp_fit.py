"""Reference for bench/cases/surrogate.ts: scikit-learn GaussianProcessRegressor on the same n x d data
(a deterministic formula, reproduced here), kernel ConstantKernel * Matern(nu=2.5, ARD) + WhiteKernel with
the same bounds and normalize_y=True, 2 optimiser starts (n_restarts_optimizer=1).
Prints one JSON line {"seconds": median, "logMarginalLikelihood": ..., "noiseVariance": ...}.
Usage: surrogate_gp_fit.py n d repeats"""
import json
import math
import sys
import time

import numpy as np
from sklearn.gaussian_process import GaussianProcessRegressor
from sklearn.gaussian_process.kernels import ConstantKernel, Matern, WhiteKernel


def frac(v):
    return v - math.floor(v)


def data(n, d):
    x = np.empty((n, d))
    for i in range(n):
        for j in range(d):
            x[i, j] = 2 * frac(math.sin((i + 1) * 12.9898 + (j + 1) * 78.233) * 43758.5453) - 1
    y = np.empty(n)
    for i in range(n):
        r = x[i]
        s = math.sin(3 * r[0]) + r[1] ** 2
        if d > 3:
            s += -0.5 * r[2] * r[3]
        if d > 4:
            s += 0.2 * math.cos(5 * r[4])
        if d > 5:
            s += 0.1 * r[5]
        s += 0.1 * (frac(math.sin((i + 1) * 7.13) * 1000) - 0.5)
        y[i] = s
    return x, y


def main():
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 500
    d = int(sys.argv[2]) if len(sys.argv) > 2 else 6
    repeats = int(sys.argv[3]) if len(sys.argv) > 3 else 1
    x, y = data(n, d)
    times = []
    gp = None
    for _ in range(repeats):
        kernel = ConstantKernel(1.0, (1e-3, 1e4)) * Matern(length_scale=[0.7] * d, length_scale_bounds=(1e-2, 1e2), nu=2.5) + WhiteKernel(0.05, (1e-6, 10.0))
        gp = GaussianProcessRegressor(kernel=kernel, normalize_y=True, n_restarts_optimizer=1, random_state=1)
        t0 = time.perf_counter()
        gp.fit(x, y)
        times.append(time.perf_counter() - t0)
    times.sort()
    k = gp.kernel_
    print(json.dumps({
        "seconds": times[len(times) // 2],
        "logMarginalLikelihood": round(float(gp.log_marginal_likelihood_value_), 4),
        "noiseVariance": float(k.k2.noise_level),
    }))


if __name__ == "__main__":
    main()
