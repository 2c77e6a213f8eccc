#!/usr/bin/python3
# bench-table.py: mass-tensor on a noisy 3D k-table (15^3 = 3375 points, three
# masses, 2 meV noise) against a plain NumPy implementation of the same
# computation at the extremum bandmass reports: the window grown from 30
# points by 1.25 while the F test of a quartic finds nothing at 1 % (growth
# stops at the second significant window in a row), the weighted quadric fit
# (weights exp(-(r/r_max)^2)) and its standard errors from the sandwich
# covariance. Prints both times and how far the masses and standard errors
# agree. Usage: bench-table.py BANDMASS_CLI
import itertools
import json
import math
import os
import subprocess
import sys
import tempfile
import time

import numpy as np
from scipy.stats import f as fdist

CLI = sys.argv[1]
H = 3.80998212          # hbar^2 / (2 m_e), eV Angstrom^2 (CODATA 2018)
MASSES = (0.2, 0.4, 0.9)
REPEATS = 5


def make_table(path):
    rng = np.random.default_rng(3)
    g = np.linspace(-0.1, 0.1, 15)
    k = np.array(list(itertools.product(g, g, g)))
    e = H * sum(k[:, i] ** 2 / MASSES[i] for i in range(3)) + 2e-3 * rng.standard_normal(len(k))
    with open(path, 'w') as f:
        f.write('kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,cb_ev\n')
        for (x, y, z), v in zip(k, e):
            f.write('%.6f,%.6f,%.6f,%.6f\n' % (x, y, z, v))
    # the values as the file holds them
    data = np.loadtxt(path, delimiter=',', skiprows=1)
    return data[:, :3], data[:, 3]


def monomials(u, deg):
    cols = []
    for t in range(deg + 1):
        for i in range(t, -1, -1):
            for j in range(t - i, -1, -1):
                cols.append(u[:, 0] ** i * u[:, 1] ** j * u[:, 2] ** (t - i - j))
    return np.stack(cols, axis=1)


def nearest(k, centre, n):
    d = np.linalg.norm(k - centre, axis=1)
    order = np.argsort(d, kind="stable")
    n = min(n, len(d))
    while n < len(d) and d[order[n]] <= d[order[n - 1]] * (1 + 1e-9):
        n += 1
    return order[:n], d[order[n - 1]]


def beyond_p(u, e):
    s = np.abs(u).max()
    x = monomials(u / s, 4)
    y = e - e.mean()
    rss = []
    for p in (10, 35):
        c, *_ = np.linalg.lstsq(x[:, :p], y, rcond=None)
        rss.append(np.sum((y - x[:, :p] @ c) ** 2))
    n = len(e)
    F = ((rss[0] - rss[1]) / 25) / (rss[1] / (n - 35))
    return fdist.sf(F, 25, n - 35)


def numpy_fit(k, e, centre):
    n, best, significant = 30, 30, 0
    while True:
        idx, _ = nearest(k, centre, n)
        m = len(idx)
        if beyond_p(k[idx] - centre, e[idx]) < 0.01:
            significant += 1
            if m == 30 or significant == 2:
                break
        else:
            significant, best = 0, m
        if m >= len(k):
            break
        n = max(m + 1, math.ceil(1.25 * m))
    idx, rmax = nearest(k, centre, best)
    u = k[idx] - centre
    w = np.exp(-(np.linalg.norm(u, axis=1) / rmax) ** 2)
    x = np.column_stack([np.ones(len(u)), u, 0.5 * u[:, 0] ** 2, u[:, 0] * u[:, 1],
                         u[:, 0] * u[:, 2], 0.5 * u[:, 1] ** 2, u[:, 1] * u[:, 2],
                         0.5 * u[:, 2] ** 2])
    M = np.linalg.inv(x.T @ (w[:, None] * x))
    c = M @ (x.T @ (w * e[idx]))
    r = e[idx] - x @ c
    S0, S2 = x.T @ x, x.T @ ((w ** 2)[:, None] * x)
    s2 = r @ r / (len(u) - 2 * 10 + np.trace(M @ S0 @ M @ S2))
    cov = s2 * M @ S2 @ M
    hi = {(0, 0): 4, (0, 1): 5, (0, 2): 6, (1, 1): 7, (1, 2): 8, (2, 2): 9}
    hmat = np.zeros((3, 3))
    for (a, b), col in hi.items():
        hmat[a, b] = hmat[b, a] = c[col]
    lam, vec = np.linalg.eigh(hmat)
    masses, stderr = [], []
    for i in np.argsort(-np.abs(lam)):
        v = vec[:, i]
        g = np.zeros(10)
        for (a, b), col in hi.items():
            g[col] = v[a] * v[b] * (1 if a == b else 2)
        masses.append(2 * H / lam[i])
        stderr.append(abs(masses[-1]) * math.sqrt(g @ cov @ g) / abs(lam[i]))
    return np.array(masses), np.array(stderr), len(idx)


def main():
    tmp = tempfile.mkdtemp(prefix='bandmass-bench-table-')
    path = os.path.join(tmp, 'noisy.csv')
    k, e = make_table(path)
    req = json.dumps({'table': path, 'extremum': 'minimum'})
    times = []
    for _ in range(REPEATS):
        t0 = time.perf_counter()
        out = subprocess.run([CLI, 'call', 'mass-tensor'], input=req, capture_output=True,
                             text=True, check=True).stdout
        times.append(time.perf_counter() - t0)
    x = json.loads(out)['extrema'][0]
    centre = np.array(x['k_inv_angstrom'])
    ntimes = []
    for _ in range(REPEATS):
        t0 = time.perf_counter()
        m, se, npts = numpy_fit(k, e, centre)
        ntimes.append(time.perf_counter() - t0)
    bm, bse = np.array(x['principal_masses_me']), np.array(x['principal_masses_stderr_me'])
    print('noisy 3D table: %d points, masses %s, 2 meV noise' % (len(k), MASSES))
    print('bandmass (whole CLI run, search and walk included): median %.3f s; '
          'window %d points (%s)' % (np.median(times), x['fit_window']['points'],
                                     x['fit_window']['chosen_by']))
    print('NumPy (window, fit and errors at that point only): median %.3f s; window %d points'
          % (np.median(ntimes), npts))
    print('ratio NumPy / bandmass: %.2f' % (np.median(ntimes) / np.median(times)))
    print('masses bandmass %s +- %s' % (np.round(bm, 5), np.round(bse, 5)))
    print('masses NumPy    %s +- %s' % (np.round(m, 5), np.round(se, 5)))
    print('largest relative difference: masses %.2e, standard errors %.2e'
          % (np.max(np.abs(bm / m - 1)), np.max(np.abs(bse / se - 1))))
    ok = npts == x['fit_window']['points'] and np.allclose(bm, m, rtol=1e-6) \
        and np.allclose(bse, se, rtol=1e-4)
    print('agree: %s' % ok)
    return 0 if ok else 1


if __name__ == '__main__':
    sys.exit(main())
