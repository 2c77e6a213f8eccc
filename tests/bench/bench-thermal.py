#!/usr/bin/python3
"""bench-thermal.py: thermal-mass on a 96^3 mesh of 4 bands at 50 temperatures,
against a plain NumPy version of the same definitions (Boltzmann transport in
the constant relaxation-time approximation) summed straight over the mesh
points, velocities by periodic central differences, one full pass over the
k-points per temperature.  The NumPy sum is also the less accurate one (no
refinement inside the thermal window); both answers are printed."""
import json
import os
import subprocess
import sys
import tempfile
import time

import numpy as np

CLI = sys.argv[1]
N, A = 96, 5.0
HBAR2_ME, KB = 7.619964231, 8.617333262e-5
TEMPS = list(np.linspace(50.0, 600.0, 50))
DENSITY = 1e18
HOPS = [(0.5, 0.0), (0.4, 0.9), (0.3, 1.6), (0.6, 2.2)]   # (t eV, offset eV): 4 conduction bands


def bands():
    f = np.arange(N) / N
    c = np.cos(2 * np.pi * np.stack(np.meshgrid(f, f, f, indexing='ij'), 0))
    s = c.sum(0)
    return np.stack([-2 * t * s + off for t, off in HOPS])


@np.errstate(over="ignore")
def numpy_thermal(e):
    """The plain version: per temperature, bisection for mu and full-mesh sums."""
    h = 2 * np.pi / (A * N)     # the k step, 1/A
    vx = (np.roll(e, -1, axis=1) - np.roll(e, 1, axis=1)) / (2 * h)
    w = 1.0 / (N ** 3 * A ** 3)
    e, vx = e.ravel(), vx.ravel()
    edge = e.min()
    out = []
    for T in TEMPS:
        kt = KB * T
        lo, hi = edge - 1.0, edge + 1.0
        for _ in range(60):
            mu = 0.5 * (lo + hi)
            n = 2 * w * (1 / (1 + np.exp((e - mu) / kt))).sum()
            lo, hi = (mu, hi) if n < DENSITY * 1e-24 else (lo, mu)
        x = np.abs(e - mu) / kt
        mdf = np.exp(-x) / (1 + np.exp(-x)) ** 2 / kt
        k0 = 2 * w * (vx * vx * mdf).sum()
        nc = 2 * w * np.exp(-(e - edge) / kt).sum()
        out.append(((nc / 2) ** (2 / 3) * 2 * np.pi * HBAR2_ME / kt, HBAR2_ME * n / k0))
    return out


def main():
    with tempfile.TemporaryDirectory() as tmp:
        e = bands()
        np.save(os.path.join(tmp, 'b.npy'), e)
        doc = {'format': 'bandmass-grid-1', 'mesh': [N, N, N],
               'reciprocal_vectors_inv_angstrom': (2 * np.pi / A * np.eye(3)).tolist(),
               'energies_ev': 'b.npy'}
        grid = os.path.join(tmp, 'b.json')
        json.dump(doc, open(grid, 'w'))
        req = json.dumps({'grid': grid, 'bands': [0, 1, 2, 3], 'temperatures_k': TEMPS,
                          'density_cm3': DENSITY})
        runs = []
        for _ in range(3):
            t0 = time.perf_counter()
            p = subprocess.run([CLI, 'call', 'thermal-mass'], input=req, text=True,
                               capture_output=True, check=True)
            runs.append(time.perf_counter() - t0)
        r = json.loads(p.stdout)
        t0 = time.perf_counter()
        ref = numpy_thermal(e)
        tn = time.perf_counter() - t0
    i300 = min(range(len(TEMPS)), key=lambda i: abs(TEMPS[i] - 300))
    pt = r['points'][i300]
    print(f'thermal-mass, {N}^3 x 4 bands, {len(TEMPS)} temperatures: bandmass '
          f'{min(runs):.2f}-{max(runs):.2f} s (whole process, {r["sampling"]["points"]:.3g} '
          f'interpolated points), NumPy mesh sums {tn:.2f} s: {tn / min(runs):.1f}x')
    print(f'  at {TEMPS[i300]:.0f} K: bandmass m_dos {pt["dos_mass_me"]:.4f}, m_c '
          f'{pt["conductivity_principal_masses_me"][0]:.4f}; NumPy m_dos {ref[i300][0]:.4f}, '
          f'm_c {ref[i300][1]:.4f}')
    p50 = r['points'][0]
    print(f'  at {TEMPS[0]:.0f} K: bandmass m_dos {p50["dos_mass_me"]:.4f}, m_c '
          f'{p50["conductivity_principal_masses_me"][0]:.4f}; NumPy m_dos {ref[0][0]:.4f}, '
          f'm_c {ref[0][1]:.4f} (band-bottom mass {HBAR2_ME / (2 * 0.5 * A * A):.4f})')


if __name__ == '__main__':
    main()
