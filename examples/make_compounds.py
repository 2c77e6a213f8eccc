#!/usr/bin/python3
"""make_compounds.py OUT_DIR: band grids of the three fictional compounds the
(equally fictional) Lakemoor Institute screens in the demo study, from
tight-binding and k.p-style models, so that every number is reproducible and
nothing is downloaded. Each grid is a bandmass-grid-1 document with its .npy
energies (bands "valence" and "conduction", eV from the valence top).

  OrTe  orvane telluride, rock salt (fcc, a = 6.1 A): nearest- and
        next-nearest-neighbour bands; a Gamma valence top, six half valleys
        at the X points (a multi-valley conductor).
  KeSb  kestrel antimonide, tetragonal (a = 4.2 A, c = 6.4 A): cosine bands,
        a Gamma conduction valley light in the plane and heavy along c.
  VsN   vessium nitride, simple cubic (a = 4.5 A): a non-parabolic (Kane)
        Gamma valley E (1 + alpha E) = eps(k), eps the lattice form of
        hbar^2 k^2 / 2m (m = 0.12 m_e, alpha = 0.8 /eV), over a heavy
        valence band.

The grids are written at the density a screening run would use (24 points
a side, 16 along the tetragonal c, 28 for the light Kane valley)."""
import json
import sys
from pathlib import Path

import numpy as np

HBAR2_2ME = 3.80998          # hbar^2 / 2 m_e in eV A^2 (CODATA, from memory)


def mesh_k(lattice, mesh):
    recip = 2 * np.pi * np.linalg.inv(lattice).T
    f = [np.arange(n) / n for n in mesh]
    F = np.stack(np.meshgrid(*f, indexing="ij"), axis=-1)
    return F @ recip


def orte():
    a, mesh = 6.1, (24, 24, 24)
    lattice = 0.5 * a * np.array([[0, 1, 1], [1, 0, 1], [1, 1, 0]], float)
    k = mesh_k(lattice, mesh)
    nn = 0.5 * a * np.array([[s1, s2, 0] for s1 in (1, -1) for s2 in (1, -1)]
                            + [[s1, 0, s2] for s1 in (1, -1) for s2 in (1, -1)]
                            + [[0, s1, s2] for s1 in (1, -1) for s2 in (1, -1)], float)
    nnn = a * np.vstack([np.eye(3), -np.eye(3)])
    s1 = np.cos(k @ nn.T).sum(axis=-1)
    s2 = np.cos(k @ nnn.T).sum(axis=-1)
    valence = -0.45 * (12 - s1)
    conduction = 0.85 + 0.30 * (s1 + 4) + 0.22 * (6 - s2)
    return lattice, mesh, valence, conduction


def kesb():
    a, c, mesh = 4.2, 6.4, (24, 24, 16)
    lattice = np.diag([a, a, c])
    k = mesh_k(lattice, mesh)
    cx, cy, cz = np.cos(k[..., 0] * a), np.cos(k[..., 1] * a), np.cos(k[..., 2] * c)
    valence = -2 * 0.35 * (2 - cx - cy) - 2 * 0.25 * (1 - cz)
    conduction = 0.62 + 2 * 0.95 * (2 - cx - cy) + 2 * 0.12 * (1 - cz)
    return lattice, mesh, valence, conduction


def vsn():
    a, mesh, m, alpha = 4.5, (28, 28, 28), 0.12, 0.8
    lattice = a * np.eye(3)
    k = mesh_k(lattice, mesh)
    eps = HBAR2_2ME / m * (2.0 / a ** 2) * (3 - np.cos(k * a).sum(axis=-1))
    conduction = 0.48 + (np.sqrt(1 + 4 * alpha * eps) - 1) / (2 * alpha)
    valence = -2 * 0.18 * (3 - np.cos(k * a).sum(axis=-1))
    return lattice, mesh, valence, conduction


COMPOUNDS = {"OrTe": ("orvane telluride", orte), "KeSb": ("kestrel antimonide", kesb),
             "VsN": ("vessium nitride", vsn)}


def main(out_dir):
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    for name, (_, model) in COMPOUNDS.items():
        lattice, mesh, valence, conduction = model()
        np.save(out / f"{name}-bands.npy", np.stack([valence, conduction]).astype("<f8"))
        doc = {"format": "bandmass-grid-1", "lattice_vectors_angstrom": lattice.tolist(),
               "mesh": list(mesh), "energies_ev": f"{name}-bands.npy",
               "band_names": ["valence", "conduction"]}
        (out / f"{name}-grid.json").write_text(json.dumps(doc, indent=1) + "\n")


if __name__ == "__main__":
    main(sys.argv[1] if len(sys.argv) > 1 else "compounds")
