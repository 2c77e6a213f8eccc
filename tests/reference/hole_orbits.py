#!/usr/bin/python3
# hole_orbits.py: independent SciPy route to the cyclotron orbits of the warped
# hole bands E(k) = g1 k^2 -/+ sqrt(4 g2^2 k^4 + 12 (g3^2 - g2^2)(kx^2 ky^2 + ...))
# (units hbar^2 / 2 m_e = 1, unit hole energy). For each band: the central
# mass (1 / 2 pi) int dphi / f(phi) by quad, and the extremal sections k . b =
# kappa found by a scan of the area (brentq on each ray from the section's
# centre, quad over the angle) refined by minimize_scalar.
# Usage: hole_orbits.py g1 g2 g3 bx by bz
#   -> one line per band: "heavy|light central_mass kappa:area:mass ..."
import math
import sys

import numpy as np
from scipy.integrate import quad
from scipy.optimize import brentq, minimize_scalar


def energy(g, k, sign):
    g1, g2, g3 = g
    k2 = k @ k
    s = k[0] ** 2 * k[1] ** 2 + k[1] ** 2 * k[2] ** 2 + k[2] ** 2 * k[0] ** 2
    return g1 * k2 + sign * math.sqrt(max(4 * g2 * g2 * k2 * k2 + 12 * (g3 * g3 - g2 * g2) * s, 0.0))


def frame(b):
    b = np.asarray(b, float) / np.linalg.norm(b)
    t = np.eye(3)[int(np.argmin(np.abs(b)))]
    e1 = t - (t @ b) * b
    e1 /= np.linalg.norm(e1)
    return b, e1, np.cross(b, e1)


def area(g, sign, b, e1, e2, kappa, rho_hi):
    def rho(phi):
        u = math.cos(phi) * e1 + math.sin(phi) * e2
        return brentq(lambda r: energy(g, kappa * b + r * u, sign) - 1.0, 0.0, rho_hi,
                      xtol=1e-15, rtol=1e-14)
    val, _ = quad(lambda p: 0.5 * rho(p) ** 2, 0.0, 2 * math.pi, limit=200,
                  epsabs=1e-13, epsrel=1e-12)
    return val


def main():
    g = tuple(float(x) for x in sys.argv[1:4])
    b, e1, e2 = frame([float(x) for x in sys.argv[4:7]])
    g1, g2, g3 = g
    for name, sign in (("heavy", -1.0), ("light", +1.0)):
        fmin = g1 - 2 * max(abs(g2), abs(g3)) if sign < 0 else g1
        rho_hi = 2.0 / math.sqrt(fmin)
        fb = energy(g, b, sign)
        kmax = 1.0 / math.sqrt(fb)

        def f_of(phi):
            u = math.cos(phi) * e1 + math.sin(phi) * e2
            return energy(g, u, sign)
        central, _ = quad(lambda p: 1.0 / f_of(p), 0.0, 2 * math.pi, limit=200,
                          epsabs=1e-14, epsrel=1e-13)
        central /= 2 * math.pi
        ks = np.linspace(0.0, kmax, 60, endpoint=False)
        a = [area(g, sign, b, e1, e2, k, rho_hi) for k in ks]
        out = []
        for i in range(1, len(ks) - 1):
            if (a[i] - a[i - 1]) * (a[i + 1] - a[i]) < 0:
                s = -1.0 if a[i] > a[i - 1] else 1.0
                r = minimize_scalar(lambda k: s * area(g, sign, b, e1, e2, k, rho_hi),
                                    bracket=(ks[i - 1], ks[i], ks[i + 1]),
                                    options={"xtol": 1e-10})
                ar = area(g, sign, b, e1, e2, r.x, rho_hi)
                out.append("%.12g:%.12g:%.12g" % (r.x, ar, ar / math.pi))
        print(name, "%.12g" % central, " ".join(out))


if __name__ == "__main__":
    main()
