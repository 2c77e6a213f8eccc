#!/usr/bin/python3
"""Reference masses of the silicon corpus: DFT energies (the same GPAW settings
as make_si_corpus.py) at explicit k-points around the conduction-band minimum on
Gamma-X and around the valence-band top at Gamma, and the masses finite
differences give from them. Writes si-reference.json and the k-tables
si-stencil-cb.csv and si-stencil-vb.csv (Cartesian k, 1/Angstrom; eV from the VBM).

Method: a line scan along Gamma-X locates the minimum (parabola through the
three lowest points, then a finer scan around it); second differences at two
steps (0.01 and 0.02 1/Angstrom) along and across Gamma-X give m_l and m_t,
and their agreement is the reference's own error estimate. At Gamma, the
three top valence bands along [100], [110], [111] at |k| = 0.01, 0.02 give
directional masses (E = E0 + c2 k^2 + c4 k^4 through both steps).

Usage: make_si_reference.py OUT_DIR"""
import json
import sys
from pathlib import Path

import numpy as np

from make_si_corpus import A, NBANDS, NCONV, scf   # the same DFT settings

HBAR2_ME = 7.619964   # eV Angstrom^2 (CODATA 2018: hbar^2 / m_e)


def energies(calc, lattice, kcart, tag, out):
    """Bands at Cartesian k (1/Angstrom): f_i = k . a_i / (2 pi)."""
    frac = np.asarray(kcart) @ lattice.T / (2 * np.pi)
    nscf = calc.fixed_density(nbands=NBANDS, kpts=frac, symmetry='off',
                              convergence={'bands': NCONV}, txt=str(out / f'ref-{tag}.txt'))
    return np.array([nscf.get_eigenvalues(kpt=i)[:NCONV] for i in range(len(frac))])


def main(out_dir):
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    atoms, calc = scf(out, 'ref-scf.txt')
    lat = atoms.cell.array
    gx = 2 * np.pi / A                      # |Gamma-X|, 1/Angstrom
    ex, ey = np.array([1.0, 0, 0]), np.array([0, 1.0, 0])

    # valence top: Gamma and the directional points (one run; a lone k-point
    # converges poorly)
    dirs = {'100': [1, 0, 0], '110': [1, 1, 0], '111': [1, 1, 1]}
    steps = [0.01, 0.02]
    vpts = []
    for d in dirs.values():
        u = np.array(d, float) / np.linalg.norm(d)
        vpts += [h * u for h in steps]
    ev = energies(calc, lat, [np.zeros(3)] + vpts, 'vb', out)
    e_gamma, ev = ev[0], ev[1:]
    vbm = e_gamma[3]

    # coarse then fine scan of the conduction band along Gamma-X
    s = np.linspace(0.78, 0.92, 15)
    ec = energies(calc, lat, [x * gx * ex for x in s], 'scan1', out)[:, 4]
    i = int(np.argmin(ec))
    s = np.linspace(s[i] - 0.01, s[i] + 0.01, 9)
    ec = energies(calc, lat, [x * gx * ex for x in s], 'scan2', out)[:, 4]
    c = np.polyfit(s, ec, 4)
    roots = [r.real for r in np.roots(np.polyder(c)) if abs(r.imag) < 1e-9
             and s[0] <= r.real <= s[-1]]
    s0 = min(roots, key=lambda r: np.polyval(c, r))
    k0 = s0 * gx * ex

    pts, rows = [k0], []
    for h in steps:
        pts += [k0 + h * ex, k0 - h * ex, k0 + h * ey, k0 - h * ey]
    e = energies(calc, lat, pts, 'cb', out)
    for k, en in zip(pts, e):
        rows.append((k, en[4] - vbm))
    ml, mt = [], []
    for j, h in enumerate(steps):
        b = 1 + 4 * j
        d2l = (e[b, 4] + e[b + 1, 4] - 2 * e[0, 4]) / h ** 2
        d2t = (e[b + 2, 4] + e[b + 3, 4] - 2 * e[0, 4]) / h ** 2
        ml.append(HBAR2_ME / d2l)
        mt.append(HBAR2_ME / d2t)

    # valence top: directional masses of the three top bands
    vrows, vmass = [], {}
    for j, name in enumerate(dirs):
        e1, e2 = ev[2 * j], ev[2 * j + 1]
        h1, h2 = steps
        masses = []
        for band in (1, 2, 3):
            a1, a2 = e1[band] - vbm, e2[band] - vbm
            # E - E0 = c2 k^2 + c4 k^4 through both steps
            c4 = (a2 / h2 ** 2 - a1 / h1 ** 2) / (h2 ** 2 - h1 ** 2)
            c2 = a1 / h1 ** 2 - c4 * h1 ** 2
            masses.append(HBAR2_ME / (2 * c2))
        vmass[name] = sorted(masses, key=abs)
    for k, en in zip([np.zeros(3)] + vpts, [e_gamma] + list(ev)):
        vrows.append((k, en[1:4] - vbm))

    with open(out / 'si-stencil-cb.csv', 'w') as f:
        f.write('# Si conduction band near its minimum on Gamma-X, written by make_si_reference.py\n')
        f.write('kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,c1_ev\n')
        for k, en in rows:
            f.write('%.10f,%.10f,%.10f,%.10f\n' % (*k, en))
    with open(out / 'si-stencil-vb.csv', 'w') as f:
        f.write('# Si valence bands near Gamma, written by make_si_reference.py\n')
        f.write('kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,v2_ev,v3_ev,v4_ev\n')
        for k, en in vrows:
            f.write('%.10f,%.10f,%.10f,%.10f,%.10f,%.10f\n' % (*k, *en))
    ref = {
        'comment': 'DFT reference masses of the Si corpus (same settings as make_si_corpus.py); '
                   'finite differences at steps 0.01 and 0.02 1/Angstrom',
        'conduction_minimum_fraction_of_gamma_x': s0,
        'conduction_minimum_k_inv_angstrom': k0.tolist(),
        'conduction_minimum_ev': float(np.polyval(c, s0) - vbm),
        'longitudinal_mass_me': ml,
        'transverse_mass_me': mt,
        'valence_directional_masses_me': vmass,
        'gap_ev': float(np.polyval(c, s0) - vbm),
    }
    (out / 'si-reference.json').write_text(json.dumps(ref, indent=1) + '\n')
    print(json.dumps(ref, indent=1))


if __name__ == '__main__':
    main(sys.argv[1])
