#!/usr/bin/python3
"""Silicon's valence top with spin-orbit coupling: DFT energies (the settings of
make_si_corpus.py, spin-orbit coupling added non-self-consistently by GPAW's
spin-orbit module, gpaw.spinorbit.soc_eigenstates) at k-points around Gamma, and
the directional masses finite differences give from them. Writes the k-table
si-stencil-vb-so.csv (Cartesian k, 1/Angstrom; eV from the VBM; the top six
valence states v3..v8, three Kramers pairs: split-off, light, heavy) and
si-reference-so.json.

The points: Gamma; [100], [110], [111] at |k| = 0.005, 0.01, 0.02, 0.03, 0.045,
0.06 1/Angstrom; [210], [211], [221], [321] at 0.02 and 0.045. The split-off
gap of Si is about 44 meV (Madelung, Semiconductors: Data Handbook, 2004; from
memory), so the outer points reach energies several times the gap, where the
fourfold model no longer holds and the sixfold one must.

Reference: the split-off gap at Gamma, and along each of [100], [110], [111]
each band's mass from E = E0 + c2 k^2 + c4 k^4 through the two smallest steps
(0.005 and 0.01, energies well below the gap), with the same through 0.01 and
0.02 as its own error estimate.

Usage: make_si_spin_orbit.py OUT_DIR"""
import json
import sys
from pathlib import Path

import numpy as np
from gpaw.spinorbit import soc_eigenstates

from make_si_corpus import NBANDS, NCONV, scf   # the same DFT settings

HBAR2_ME = 7.619964   # eV Angstrom^2 (CODATA 2018: hbar^2 / m_e)
LINES = {'100': [1, 0, 0], '110': [1, 1, 0], '111': [1, 1, 1]}
STEPS = [0.005, 0.01, 0.02, 0.03, 0.045, 0.06]
OFF_AXIS = [[2, 1, 0], [2, 1, 1], [2, 2, 1], [3, 2, 1]]
TOP = 6   # valence spin states kept: the top six of the eight


def main(out_dir):
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    atoms, calc = scf(out, 'so-scf.txt')
    lat = atoms.cell.array
    pts = [np.zeros(3)]
    for d in LINES.values():
        u = np.array(d, float) / np.linalg.norm(d)
        pts += [h * u for h in STEPS]
    for d in OFF_AXIS:
        u = np.array(d, float) / np.linalg.norm(d)
        pts += [h * u for h in (0.02, 0.045)]
    frac = np.array(pts) @ lat.T / (2 * np.pi)
    nscf = calc.fixed_density(nbands=NBANDS, kpts=frac, symmetry='off',
                              convergence={'bands': NCONV}, txt=str(out / 'so-nscf.txt'))
    e = soc_eigenstates(nscf).eigenvalues()       # (k, 2 bands), eV, ascending
    nval = 8                                        # 4 valence bands, two spins each
    e = e[:, nval - TOP:nval]
    vbm = e[0, -1]
    e = e - vbm
    names = [f'v{i}' for i in range(nval - TOP + 1, nval + 1)]
    with open(out / 'si-stencil-vb-so.csv', 'w') as f:
        f.write('# Si valence bands near Gamma with spin-orbit coupling (GPAW LDA, PW 300 eV, '
                'a = 5.431 A; spin-orbit added non-self-consistently), top six spin states, '
                'eV from the VBM; written by make_si_spin_orbit.py\n')
        f.write('kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,'
                + ','.join(n + '_ev' for n in names) + '\n')
        for k, en in zip(pts, e):
            f.write(','.join(f'{x:.10f}' for x in k) + ',' + ','.join(f'{x:.10f}' for x in en)
                    + '\n')
    ref = {'split_off_gap_ev': float(-(e[0, 0] + e[0, 1]) / 2),
           'band_names': names, 'directional_masses_me': {}, 'directional_masses_error_me': {}}
    for j, name in enumerate(LINES):
        rows = e[1 + j * len(STEPS):1 + (j + 1) * len(STEPS)]
        masses, errors = [], []
        for pair in range(3):
            b = 2 * pair
            en = (rows[:, b] + rows[:, b + 1]) / 2 - (e[0, b] + e[0, b + 1]) / 2

            def c2(i1, i2):
                h1, h2 = STEPS[i1], STEPS[i2]
                m = np.array([[h1 ** 2, h1 ** 4], [h2 ** 2, h2 ** 4]])
                return np.linalg.solve(m, [en[i1], en[i2]])[0]
            a, b2 = c2(0, 1), c2(1, 2)
            masses.append(HBAR2_ME / (2 * a))
            errors.append(abs(HBAR2_ME / (2 * a) - HBAR2_ME / (2 * b2)))
        ref['directional_masses_me'][name] = masses
        ref['directional_masses_error_me'][name] = errors
    ref['comment'] = ('Si, GPAW LDA with spin-orbit coupling (non-self-consistent), masses of the '
                      'three Kramers pairs (split-off, light, heavy) at Gamma by finite '
                      'differences at 0.005 and 0.01 1/A; errors: the same at 0.01 and 0.02; '
                      'written by make_si_spin_orbit.py')
    json.dump(ref, open(out / 'si-reference-so.json', 'w'), indent=1)
    print(json.dumps(ref, indent=1))


if __name__ == '__main__':
    main(sys.argv[1] if len(sys.argv) > 1 else '.')
