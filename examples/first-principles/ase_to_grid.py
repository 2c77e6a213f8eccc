#!/usr/bin/python3
"""Writes a bandmass band grid document (format bandmass-grid-1) and its .npy
energies from a band-structure calculation ASE can read (a GPAW .gpw file, or
any calculator ASE attaches to the atoms it reads), so mass-tensor can use it.

The calculation must be on a full Gamma-centred N1 x N2 x N3 mesh; the
irreducible points are unfolded with the code's own zone-to-wedge map where
the calculator offers one (get_bz_to_ibz_map), and each k-point is placed on
the mesh by its index (the code may list k over (-1/2, 1/2]: never reshape).
Energies are written in eV as the calculator gives them; spin channels become
bands of their own (named up-N, down-N).

Usage: ase_to_grid.py CALCULATION OUT.json [MESH1 MESH2 MESH3]"""
import json
import sys
from pathlib import Path

import numpy as np
from ase.io import read


def unfold(calc, mesh):
    bz = np.asarray(calc.get_bz_k_points())
    ibz = np.asarray(calc.get_ibz_k_points())
    if hasattr(calc, 'get_bz_to_ibz_map'):
        to_ibz = np.asarray(calc.get_bz_to_ibz_map())
    elif len(bz) == len(ibz):
        to_ibz = np.arange(len(bz))
    else:
        raise SystemExit('ase_to_grid: the calculator lists %d irreducible of %d points and '
                         'no zone-to-wedge map: rerun without symmetry' % (len(ibz), len(bz)))
    if len(bz) != int(np.prod(mesh)):
        raise SystemExit('ase_to_grid: %d k-points do not fill a %s mesh' % (len(bz), mesh))
    nspin = calc.get_number_of_spins()
    nb = len(calc.get_eigenvalues(kpt=0, spin=0))
    e = np.full((nspin * nb,) + tuple(mesh), np.nan)
    for spin in range(nspin):
        per_ibz = np.array([calc.get_eigenvalues(kpt=i, spin=spin) for i in range(len(ibz))])
        for b, frac in enumerate(bz):
            idx = np.rint(frac * mesh).astype(int)
            if np.abs(idx - frac * mesh).max() > 1e-6:
                raise SystemExit('ase_to_grid: k-point %s is not on a Gamma-centred %s mesh '
                                 '(a shifted mesh?)' % (frac, mesh))
            e[(slice(spin * nb, (spin + 1) * nb),) + tuple(idx % mesh)] = per_ibz[to_ibz[b]]
    if np.isnan(e).any():
        raise SystemExit('ase_to_grid: some mesh points got no energies: not a complete mesh')
    names = ([f'b{i}' for i in range(nb)] if nspin == 1 else
             [f'{s}-{i}' for s in ('up', 'down') for i in range(nb)])
    return e, names


def load(path):
    """A GPAW restart file through GPAW itself (it keeps the zone-to-wedge map),
    anything else through ase.io."""
    if path.endswith('.gpw'):
        from gpaw import GPAW
        calc = GPAW(path, txt=None)
        return calc.get_atoms(), calc
    atoms = read(path)
    return atoms, atoms.calc


def main(path, out, mesh=None):
    atoms, calc = load(path)
    if mesh is None:
        bz = np.asarray(calc.get_bz_k_points())
        mesh = [len(np.unique(np.round(bz[:, a], 8))) for a in range(3)]
    mesh = np.array(mesh, int)
    e, names = unfold(calc, mesh)
    out = Path(out)
    npy = out.with_suffix('.npy')
    np.save(npy, np.ascontiguousarray(e))
    doc = {
        'format': 'bandmass-grid-1',
        'lattice_vectors_angstrom': atoms.cell.array.tolist(),
        'mesh': mesh.tolist(),
        'energies_ev': npy.name,
        'band_names': names,
        'comment': f'written by ase_to_grid.py from {path}',
    }
    out.write_text(json.dumps(doc, indent=1) + '\n')
    print(f'{out}: {e.shape[0]} bands on a {mesh.tolist()} mesh')


if __name__ == '__main__':
    if len(sys.argv) not in (3, 6):
        raise SystemExit(__doc__)
    main(sys.argv[1], sys.argv[2], [int(a) for a in sys.argv[3:]] or None)
