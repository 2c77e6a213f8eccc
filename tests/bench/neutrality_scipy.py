# neutrality_scipy.py: the same neutrality physics in SciPy (brentq on the
# charge balance, F_1/2 by scipy.integrate.quad), timed on a subsample of the
# 1000 x 1000 map and scaled, beside the C benchmark's figure.
# Usage: /usr/bin/python3 neutrality_scipy.py PATH/TO/bench-neutrality [NSAMPLE]
import math
import os
import re
import subprocess
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "reference"))
import carriers_ref as ref  # noqa: E402


def main():
    bench = sys.argv[1]
    nsample = int(sys.argv[2]) if len(sys.argv) > 2 else 200
    # the map of bench-neutrality.c: T log-spaced 1..1500 K, N_D 1e10..1e21,
    # acceptor 1e14, both 45 meV; sampled on a coarse sub-grid
    side = int(math.sqrt(nsample))
    cases = []
    for i in range(side):
        t = math.exp(math.log(1500.0) * (i + 0.5) / side)
        # below ~10 K the quad-based F_1/2 underflows inside brentq's bracket,
        # so the SciPy timing uses 10..1500 K (the C map covers 1..1500 K)
        t = max(t, 10.0)
        eg = 1.170 - 4.73e-4 * t * t / (t + 636.0)
        for j in range(side):
            nd = math.exp(math.log(1e10) + (math.log(1e21) - math.log(1e10)) * (j + 0.5) / side)
            cases.append((t, eg, 1.08, 1.04, 0, nd, 0.045, 1e14, 0.045))
    t0 = time.perf_counter()
    for c in cases:
        ref.neutral(*c)
    py = (time.perf_counter() - t0) / len(cases)

    out = subprocess.run([bench], capture_output=True, text=True, check=True).stdout
    print(out, end="")
    m = re.search(r"Fermi-Dirac only\): ([0-9.]+) s, ([0-9.]+) ns per solve", out)
    c_ns = float(m.group(2))
    print("SciPy brentq + quad F_1/2: %d solves, %.3f ms per solve, scaled to 1e6 solves: "
          "%.0f s" % (len(cases), py * 1e3, py * 1e6))
    print("C core: %.0f ns per solve; ratio SciPy / C = %.0f" % (c_ns, py * 1e9 / c_ns))
    return 0 if py * 1e9 / c_ns >= 100 else 1


if __name__ == "__main__":
    sys.exit(main())
