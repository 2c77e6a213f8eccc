# check_scipy.py: compares the core (through carriers-probe) with independent
# mpmath/SciPy computations: F_j over a (j, eta) grid, the inverse of F_1/2,
# and charge-neutrality Fermi levels over a grid of cases.
# Usage: /usr/bin/python3 check_scipy.py PATH/TO/carriers-probe
import itertools
import math
import os
import subprocess
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import carriers_ref as ref  # noqa: E402


def ask(probe, lines):
    out = subprocess.run([probe], input="\n".join(lines) + "\n", capture_output=True,
                         text=True, check=True).stdout.split("\n")
    return [o for o in out if o]


def main():
    probe = sys.argv[1]
    failures = 0
    ref.use_constants(*map(float, ask(probe, ["constants"])[0].split()))

    # 1. F_j against mpmath quadrature at 30 digits: relative 2e-14.
    js = [-0.5, 0.0, 0.5, 1.0, 1.5, 2.0]
    etas = [-200.0, -40.0, -20.0, -5.0, -1.5, -1.0, -0.3, 0.0, 0.7, 2.0, 5.0, 12.0,
            30.0, 55.0, 200.0]
    grid = list(itertools.product(js, etas))
    got = ask(probe, ["fd %r %r" % g for g in grid])
    worst = 0.0
    for (j, eta), g in zip(grid, got):
        want = float(ref.fd_mpmath(j, eta))
        err = abs(float(g) / want - 1.0)
        worst = max(worst, err)
        if err > 2e-14:
            print("FAIL F_%g(%g): core %s, mpmath %.17g (rel %.2e)" % (j, eta, g, want, err))
            failures += 1
        # SciPy quad as a second, independent check at its own accuracy
        if abs(float(g) / ref.fd_scipy(j, eta) - 1.0) > 1e-10:
            print("FAIL F_%g(%g) vs scipy quad" % (j, eta))
            failures += 1
    print("F_j grid: %d points, worst relative deviation from mpmath %.2e" % (len(grid), worst))

    # 2. inverse of F_1/2: the eta back from mpmath's F_1/2(eta).
    inv_etas = [-60.0, -8.0, -1.0, 0.0, 0.5, 3.0, 20.0, 400.0]
    vals = [float(ref.fd_mpmath(0.5, e)) for e in inv_etas]
    got = ask(probe, ["inv %.17g" % v for v in vals])
    for e, g in zip(inv_etas, got):
        if abs(float(g) - e) > 1e-12 * max(1.0, abs(e)):
            print("FAIL inverse F_1/2 at eta %g: %s" % (e, g))
            failures += 1
    print("inverse F_1/2: %d points" % len(inv_etas))

    # 3. neutrality: Si-like (Eg from Varshni, Thurmond 1975), GaAs-like; n, p,
    #    compensated, degenerate; Fermi-Dirac and Boltzmann.
    cases = []
    for t in [20.0, 77.0, 300.0, 600.0, 1200.0]:
        eg = 1.170 - 4.73e-4 * t * t / (t + 636.0)
        for nd, na in [(1e12, 0.0), (1e16, 1e14), (1e19, 1e18), (1e20, 0.0),
                       (1e15, 1e17), (1e17, 0.99e17)]:
            for stats in (0, 1):
                cases.append((t, eg, 1.08, 1.04, stats, nd, 0.045, na, 0.045))
    for t in [4.0, 300.0]:
        cases.append((t, 1.519 - 5.405e-4 * t * t / (t + 204.0), 0.067, 0.38, 0,
                      5e18, 0.0058, 1e16, 0.026))
    got = ask(probe, ["neutral " + " ".join("%r" % x for x in c) for c in cases])
    worst_ef = 0.0
    for c, g in zip(cases, got):
        ef, n, p, dp, am = map(float, g.split())
        want = ref.neutral(*c)
        d_ef = abs(ef - want[0])
        worst_ef = max(worst_ef, d_ef)
        bad = d_ef > 1e-9
        for a, b in zip((n, p, dp, am), want[1:]):
            if b > 1e-250 and abs(a / b - 1.0) > 1e-7:
                bad = True
        if bad:
            print("FAIL neutral %r: core %s, scipy %r" % (c, g, want))
            failures += 1
    print("neutrality: %d cases, worst |EF - EF_scipy| = %.2e eV" % (len(cases), worst_ef))
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
