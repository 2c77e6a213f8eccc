#!/usr/bin/python3
# test_valley_stars.py: valley-average stars counted by zone shares
# ("lattice_angstrom"), for the 32 point groups.
#
# References: the valley counts of textbook semiconductors (Si: 6 Delta
# valleys; Ge: 4 L valleys; Sze & Ng, Physics of Semiconductor Devices, 3rd
# ed. 2007, ch. 1). Wurtzite's 3 M and 2 K valleys are the geometry of the
# hexagonal zone (a side centre is shared by two zones, a corner by three;
# from memory, e.g. Yu & Cardona, Fundamentals of Semiconductors). For a
# general point, the star has as many points as the Laue class has operations
# (group theory: the point group with time reversal, so inversion added, acts
# freely on a point that no operation fixes).
import json
import math
import os
import subprocess
import sys

from valley_calls import CLI, call, check, failures


def star(group, lattice, k, masses=(0.3, 0.5, 0.9)):
    return call({'valley': {'principal_masses_me': list(masses),
                            'axes': [[1, 0, 0], [0, 1, 0], [0, 0, 1]], 'k_inv_angstrom': k},
                 'point_group': group, 'lattice_angstrom': lattice})


def recip(lattice):
    a = lattice
    vol = sum(a[0][i] * (a[1][(i + 1) % 3] * a[2][(i + 2) % 3]
                         - a[1][(i + 2) % 3] * a[2][(i + 1) % 3]) for i in range(3))

    def cross(u, v):
        return [u[1] * v[2] - u[2] * v[1], u[2] * v[0] - u[0] * v[2], u[0] * v[1] - u[1] * v[0]]
    return [[2 * math.pi * c / vol for c in cross(a[(i + 1) % 3], a[(i + 2) % 3])]
            for i in range(3)]


def frac_to_k(lattice, f):
    b = recip(lattice)
    return [sum(f[i] * b[i][j] for i in range(3)) for j in range(3)]


# silicon and germanium: fcc, cube axes
si = 5.431
fcc = lambda a: [[0, a / 2, a / 2], [a / 2, 0, a / 2], [a / 2, a / 2, 0]]
X = 2 * math.pi / si
r = call({'valley': {'longitudinal_mass_me': 0.98, 'transverse_mass_me': 0.19, 'axis': [1, 0, 0],
                     'k_inv_angstrom': [0.85 * X, 0, 0]},
          'point_group': 'Oh', 'lattice_angstrom': fcc(si)})
check('Si: 6 Delta valleys at 0.85 X (Sze & Ng 2007)',
      r['valley_count'] == 6 and len(r['valleys']) == 6 and r['position'] == 'zone-shares')
check('Si: m_d = 6^(2/3) (m_l m_t^2)^(1/3) (identity)',
      abs(r['dos_mass_me'] - 6 ** (2 / 3) * (0.98 * 0.19 ** 2) ** (1 / 3)) < 1e-12)
r = call({'valley': {'longitudinal_mass_me': 0.98, 'transverse_mass_me': 0.19, 'axis': [1, 0, 0],
                     'k_inv_angstrom': [X, 0, 0]},
          'point_group': 'Oh', 'lattice_angstrom': fcc(si)})
check('a minimum at X itself: 6 half valleys, 3 in all',
      r['valley_count'] == 3 and len(r['valleys']) == 6
      and all(abs(v['weight'] - 0.5) < 1e-15 for v in r['valleys']))
ge = 5.658
L = math.pi / ge
r = call({'valley': {'longitudinal_mass_me': 1.59, 'transverse_mass_me': 0.0815,
                     'axis': [1, 1, 1], 'k_inv_angstrom': [L, L, L]},
          'point_group': 'Oh', 'lattice_angstrom': fcc(ge)})
check('Ge: 4 L valleys, 8 half valleys (Sze & Ng 2007)',
      r['valley_count'] == 4 and len(r['valleys']) == 8)
check('the response names the Laue class of the star', 'm-3m' in r['star_symmetry'])
# a zone image (the Gamma minimum reported at k = (1.157, 1.157, 1.157) 1/A
# from a 48^3 fcc mesh): the first-zone image is Gamma, one valley
g = 2 * math.pi / si
r = star('Oh', fcc(si), [g, g, g], masses=(0.3, 0.3, 0.3))
check('a Gamma valley given at a zone image counts once', r['valley_count'] == 1)

# wurtzite (GaN a, c), C6v: principal axis z, a mirror plane x = 0
a, c = 3.189, 5.185
hexl = [[a, 0, 0], [-a / 2, a * math.sqrt(3) / 2, 0], [0, 0, c]]
b = recip(hexl)
K = [(b[0][j] + b[1][j]) / 3 for j in range(3)]
check('the K point chosen is a zone corner (|K| = 4 pi / 3a)',
      abs(math.hypot(*K[:2]) - 4 * math.pi / (3 * a)) < 1e-9)
r = star('C6v', hexl, K, masses=(0.2, 0.2, 0.4))
check('wurtzite K: 6 corners of 1/3 each, 2 valleys',
      r['valley_count'] == 2 and len(r['valleys']) == 6
      and all(abs(v['weight'] - 1 / 3) < 1e-12 for v in r['valleys']))
M = [b[0][j] / 2 for j in range(3)]
r = star('C6v', hexl, M)
check('wurtzite M: 6 side centres of 1/2 each, 3 valleys',
      r['valley_count'] == 3 and len(r['valleys']) == 6)
r = star('6mm', hexl, M)
check('the international symbol 6mm is C6v', r['valley_count'] == 3)

# tetragonal (D4h) and orthorhombic (D2h) lattices
tet = [[4.0, 0, 0], [0, 4.0, 0], [0, 0, 6.0]]
check('tetragonal X (zone face): 4 halves, 2 valleys',
      star('D4h', tet, frac_to_k(tet, [0.5, 0, 0]))['valley_count'] == 2)
check('tetragonal interior point along x: 4 valleys',
      star('D4h', tet, frac_to_k(tet, [0.3, 0, 0]))['valley_count'] == 4)
check('tetragonal Z: one valley (its two halves are one point)',
      star('D4h', tet, frac_to_k(tet, [0, 0, 0.5]))['valley_count'] == 1)
orth = [[3.0, 0, 0], [0, 4.0, 0], [0, 0, 5.0]]
check('orthorhombic X: one valley', star('D2h', orth, frac_to_k(orth, [0.5, 0, 0]))['valley_count'] == 1)
check('orthorhombic interior point along x: 2 valleys',
      star('D2h', orth, frac_to_k(orth, [0.2, 0, 0]))['valley_count'] == 2)
check('orthorhombic corner R: one valley (its images are one point)',
      star('D2h', orth, frac_to_k(orth, [0.5, 0.5, 0.5]))['valley_count'] == 1)

# general points: the order of the Laue class, for every one of the 32 groups
general = [0.11, 0.17, 0.23]
cases = {
    # group: (lattice, Laue order)
    'C1': (orth, 2), 'Ci': (orth, 2), 'C2': (orth, 4), 'Cs': (orth, 4), 'C2h': (orth, 4),
    'D2': (orth, 8), 'C2v': (orth, 8), 'D2h': (orth, 8),
    'C4': (tet, 8), 'S4': (tet, 8), 'C4h': (tet, 8), 'D4': (tet, 16), 'C4v': (tet, 16),
    'D2d': (tet, 16), 'D4h': (tet, 16),
    'C3': (hexl, 6), 'S6': (hexl, 6), 'C3v': (hexl, 12), 'D3': (hexl, 12), 'D3d': (hexl, 12),
    'C6': (hexl, 12), 'C3h': (hexl, 12), 'C6h': (hexl, 12), 'D6': (hexl, 24), 'C6v': (hexl, 24),
    'D3h': (hexl, 24), 'D6h': (hexl, 24),
    'T': (fcc(si), 24), 'Th': (fcc(si), 24), 'O': (fcc(si), 48), 'Td': (fcc(si), 48),
    'Oh': (fcc(si), 48),
}
check('32 groups listed', len(cases) == 32)
for group, (lat, order) in cases.items():
    r = star(group, lat, frac_to_k(lat, general))
    check('%s: a general point has a star of %d (its Laue class)' % (group, order),
          r['valley_count'] == order and len(r['valleys']) == order)

# refusals
p = call({'valley': {'longitudinal_mass_me': 0.98, 'transverse_mass_me': 0.19, 'axis': [1, 0, 0]},
          'point_group': 'Oh', 'lattice_angstrom': fcc(si)}, expect_ok=False)
check('a lattice without the valley\'s k is refused, naming k_inv_angstrom',
      p.returncode == 2 and 'k_inv_angstrom' in p.stderr)
rot = [[a, 0, 0], [a / 2, a * math.sqrt(3) / 2, 0], [0, 0, c]]   # 60 deg cell: still hexagonal
tilted = [[4.0, 0.5, 0], [0, 4.0, 0], [0, 0, 6.0]]
p = call({'valley': {'principal_masses_me': [0.3, 0.5, 0.9], 'axes': [[1, 0, 0], [0, 1, 0], [0, 0, 1]],
                     'k_inv_angstrom': [0.1, 0, 0]},
          'point_group': 'D4h', 'lattice_angstrom': tilted}, expect_ok=False)
check('a lattice the group does not map onto itself is refused with the reason',
      p.returncode == 2 and 'does not map the lattice onto itself' in p.stderr)
check('a 60-degree cell of the same hexagonal lattice gives the same K star (2 valleys)',
      star('C6v', rot, K)['valley_count'] == 2)
p = call({'valley': {'longitudinal_mass_me': 0.98, 'transverse_mass_me': 0.19, 'axis': [1, 0, 0],
                     'k_inv_angstrom': [0.9, 0, 0]},
          'point_group': 'Oh', 'position': 'face', 'lattice_angstrom': fcc(si)}, expect_ok=False)
check('position and lattice_angstrom together are refused', p.returncode == 2)

sys.exit(1 if failures else 0)
