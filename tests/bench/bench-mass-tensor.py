#!/usr/bin/python3
# bench-mass-tensor.py: benchmark of the mass-tensor operation on a 96^3 mesh
# of 4 smooth periodic bands, against a plain NumPy implementation of the same
# search (neighbour comparison with np.roll) and local quadratic fit
# (np.linalg.lstsq), with the file read time and the CLI's peak resident size.
# Usage: bench-mass-tensor.py BANDMASS_CLI BENCH_PROGRAM
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile
import time

import numpy as np

HBAR2_OVER_ME = 7.619964  # eV A^2, only to turn NumPy's Hessians into masses
N = 96
A = 5.65  # fcc lattice constant, Angstrom
LATTICE = 0.5 * A * np.array([[0.0, 1.0, 1.0], [1.0, 0.0, 1.0], [1.0, 1.0, 0.0]])
REPEATS = 5


def make_bands():
    """Four smooth periodic bands on the fractional mesh (C order)."""
    f = np.arange(N) / N
    x = 2 * np.pi * f
    c1, c2, c3 = np.cos(x)[:, None, None], np.cos(x)[None, :, None], np.cos(x)[None, None, :]
    s12 = np.cos(x[:, None, None] + x[None, :, None])
    bands = np.empty((4, N, N, N))
    bands[0] = -0.6 * (3 - c1 - c2 - c3) - 0.1 * (1 - s12)          # maximum at Gamma
    bands[1] = 1.2 + 0.9 * (3 - c1 - c2 - c3) + 0.05 * (1 - s12)    # minimum at Gamma
    c1b = np.cos(2 * x)[:, None, None]
    bands[2] = 2.0 + 0.4 * c1 + 0.3 * c1b + 0.5 * (2 - c2 - c3)     # minima off Gamma
    bands[3] = 3.0 + 0.3 * np.sin(x)[:, None, None] + 0.4 * (2 - c2 - c3) \
        + 0.2 * np.cos(x[None, :, None] - x[None, None, :])
    return bands


def numpy_extrema(e, recip):
    """Local extrema by comparison with all 26 periodic neighbours, then a
    quadratic fit over the 27-point neighbourhood in Cartesian k."""
    is_min = np.ones(e.shape, bool)
    is_max = np.ones(e.shape, bool)
    offsets = [(a, b, c) for a in (-1, 0, 1) for b in (-1, 0, 1) for c in (-1, 0, 1)]
    for o in offsets:
        if o == (0, 0, 0):
            continue
        r = np.roll(e, o, axis=(0, 1, 2))
        is_min &= e < r
        is_max &= e > r
    dk = (np.array(offsets, float) / N) @ recip          # 27 x 3, 1/Angstrom
    kx, ky, kz = dk.T
    design = np.column_stack([np.ones(27), kx, ky, kz, kx * kx / 2, ky * ky / 2, kz * kz / 2,
                              kx * ky, kx * kz, ky * kz])
    found = []
    for idx in np.argwhere(is_min | is_max):
        i, j, l = idx
        vals = np.array([e[(i + a) % N, (j + b) % N, (l + c) % N] for a, b, c in offsets])
        coef = np.linalg.lstsq(design, vals, rcond=None)[0]
        h = np.array([[coef[4], coef[7], coef[8]], [coef[7], coef[5], coef[9]],
                      [coef[8], coef[9], coef[6]]])
        w = np.linalg.eigvalsh(h)
        masses = HBAR2_OVER_ME / w[np.argsort(-np.abs(w))]
        found.append((e[i, j, l], "minimum" if is_min[i, j, l] else "maximum", masses))
    return found


def best_of(fn, repeats=REPEATS):
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


def main():
    cli, bench = sys.argv[1], sys.argv[2]
    tmp = tempfile.mkdtemp(prefix="bm-bench-")
    try:
        bands = make_bands()
        npy = os.path.join(tmp, "bands.npy")
        np.save(npy, bands)
        recip = 2 * np.pi * np.linalg.inv(LATTICE).T
        doc = os.path.join(tmp, "grid.json")
        with open(doc, "w") as f:
            json.dump({"format": "bandmass-grid-1",
                       "lattice_vectors_angstrom": LATTICE.tolist(),
                       "mesh": [N, N, N], "energies_ev": "bands.npy",
                       "band_names": ["vb", "cb", "valley", "shifted"]}, f)
        data_mb = bands.nbytes / 1e6
        size = os.path.getsize(npy)

        # plain file read: the .npy bytes into one preallocated buffer
        buf = bytearray(size)

        def plain_read():
            with open(npy, "rb", buffering=0) as f:
                f.readinto(buf)
        t_read = best_of(plain_read)
        t_npload = best_of(lambda: np.load(npy))
        # the same read as a process of its own, as the CLI runs: cat to /dev/null
        t_cat = best_of(lambda: subprocess.run(["/bin/cat", npy], check=True,
                                               stdout=subprocess.DEVNULL))

        # the CLI, one process per band, extremum "all"
        requests = []
        for b in range(4):
            r = os.path.join(tmp, "req%d.json" % b)
            with open(r, "w") as f:
                json.dump({"grid": doc, "band": b, "extremum": "all"}, f)
            requests.append(r)

        def cli_run(b):
            subprocess.run([cli, "call", "mass-tensor", "--input", requests[b], "--compact"],
                           check=True, stdout=subprocess.DEVNULL)
        t_cli = [best_of(lambda b=b: cli_run(b)) for b in range(4)]

        # peak resident size of one CLI run
        tv = subprocess.run(["/usr/bin/time", "-v", cli, "call", "mass-tensor", "--input",
                             requests[1], "--compact"], capture_output=True, text=True,
                            check=True)
        rss_kb = int(re.search(r"Maximum resident set size \(kbytes\): (\d+)", tv.stderr)[1])
        cli_out = json.loads(tv.stdout)

        # in-process timing of the operation (load once, each band)
        runs = [json.loads(subprocess.run([bench, doc], capture_output=True, text=True,
                                          check=True).stdout) for _ in range(REPEATS)]
        t_c_compute = [min(r["bands"][b]["seconds"] for r in runs) for b in range(4)]
        t_c_load = min(r["load_s"] for r in runs)

        # NumPy reference on the same data
        t_np = []
        np_found = []
        for b in range(4):
            t_np.append(best_of(lambda b=b: numpy_extrema(bands[b], recip)))
            np_found.append(numpy_extrema(bands[b], recip))

        print("bandmass mass-tensor benchmark: %d^3 mesh, 4 bands, %.1f MB of band data"
              % (N, data_mb))
        print("%-34s %10.4f s" % ("plain file read (readinto)", t_read))
        print("%-34s %10.4f s" % ("numpy.load", t_npload))
        print("%-34s %10.4f s" % ("plain file read as a process (cat)", t_cat))
        print("%-34s %10.4f s" % ("grid document load (C reader)", t_c_load))
        print("%-6s %8s %8s %12s %12s %8s %12s" % ("band", "extrema", "numpy", "numpy_s",
                                                   "operation_s", "speedup", "cli_run_s"))
        for b in range(4):
            n_c = len(runs[0]["bands"][b]["response"]["extrema"])
            print("%-6d %8d %8d %12.4f %12.4f %8.1f %12.4f" % (
                b, n_c, len(np_found[b]), t_np[b], t_c_compute[b], t_np[b] / t_c_compute[b],
                t_cli[b]))
        tot_np, tot_c = sum(t_np), sum(t_c_compute)
        print("computation: numpy %.4f s, operation %.4f s, ratio %.1fx (target >= 10x)"
              % (tot_np, tot_c, tot_np / tot_c))
        t_cli_mean = sum(t_cli) / 4
        print("CLI run per band: mean %.4f s = %.2fx the file read as a process (cat), "
              "%.1fx the in-process read (target <= 3x)"
              % (t_cli_mean, t_cli_mean / t_cat, t_cli_mean / t_read))
        print("CLI peak resident size: %.1f MB = %.2fx the band data (target <= 1.5x)"
              % (rss_kb * 1024 / 1e6, rss_kb * 1024 / bands.nbytes))
        # agreement of the lowest conduction-band minimum
        ext_c = [x for x in cli_out["extrema"] if x["kind"] == "minimum"]
        ext_n = [x for x in np_found[1] if x[1] == "minimum"]
        if ext_c and ext_n:
            print("band 1 lowest minimum masses: operation %s, numpy 3x3x3 fit %s" % (
                [round(m, 4) for m in ext_c[0]["principal_masses_me"]],
                [round(float(m), 4) for m in ext_n[0][2]]))
    finally:
        shutil.rmtree(tmp)


if __name__ == "__main__":
    main()
