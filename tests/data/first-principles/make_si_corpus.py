#!/usr/bin/python3
"""Writes the first-principles silicon corpus of the test suite: band grids of
bulk silicon from GPAW (through ASE) on full Gamma-centred N^3 meshes, and DFT
energies at explicit k-points around the conduction-band minimum and the
valence-band top for reference masses.

DFT settings (stated here so anyone can reproduce the data):
  diamond Si, a = 5.431 Angstrom, 2 atoms in the fcc primitive cell;
  LDA, plane waves 300 eV, no spin-orbit coupling, Fermi-Dirac width 0.01 eV;
  self-consistent density on an 8x8x8 Gamma-centred mesh;
  non-self-consistent bands on Gamma-centred N^3 meshes (the irreducible points,
  unfolded to the full mesh with the code's own zone-to-wedge map), 10 bands,
  the lowest 8 converged.
Energies are written in eV relative to the valence-band maximum of each run.

Usage: make_si_corpus.py OUT_DIR [N ...]   (default meshes 12 16 24 32; the
committed si-48-c.json is `make_si_corpus.py OUT 48`, about 4 minutes)"""
import json
import sys
from pathlib import Path

import numpy as np
from ase.build import bulk
from ase import __version__ as ase_version
from gpaw import GPAW, PW, FermiDirac
from gpaw import __version__ as gpaw_version

A = 5.431
NBANDS, NCONV = 10, 8
FULL_MAX = 48   # meshes from this size on are written with c1 and c2 only


def scf(out, log='scf.txt'):
    """The self-consistent run both scripts start from (make_si_reference.py
    imports it, so the settings are stated once)."""
    atoms = bulk('Si', 'diamond', a=A)
    calc = GPAW(mode=PW(300), xc='LDA', kpts={'size': (8, 8, 8), 'gamma': True},
                occupations=FermiDirac(0.01), txt=str(out / log))
    atoms.calc = calc
    atoms.get_potential_energy()
    return atoms, calc


def mesh_bands(calc, n, out):
    """The bands on the full mesh, and the irreducible points with their bands."""
    nscf = calc.fixed_density(nbands=NBANDS, kpts={'size': (n, n, n), 'gamma': True},
                              convergence={'bands': NCONV}, txt=str(out / f'nscf-{n}.txt'))
    kd = nscf.wfs.kd
    ibz = np.array([nscf.get_eigenvalues(kpt=i) for i in range(len(kd.ibzk_kc))])
    e = np.empty((NBANDS, n, n, n))
    for bz, frac in enumerate(kd.bzk_kc):
        # the code lists k over (-1/2, 1/2]: place each point by its index, not by reshaping
        idx = tuple(int(round(f * n)) % n for f in frac)
        e[(slice(None),) + idx] = ibz[kd.bz2ibz_k[bz]]
    return e[:NCONV], np.array(kd.ibzk_kc), ibz[:, :NCONV].T


def main(out_dir, meshes):
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    atoms, calc = scf(out)
    lattice = atoms.cell.array
    for n in meshes:
        e, ibz_k, ibz_e = mesh_bands(calc, n, out)
        vbm = e[3].max()
        if n == 12:
            # the irreducible wedge as the code lists it, with the atoms that
            # give its symmetry: the reader unfolds it (tests/hosts/test_grid_layouts.py)
            wedge = {
                'format': 'bandmass-grid-1',
                'lattice_vectors_angstrom': lattice.tolist(),
                'positions_fractional': atoms.get_scaled_positions().tolist(),
                'species': atoms.get_chemical_symbols(),
                'mesh': [n, n, n],
                'k_points_fractional': ibz_k.tolist(),
                'energies_ev': (ibz_e - vbm).tolist(),
                'band_names': ['v1', 'v2', 'v3', 'v4', 'c1', 'c2', 'c3', 'c4'],
                'comment': f'the irreducible k-points of si-{n}.json; written by make_si_corpus.py',
            }
            (out / f'si-{n}-wedge.json').write_text(json.dumps(wedge) + '\n')
        names, keep, stem = ['v1', 'v2', 'v3', 'v4', 'c1', 'c2', 'c3', 'c4'], slice(0, 8), f'si-{n}'
        if n >= FULL_MAX:
            # fine meshes: the lowest conduction band and its crossing partner
            # only, to keep the file small
            names, keep, stem = ['c1', 'c2'], slice(4, 6), f'si-{n}-c'
        np.save(out / f'{stem}.npy', np.ascontiguousarray(e[keep] - vbm))
        doc = {
            'format': 'bandmass-grid-1',
            'lattice_vectors_angstrom': lattice.tolist(),
            'mesh': [n, n, n],
            'energies_ev': f'{stem}.npy',
            'band_names': names,
            'comment': (f'bulk Si, GPAW {gpaw_version} / ASE {ase_version}, LDA, PW 300 eV, '
                        f'a = {A} A, Gamma-centred {n}^3 mesh, eV from the VBM; '
                        'written by make_si_corpus.py'),
        }
        (out / f'{stem}.json').write_text(json.dumps(doc, indent=1) + '\n')
        print(f'si-{n}: VBM {vbm:.4f} eV (absolute), gap {e[4].min() - vbm:.4f} eV', flush=True)


if __name__ == '__main__':
    main(sys.argv[1], [int(a) for a in sys.argv[2:]] or [12, 16, 24, 32])
