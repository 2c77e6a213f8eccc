#!/usr/bin/python3
"""Writes the demo band grid of orvane telluride (OrTe), a fictional rock-salt
semiconductor studied by the (equally fictional) Lakemoor Institute thin-film
screening group. The bands are nearest- and next-nearest-neighbour
tight-binding forms on the fcc lattice, so every number is reproducible:

  valence:    E_v(k) = -t_v (12 - S1(k))                 maximum at Gamma
  conduction: E_c(k) = E_g + t_1 (S1(k) + 4) + t_2 (6 - S2(k))   minima at X

with S1 = sum over the 12 nearest neighbours of cos(k.R) and S2 over the 6
next-nearest. Output: a bandmass-grid-1 document and its .npy energies."""
import json
import sys
from pathlib import Path

import numpy as np

A = 6.1          # cubic lattice constant, Angstrom (invented)
T_V = 0.45       # eV
E_G = 0.85       # eV
T_1, T_2 = 0.30, 0.22
MESH = (24, 24, 24)


def main(out_dir):
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    lattice = 0.5 * A * np.array([[0, 1, 1], [1, 0, 1], [1, 1, 0]], float)
    recip = 2 * np.pi * np.linalg.inv(lattice).T
    f = [np.arange(n) / n for n in MESH]
    F = np.stack(np.meshgrid(*f, indexing="ij"), axis=-1)
    k = F @ recip                                   # Cartesian, 1/Angstrom
    nn = 0.5 * A * np.array([[s1, s2, 0] for s1 in (1, -1) for s2 in (1, -1)]
                            + [[s1, 0, s2] for s1 in (1, -1) for s2 in (1, -1)]
                            + [[0, s1, s2] for s1 in (1, -1) for s2 in (1, -1)], float)
    nnn = A * np.vstack([np.eye(3), -np.eye(3)])
    s1 = np.cos(k @ nn.T).sum(axis=-1)
    s2 = np.cos(k @ nnn.T).sum(axis=-1)
    valence = -T_V * (12 - s1)
    conduction = E_G + T_1 * (s1 + 4) + T_2 * (6 - s2)
    energies = np.stack([valence, conduction]).astype("<f8")
    np.save(out / "orvane-bands.npy", energies)
    doc = {
        "format": "bandmass-grid-1",
        "lattice_vectors_angstrom": lattice.tolist(),
        "mesh": list(MESH),
        "energies_ev": "orvane-bands.npy",
        "band_names": ["valence", "conduction"],
    }
    (out / "orvane-grid.json").write_text(json.dumps(doc, indent=2) + "\n")


if __name__ == "__main__":
    main(sys.argv[1] if len(sys.argv) > 1 else "orvane")
