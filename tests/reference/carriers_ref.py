# carriers_ref.py: independent SciPy/mpmath implementations of the Fermi-Dirac
# integrals and of charge neutrality, used only by the comparison scripts.
import math

import numpy as np
from scipy import integrate, optimize, special

# CODATA 2018 (scipy.constants) by default; use_constants() switches to the
# set the core was built with (GSL's headers), so that a comparison tests the
# numerics rather than a CODATA revision (they differ by ~1e-6 relative).
from scipy.constants import h, k as kB, m_e, e as qe

KB_EV = kB / qe


def use_constants(h_, kb_, me_, e_):
    global h, kB, m_e, qe, KB_EV
    h, kB, m_e, qe = h_, kb_, me_, e_
    KB_EV = kB / qe


def fd_scipy(j, eta):
    """F_j(eta) = 1/Gamma(j+1) int_0^inf x^j / (1 + exp(x - eta)) dx, with x = t^2
    (so j = -1/2 has no endpoint singularity), by scipy.integrate.quad."""
    if eta < -30.0:
        # alternating series sum (-1)^(k+1) e^(k eta) / k^(j+1) (DLMF 25.12.16)
        z = math.exp(eta)
        return sum((-1) ** (k + 1) * z ** k / k ** (j + 1) for k in range(1, 6))

    def f(t):
        return 2.0 * t ** (2 * j + 1) * special.expit(eta - t * t)
    pts = [math.sqrt(eta)] if eta > 0 else None
    top = math.sqrt(max(eta, 0.0) + 60.0)
    val, _ = integrate.quad(f, 0.0, top, points=pts, epsabs=0.0, epsrel=1e-13,
                            limit=400)
    return val / math.gamma(j + 1)


def fd_mpmath(j, eta, dps=30):
    import mpmath as mp
    mp.mp.dps = dps
    j = mp.mpf(j)
    eta = mp.mpf(eta)
    if eta < -1:
        # quadrature loses digits on the tiny integrand: use the alternating
        # series sum (-1)^(k+1) e^(k eta) / k^(j+1) (DLMF 25.12.16) at 30 digits
        z = mp.exp(eta)
        return mp.nsum(lambda k: (-1) ** (k + 1) * z ** k / k ** (j + 1), [1, mp.inf])
    f = lambda t: 2 * t ** (2 * j + 1) / (1 + mp.exp(t * t - eta))
    if eta > 0:
        r = mp.sqrt(eta)
        pts = [0, r / 2, r, r + 2, r + 6, mp.inf]
    else:
        pts = [0, 2, 6, mp.inf]
    return mp.quad(f, pts) / mp.gamma(j + 1)


def effective_dos(mass, t):
    a = 2.0 * math.pi * mass * m_e * kB * t / h ** 2
    return 2.0 * a ** 1.5 * 1e-6


def neutral(t, eg, me, mh, boltzmann, nd, ed, na, ea, gd=2.0, ga=4.0):
    """Fermi level from p + N_D+ - n - N_A- = 0 by scipy.optimize.brentq."""
    kt = KB_EV * t
    nc, nv = effective_dos(me, t), effective_dos(mh, t)
    F = (lambda x: math.exp(x)) if boltzmann else (lambda x: fd_scipy(0.5, x))

    def parts(ef):
        n = nc * F((ef - eg) / kt)
        p = nv * F(-ef / kt)
        dp = nd * special.expit(-((ef - (eg - ed)) / kt + math.log(gd)))
        am = na * special.expit(-((ea - ef) / kt + math.log(ga)))
        return n, p, dp, am

    def resid(ef):
        n, p, dp, am = parts(ef)
        return (p + dp - n - am) / (p + dp + n + am)

    lo, hi = min(0.0, eg) - 0.5, max(0.0, eg) + 0.5
    while resid(lo) <= 0:
        lo -= 1.0
    while resid(hi) >= 0:
        hi += 1.0
    ef = optimize.brentq(resid, lo, hi, xtol=1e-15, rtol=1e-15, maxiter=500)
    return (ef,) + parts(ef)
