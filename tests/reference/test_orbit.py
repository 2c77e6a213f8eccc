#!/usr/bin/python3
# test_orbit.py: cyclotron-orbit against independent routes.
# The band: an orthorhombic nearest-neighbour cosine band (t = 0.5, 0.3, 0.8 eV;
# a = 4, 5, 3.5 A) on a 32^3 mesh.  References: the section area of the
# analytic band by SciPy quadrature and m_c = (hbar^2 / 2 pi) dA/dE (Onsager;
# textbook); near the band bottom, the ellipsoid formula sqrt(det M / b.M.b)
# (identity of the parabolic limit) and the project's own cyclotron-ellipsoid
# route; a sheet (n3 = 1) the same quadrature in 2D; open orbits near the top.
import json
import os
import subprocess
import sys
import tempfile
import unittest

import numpy as np
from scipy.integrate import quad

CLI = sys.argv[1] if len(sys.argv) > 1 else os.environ['BANDMASS_CLI']
HB = 7.619964231
T = np.array([0.5, 0.3, 0.8])
A = np.array([4.0, 5.0, 3.5])
EC = -2 * T.sum()
M = HB / (2 * T * A * A)


def call(op, req):
    p = subprocess.run([CLI, 'call', op], input=json.dumps(req), capture_output=True, text=True)
    if p.returncode != 0:
        raise AssertionError(p.stderr)
    return json.loads(p.stdout)


def section_area(e, tz_shift=True):
    """Area of -2tx cos(kx ax) - 2ty cos(ky ay) - 2tz = e (the kz = 0 section)."""
    e2 = e + (2 * T[2] if tz_shift else 0.0)

    def ky(kx):
        c = (-e2 - 2 * T[0] * np.cos(kx * A[0])) / (2 * T[1])
        return 0.0 if c >= 1 else (np.pi / A[1] if c <= -1 else np.arccos(c) / A[1])
    return 4 * quad(ky, 0, np.pi / A[0], limit=200, epsabs=1e-14)[0]


def mass_ref(e, tz_shift=True, h=1e-4):
    return HB / (2 * np.pi) * (section_area(e + h, tz_shift) - section_area(e - h, tz_shift)) / (2 * h)


class CosineOrbits(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.tmp = tempfile.TemporaryDirectory()
        f = np.arange(32) / 32
        F = np.stack(np.meshgrid(f, f, f, indexing='ij'), 0)
        e = -2 * sum(T[i] * np.cos(2 * np.pi * F[i]) for i in range(3))
        np.save(os.path.join(cls.tmp.name, 'g.npy'), e[None])
        cls.grid = os.path.join(cls.tmp.name, 'g.json')
        json.dump({'format': 'bandmass-grid-1', 'mesh': [32, 32, 32],
                   'reciprocal_vectors_inv_angstrom': np.diag(2 * np.pi / A).tolist(),
                   'energies_ev': 'g.npy'}, open(cls.grid, 'w'))
        fs = np.arange(48) / 48
        F2 = np.stack(np.meshgrid(fs, fs, indexing='ij'), 0)
        e2 = -2 * (T[0] * np.cos(2 * np.pi * F2[0]) + T[1] * np.cos(2 * np.pi * F2[1]))
        np.save(os.path.join(cls.tmp.name, 's.npy'), e2[None, :, :, None])
        cls.sheet = os.path.join(cls.tmp.name, 's.json')
        json.dump({'format': 'bandmass-grid-1', 'mesh': [48, 48, 1],
                   'reciprocal_vectors_inv_angstrom': [[2 * np.pi / A[0], 0, 0],
                                                       [0, 2 * np.pi / A[1], 0], [0, 0, 1]],
                   'energies_ev': 's.npy'}, open(cls.sheet, 'w'))

    def test_area_and_mass_by_quadrature(self):
        for de in (0.1, 0.3, 0.6):
            r = call('cyclotron-orbit', {'grid': self.grid, 'band': 0, 'energy_ev': EC + de,
                                         'field_direction': [0, 0, 1]})
            o = [o for o in r['orbits'] if abs(o['k_parallel_inv_angstrom']) < 1e-9][0]
            with self.subTest(de=de):
                self.assertEqual(o['extremum'], 'maximum')
                self.assertLess(abs(o['area_inv_angstrom2'] / section_area(EC + de) - 1), 1e-4)
                self.assertLess(abs(o['cyclotron_mass_me'] / mass_ref(EC + de) - 1), 1e-3)
                # Onsager: F = hbar A / (2 pi e) = 1.0475e4 T per 1/A^2 (CODATA; from memory)
                self.assertAlmostEqual(o['frequency_t'] / o['area_inv_angstrom2'] / 10475.7, 1.0,
                                       delta=1e-4)

    def test_band_bottom_matches_ellipsoid_routes(self):
        b = np.array([1.0, 2.0, 3.0]) / np.sqrt(14.0)
        r = call('cyclotron-orbit', {'grid': self.grid, 'band': 0, 'energy_ev': EC + 0.002,
                                     'field_direction': b.tolist()})
        mc = np.sqrt(np.prod(M) / (b @ np.diag(M) @ b))
        got = r['orbits'][0]['cyclotron_mass_me']
        self.assertLess(abs(got / mc - 1), 1e-3)
        # the project's ellipsoid route, one valley at Gamma
        el = call('cyclotron-ellipsoid', {'valley': {'principal_masses_me': M.tolist(),
                                                     'axes': np.eye(3).tolist()},
                                          'point_group': 'C1', 'position': 'gamma',
                                          'field_direction': b.tolist()})
        self.assertLess(abs(got / el['lines'][0]['cyclotron_mass_me'] - 1), 1e-3)

    def test_sheet(self):
        for de in (0.1, 0.5):
            r = call('cyclotron-orbit', {'grid': self.sheet, 'band': 0,
                                         'energy_ev': -2 * (T[0] + T[1]) + de,
                                         'field_direction': [0, 0, 1]})
            o = r['orbits'][0]
            with self.subTest(de=de):
                self.assertEqual(o['extremum'], 'sheet')
                ref = mass_ref(-2 * (T[0] + T[1]) + de, tz_shift=False)
                self.assertLess(abs(o['cyclotron_mass_me'] / ref - 1), 1e-3)

    def test_open_and_missed(self):
        # above the saddle energies the surface is open along z: no mass
        r = call('cyclotron-orbit', {'grid': self.grid, 'band': 0, 'energy_ev': -0.2,
                                     'field_direction': [0, 0, 1]})
        self.assertTrue(r['open'])
        self.assertEqual(r['orbits'], [])
        self.assertIn('open-surface', r['warning_codes'])
        r = call('cyclotron-orbit', {'grid': self.grid, 'band': 0, 'energy_ev': EC - 0.1,
                                     'field_direction': [0, 0, 1]})
        self.assertEqual(r['orbits'], [])
        self.assertIn('no-extremum', r['warning_codes'])

    def test_sweep(self):
        r = call('cyclotron-orbit', {'grid': self.grid, 'band': 0, 'energy_ev': EC + 0.05,
                                     'field_directions': {'from': [0, 0, 1], 'to': [1, 0, 0],
                                                          'steps': 7}})
        self.assertEqual(len(r['points']), 7)
        # along z then x: the ellipsoid's sqrt(mx my) and sqrt(my mz), to first order
        first = r['points'][0]['orbits'][0]['cyclotron_mass_me']
        last = r['points'][-1]['orbits'][0]['cyclotron_mass_me']
        self.assertLess(abs(first / mass_ref(EC + 0.05) - 1), 1e-3)
        self.assertGreater(last, np.sqrt(M[1] * M[2]) * 0.99)


class SiliconOrbits(unittest.TestCase):
    def test_x_valley(self):
        # first-principles silicon, 32^3, 8 meV above the X-valley minimum:
        # against the ellipsoid formula with the DFT point masses of
        # si-reference.json (m_l along the valley axis [100])
        data = os.path.join(os.path.dirname(os.path.abspath(__file__)), '..', 'data',
                            'first-principles')
        ref = json.load(open(os.path.join(data, 'si-reference.json')))
        ml, mt = ref['longitudinal_mass_me'][0], ref['transverse_mass_me'][0]
        m = np.diag([ml, mt, mt])
        r = call('cyclotron-orbit', {'grid': os.path.join(data, 'si-32.json'), 'band': 'c1',
                                     'energy_ev': ref['conduction_minimum_ev'] + 0.008,
                                     'field_directions': [[1, 0, 0], [0, 0, 1], [1, 1, 1]]})
        # measured +0.8 %, -0.2 % and +0.4 %
        for p, tol in zip(r['points'], (0.015, 0.01, 0.01)):
            b = np.array(p['field_direction'])
            mc = np.sqrt(np.linalg.det(m) / (b @ m @ b))
            with self.subTest(b=b.tolist()):
                self.assertEqual(len(p['orbits']), 1)
                self.assertLess(abs(p['orbits'][0]['cyclotron_mass_me'] / mc - 1), tol)


class WarpedHeavyHoles(unittest.TestCase):
    """Two routes to one answer: the warped heavy-hole band of GaAs's Luttinger
    parameters (6.98, 2.06, 2.93) put on a 64^3 grid (a 0.5 1/A cube about
    Gamma, the hole energy turned into an electron energy) through
    cyclotron-orbit, against cyclotron-holes' own orbit integration of the
    same dispersion."""

    def test_against_cyclotron_holes(self):
        g1, g2, g3 = 6.98, 2.06, 2.93
        n, G = 64, 0.5
        f = (np.arange(n) / n + 0.5) % 1 - 0.5
        k = G * np.stack(np.meshgrid(f, f, f, indexing='ij'), -1)
        kx, ky, kz = k[..., 0], k[..., 1], k[..., 2]
        k2 = (k ** 2).sum(-1)
        eh = HB / 2 * (g1 * k2 - np.sqrt((2 * g2) ** 2 * k2 ** 2 + 12 * (g3 ** 2 - g2 ** 2)
                                         * (kx * kx * ky * ky + ky * ky * kz * kz
                                            + kz * kz * kx * kx)))
        # f wraps: index 0 is k = 0, as the grid format wants
        with tempfile.TemporaryDirectory() as tmp:
            np.save(os.path.join(tmp, 'hh.npy'), (-eh)[None])
            grid = os.path.join(tmp, 'hh.json')
            json.dump({'format': 'bandmass-grid-1', 'mesh': [n] * 3,
                       'reciprocal_vectors_inv_angstrom': (G * np.eye(3)).tolist(),
                       'energies_ev': 'hh.npy'}, open(grid, 'w'))
            for b in ([0, 0, 1], [1, 1, 1], [1, 1, 0]):
                r = call('cyclotron-orbit', {'grid': grid, 'band': 0, 'energy_ev': -0.01,
                                             'k_centre_inv_angstrom': [0, 0, 0],
                                             'field_direction': b})
                h = call('cyclotron-holes', {'luttinger_parameters': [g1, g2, g3],
                                             'field_direction': b, 'hole_energy_ev': 0.01})
                ours = {round(o['k_parallel_inv_angstrom'], 3): o for o in r['orbits']}
                for o in h['heavy']['orbits']:
                    with self.subTest(b=b, k=o['k_parallel_inv_angstrom']):
                        mine = [v for kk, v in ours.items()
                                if abs(abs(kk) - o['k_parallel_inv_angstrom']) < 2e-3]
                        self.assertTrue(mine)
                        tol = 1e-3 if o['central'] else 1e-2
                        self.assertLess(abs(-mine[0]['cyclotron_mass_me']
                                            / o['cyclotron_mass_me'] - 1), tol)


if __name__ == '__main__':
    unittest.main(argv=sys.argv[:1], verbosity=2)
