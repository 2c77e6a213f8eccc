#!/usr/bin/python3
"""DFT energies of the silicon corpus along high-symmetry lines (the same GPAW
settings as make_si_corpus.py), for checking band interpolation between mesh
points: Gamma-X-W-L-Gamma-K, 24 points per segment, Cartesian k in
1/Angstrom, eV from the valence-band maximum. Writes si-lines.csv.

Usage: make_si_lines.py OUT_DIR"""
import sys
from pathlib import Path

import numpy as np

from make_si_corpus import A, NBANDS, NCONV, scf   # the same DFT settings

NSEG = 24


def main(out_dir):
    out = Path(out_dir)
    atoms, calc = scf(out, 'lines-scf.txt')
    lat = atoms.cell.array
    u = 2 * np.pi / A
    corners = {'G': [0, 0, 0], 'X': [1, 0, 0], 'W': [1, 0.5, 0], 'L': [0.5, 0.5, 0.5],
               'K': [0.75, 0.75, 0]}
    path = ['G', 'X', 'W', 'L', 'G', 'K']
    ks = [np.zeros(3)]
    for a, b in zip(path, path[1:]):
        ka, kb = u * np.array(corners[a]), u * np.array(corners[b])
        for t in np.arange(1, NSEG + 1) / NSEG:
            ks.append(ka + t * (kb - ka))
    ks = np.array(ks)
    frac = ks @ lat.T / (2 * np.pi)
    nscf = calc.fixed_density(nbands=NBANDS, kpts=frac, symmetry='off',
                              convergence={'bands': NCONV}, txt=str(out / 'lines-nscf.txt'))
    e = np.array([nscf.get_eigenvalues(kpt=i)[:NCONV] for i in range(len(ks))])
    vbm = e[0, 3]
    names = ['v1', 'v2', 'v3', 'v4', 'c1', 'c2', 'c3', 'c4'][:NCONV]
    with open(out / 'si-lines.csv', 'w') as f:
        f.write('# Si bands along G-X-W-L-G-K (%d points per segment), written by make_si_lines.py\n'
                % NSEG)
        f.write('kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,'
                + ','.join(n + '_ev' for n in names) + '\n')
        for k, en in zip(ks, e):
            f.write('%.10f,%.10f,%.10f,' % tuple(k) + ','.join('%.10f' % x for x in en - vbm) + '\n')


if __name__ == '__main__':
    main(sys.argv[1] if len(sys.argv) > 1 else '.')
