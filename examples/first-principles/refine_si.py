#!/usr/bin/python3
"""The refinement loop on silicon, end to end: mass-tensor on a coarse DFT grid
asks for a refinement stencil, GPAW computes the bands at those k-points, and
mass-tensor fits them as a k-table, emitting the next stencil, until the masses
converge (their estimated errors within the tolerance).

DFT settings (those of tests/data/first-principles/make_si_corpus.py): diamond
Si, a = 5.431 Angstrom, LDA, plane waves 300 eV, density from an 8x8x8 mesh.
Needs Debian's gpaw, gpaw-data and python3-ase; about 10 s a round on 2 cores.

Usage: refine_si.py GRID.json [OUT_DIR]   (GRID: a corpus grid, eV from the VBM)
Each round's k-table is written to OUT_DIR as round-N.csv."""
import json
import os
import subprocess
import sys
from pathlib import Path

import numpy as np
from ase.build import bulk
from gpaw import GPAW, PW, FermiDirac

CLI = os.environ.get('BANDMASS_CLI', 'bandmass')
ROUNDS = 4


def dft_setup(out):
    atoms = bulk('Si', 'diamond', a=5.431)
    calc = GPAW(mode=PW(300), xc='LDA', kpts={'size': (8, 8, 8), 'gamma': True},
                occupations=FermiDirac(0.01), txt=str(out / 'scf.txt'))
    atoms.calc = calc
    atoms.get_potential_energy()
    lattice = atoms.cell.array

    def bands(kcart):
        # fractional f_i = k . a_i / (2 pi); the stencil needs no symmetry reduction
        frac = np.asarray(kcart) @ lattice.T / (2 * np.pi)
        nscf = calc.fixed_density(nbands=10, kpts=frac, symmetry='off',
                                  convergence={'bands': 8}, txt=str(out / 'nscf.txt'))
        return np.array([nscf.get_eigenvalues(kpt=i)[:8] for i in range(len(frac))])
    vbm = bands([[0, 0, 0], [0.01, 0, 0]])[0][3]   # the corpus measures from the VBM
    return lambda k: bands(k) - vbm


def mass_tensor(request):
    p = subprocess.run([CLI, 'call', 'mass-tensor'], input=json.dumps(request),
                       capture_output=True, text=True)
    if p.returncode != 0:
        raise SystemExit(p.stderr)
    r = json.loads(p.stdout)
    if r['extrema']:
        return r['extrema'][0]
    # the stencil did not bracket the minimum: refine around the fit's
    # estimate beyond the data (never converged, never an extremum)
    return r['beyond_data'][0]


def show(label, e):
    m = [round(x, 4) if isinstance(x, float) else x for x in e['principal_masses_me']]
    err = [round(x, 4) if isinstance(x, float) else x for x in e['principal_masses_error_me']]
    print(f'{label}: {e["method"]}, k = {np.round(e["k_inv_angstrom"], 4).tolist()} 1/A, '
          f'masses {m} +- {err} m_e, converged {e["converged"]}')


def main(grid, out_dir):
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    bands = dft_setup(out)
    e = mass_tensor({'grid': grid, 'band': 'c1', 'extremum': 'minimum', 'stencil': True})
    show('grid', e)
    for n in range(1, ROUNDS + 1):
        stencil = e['refinement_stencil']
        k = np.array(stencil['k_inv_angstrom'])
        en = bands(k)
        table = out / f'round-{n}.csv'
        with open(table, 'w') as f:
            f.write(f'# Si LDA (GPAW), conduction bands c1, c2 at the refinement stencil '
                    f'(step {stencil["step_inv_angstrom"]} 1/A) of round {n} from {Path(grid).name}; '
                    f'eV from the VBM; written by refine_si.py\n')
            f.write('kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,c1_ev,c2_ev\n')
            for kk, ee in zip(k, en):
                f.write('%.10f,%.10f,%.10f,%.10f,%.10f\n' % (*kk, ee[4], ee[5]))
        e = mass_tensor({'table': str(table), 'band': 'c1', 'extremum': 'minimum',
                         'stencil': True})
        show(f'round {n} ({len(k)} k-points)', e)
        if e['converged']:
            break
    else:
        print(f'not converged after {ROUNDS} rounds')


if __name__ == '__main__':
    if len(sys.argv) not in (2, 3):
        raise SystemExit(__doc__)
    main(sys.argv[1], sys.argv[2] if len(sys.argv) > 2 else 'refine-si')
