"""Reference for bench/cases/analysis.ts: OLS with per-term tests on 100,000 rows x 30 terms with
statsmodels, and numpy's lstsq on the same matrix. The data come from the same fixed formula as the
TypeScript case. Prints one JSON line {"seconds": statsmodels median, "lstsq_seconds": ..., "cpu_seconds": ..., ...}
(wall-clock medians, and processor-time medians for comparison under load).

With the argument `records`, both start from the same data as 100,000 records (one dict per run, as the
TypeScript API receives rows): a pandas DataFrame is built from the records, then statsmodels OLS and
lstsq run on its columns."""
import json
import sys
import time

import numpy as np
import pandas as pd
import statsmodels.api as sm

N = 100_000
P = 29


def make_data():
    i = np.arange(1, N + 1, dtype=np.float64)
    X = np.empty((N, P + 1))
    X[:, 0] = 1.0
    y = 0.1 * np.sin(12.9898 * i)
    for j in range(1, P + 1):
        x = np.sin(0.001 * i * (j + 1.3) + j)
        X[:, j] = x
        y += ((j % 7) - 3) / 10 * x
    return X, y


def statsmodels_fit(X, y):
    res = sm.OLS(y, X).fit()
    # The same answer as the TypeScript analysis: coefficients, SEs, t, p, 95% intervals,
    # overall F and each term's partial F (t^2 for single-column terms) with its p-value.
    out = (res.params, res.bse, res.tvalues, res.pvalues, res.conf_int(0.05), res.fvalue, res.f_pvalue,
           res.rsquared, res.rsquared_adj, res.ssr, res.ess, res.tvalues ** 2, res.pvalues)
    return res, out


def lstsq_fit(X, y):
    return np.linalg.lstsq(X, y, rcond=None)


def median_time(fn, repeats=5, warmup=1):
    """Median wall seconds and median processor seconds (all threads of the process, BLAS included)."""
    for _ in range(warmup):
        fn()
    times = []
    cpu = []
    for _ in range(repeats):
        c0 = time.process_time()
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
        cpu.append(time.process_time() - c0)
    return float(np.median(times)), float(np.median(cpu))


def from_records(records, columns):
    frame = pd.DataFrame.from_records(records)
    X = np.empty((len(frame), len(columns) + 1))
    X[:, 0] = 1.0
    X[:, 1:] = frame[columns].to_numpy(dtype=np.float64)
    return X, frame["y"].to_numpy(dtype=np.float64)


def main_records():
    X, y = make_data()
    columns = [f"x{j}" for j in range(1, P + 1)]
    records = [dict(zip(columns + ["y"], [*row[1:], yi])) for row, yi in zip(X.tolist(), y.tolist())]
    sm_seconds, sm_cpu = median_time(lambda: statsmodels_fit(*from_records(records, columns)))
    lstsq_seconds, lstsq_cpu = median_time(lambda: lstsq_fit(*from_records(records, columns)))
    res, _ = statsmodels_fit(*from_records(records, columns))
    print(json.dumps({"seconds": sm_seconds, "lstsq_seconds": lstsq_seconds,
                      "cpu_seconds": round(sm_cpu, 4), "lstsq_cpu_seconds": round(lstsq_cpu, 4),
                      "rsquared": float(res.rsquared), "b1": float(res.params[1])}))


def main():
    if sys.argv[1:] == ["records"]:
        main_records()
        return
    X, y = make_data()
    sm_seconds, sm_cpu = median_time(lambda: statsmodels_fit(X, y))
    lstsq_seconds, lstsq_cpu = median_time(lambda: lstsq_fit(X, y))
    res, _ = statsmodels_fit(X, y)
    print(json.dumps({"seconds": sm_seconds, "lstsq_seconds": lstsq_seconds,
                      "cpu_seconds": round(sm_cpu, 4), "lstsq_cpu_seconds": round(lstsq_cpu, 4),
                      "rsquared": float(res.rsquared), "b1": float(res.params[1])}))


if __name__ == "__main__":
    main()
