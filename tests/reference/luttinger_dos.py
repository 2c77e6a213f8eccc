#!/usr/bin/python3
# luttinger_dos.py: independent SciPy value of the warped-band hole DOS masses,
# m_d^(3/2) = mean over the sphere of f^(-3/2), f = g1 -/+ sqrt(4 g2^2 + 12 (g3^2 - g2^2) s).
# Usage: luttinger_dos.py g1 g2 g3  -> prints "heavy light" in m_e.
import sys
import math
from scipy.integrate import dblquad


def factor(g1, g2, g3, sign, theta, phi):
    nx = math.sin(theta) * math.cos(phi)
    ny = math.sin(theta) * math.sin(phi)
    nz = math.cos(theta)
    s = nx * nx * ny * ny + ny * ny * nz * nz + nz * nz * nx * nx
    return g1 + sign * math.sqrt(4 * g2 * g2 + 12 * (g3 * g3 - g2 * g2) * s)


def dos_mass(g1, g2, g3, sign):
    # full sphere, theta in [0, pi], phi in [0, 2 pi], measure sin(theta)
    val, _ = dblquad(lambda phi, theta: factor(g1, g2, g3, sign, theta, phi) ** -1.5
                     * math.sin(theta),
                     0.0, math.pi, 0.0, 2.0 * math.pi, epsabs=1e-12, epsrel=1e-11)
    return (val / (4.0 * math.pi)) ** (2.0 / 3.0)


def main():
    g1, g2, g3 = (float(x) for x in sys.argv[1:4])
    print("%.12g %.12g" % (dos_mass(g1, g2, g3, -1.0), dos_mass(g1, g2, g3, +1.0)))


if __name__ == "__main__":
    main()
