"""Writes the scikit-learn cross-check used by test/reference/surrogate/scikit-learn-gp.test.ts:
GaussianProcessRegressor on a small deterministic data set (the formula of surrogate_gp_fit.py), with fixed
hyperparameters (log marginal likelihood, predictive mean and sd at test points; Matern nu=2.5 and RBF
kernels) and with hyperparameters fitted (Matern nu=2.5 ARD + WhiteKernel, normalize_y, 8 restarts).
Usage: surrogate_gp_fixture.py > test/reference/surrogate/scikit-learn-gp.json"""
import json
import sys

import numpy as np
import sklearn
from sklearn.gaussian_process import GaussianProcessRegressor
from sklearn.gaussian_process.kernels import RBF, ConstantKernel, Matern, WhiteKernel

sys.path.insert(0, __file__.rsplit("/", 1)[0])
from surrogate_gp_fit import data  # noqa: E402

x, y = data(30, 3)
xt, _ = data(35, 3)
xt = xt[30:]
ls = [0.6, 1.1, 0.8]
sf2 = 1.7
sn2 = 0.02
fixed = {}
for name, base in (("matern52", Matern(length_scale=ls, nu=2.5, length_scale_bounds="fixed")), ("squared-exponential", RBF(length_scale=ls, length_scale_bounds="fixed"))):
    kernel = ConstantKernel(sf2, constant_value_bounds="fixed") * base
    gp = GaussianProcessRegressor(kernel=kernel, alpha=sn2, optimizer=None, normalize_y=False).fit(x, y)
    mean, sd = gp.predict(xt, return_std=True)
    fixed[name] = {"logMarginalLikelihood": float(gp.log_marginal_likelihood_value_), "mean": mean.tolist(), "sd": sd.tolist()}

kernel = ConstantKernel(1.0, (1e-3, 1e4)) * Matern(length_scale=[0.7] * 3, length_scale_bounds=(1e-2, 1e2), nu=2.5) + WhiteKernel(0.05, (1e-6, 10.0))
gp = GaussianProcessRegressor(kernel=kernel, normalize_y=True, n_restarts_optimizer=8, random_state=0).fit(x, y)
fitted = {"logMarginalLikelihoodStandardised": float(gp.log_marginal_likelihood_value_), "kernel": str(gp.kernel_)}

print(json.dumps({
    "generator": "bench/reference/surrogate_gp_fixture.py",
    "library": "scikit-learn " + sklearn.__version__ + ", numpy " + np.__version__,
    "x": x.tolist(), "y": y.tolist(), "testPoints": xt.tolist(),
    "fixedHyperparameters": {"lengthScales": ls, "signalVariance": sf2, "noiseVariance": sn2},
    "fixed": fixed, "fitted": fitted,
}, indent=1))
