#!/usr/bin/python3
# fits_ref.py: independent SciPy fits (scipy.optimize.curve_fit) of the models
# bandmass fits to measurements. One JSON object on argv[1]:
#   {"model": "lk", "x": T, "y": A, "sigma": null|[...], "field_t": B, "harmonic": p}
#       A = A0 X / sinh X, X = 2 pi^2 p k_B m T / (hbar e B)      -> "m sm A0 sA0"
#   {"model": "resonance", "x": B, "y": f, "sigma": ...}  f = s B   -> "m sm"
#   {"model": "heat", "x": T, "y": C, "sigma": ...}  C / T = g + b T^2 (sigma of C)
#                                                                   -> "g sg b sb"
# Standard errors: the covariance scaled by the residual variance without
# sigma (absolute_sigma=False), absolute with sigma. Constants: scipy.constants
# (CODATA), or "constant" in the request (the caller's own K/T or GHz/T, so that
# only the fit is compared: CODATA editions differ by about 1e-6).
import json
import math
import sys

import numpy as np
from scipy import constants as c
from scipy.optimize import curve_fit

LK = 2 * math.pi ** 2 * c.k * c.m_e / (c.hbar * c.e)
GHZ_PER_T = c.e / (2 * math.pi * c.m_e) * 1e-9


def main():
    q = json.loads(sys.argv[1])
    x = np.array(q["x"], float)
    y = np.array(q["y"], float)
    sigma = q.get("sigma")
    kw = {"ftol": 1e-14, "xtol": 1e-14, "maxfev": 20000}
    if sigma is not None:
        kw.update(sigma=np.array(sigma, float), absolute_sigma=True)
    if q["model"] == "lk":
        k = q.get("constant", LK) * q["harmonic"] / q["field_t"]

        def model(t, a0, m):
            xx = k * m * t
            return a0 * xx / np.sinh(xx)
        p, cov = curve_fit(model, x, y, p0=q.get("p0", [y[0], 0.5]), **kw)
        print("%.15g %.15g %.15g %.15g" % (p[1], math.sqrt(cov[1, 1]), p[0],
                                           math.sqrt(cov[0, 0])))
    elif q["model"] == "resonance":
        ghz = q.get("constant", GHZ_PER_T)
        p, cov = curve_fit(lambda b, s: s * b, x, y, p0=[ghz], **kw)
        m = ghz / p[0]
        print("%.15g %.15g" % (m, m * math.sqrt(cov[0, 0]) / p[0]))
    elif q["model"] == "heat":
        if sigma is not None:
            kw["sigma"] = kw["sigma"] / x
        p, cov = curve_fit(lambda t, g, b: g + b * t ** 2, x, y / x, p0=[1.0, 0.1], **kw)
        print("%.15g %.15g %.15g %.15g" % (p[0], math.sqrt(cov[0, 0]), p[1],
                                           math.sqrt(cov[1, 1])))


if __name__ == "__main__":
    main()
