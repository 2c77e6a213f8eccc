#!/usr/bin/python3
# test_grid_layouts.py: band grids as DFT codes lay them out -- a k-point list in
# any order over (-1/2, 1/2], and a shifted (Monkhorst-Pack) mesh -- give the
# answers of the plain Gamma-centred document; bad lists are refused by row.
import json
import math
import os
import subprocess
import tempfile
import unittest

import numpy as np

CLI = os.environ['BANDMASS_CLI']
DATA = os.path.join(os.path.dirname(os.path.abspath(__file__)), '..', 'data', 'first-principles')
HBAR2_ME = 7.61996   # eV Angstrom^2 (CODATA; shared reference list)


def call(request):
    p = subprocess.run([CLI, 'call', 'mass-tensor'], input=json.dumps(request),
                       capture_output=True, text=True)
    return p


class Layouts(unittest.TestCase):
    def setUp(self):
        self.tmp = tempfile.TemporaryDirectory()

    def tearDown(self):
        self.tmp.cleanup()

    def write(self, name, doc):
        path = os.path.join(self.tmp.name, name)
        with open(path, 'w') as f:
            json.dump(doc, f)
        return path

    def si_list(self, order):
        doc = json.load(open(os.path.join(DATA, 'si-12.json')))
        e = np.load(os.path.join(DATA, 'si-12.npy'))
        n = 12
        idx = np.indices((n, n, n)).reshape(3, -1).T
        frac = idx / n
        frac[frac > 0.5] -= 1.0        # the (-1/2, 1/2] convention of DFT k lists
        frac, flat = frac[order], e.reshape(e.shape[0], -1)[:, order]
        np.save(os.path.join(self.tmp.name, 'list.npy'), np.ascontiguousarray(flat))
        del doc['energies_ev']
        doc.update({'k_points_fractional': frac.tolist(), 'energies_ev': 'list.npy'})
        return self.write('list.json', doc)

    def test_shuffled_list_equals_grid(self):
        order = np.random.default_rng(7).permutation(12 ** 3)
        path = self.si_list(order)
        a = json.loads(call({'grid': path, 'band': 'c1', 'extremum': 'minimum'}).stdout)
        b = json.loads(call({'grid': os.path.join(DATA, 'si-12.json'), 'band': 'c1',
                             'extremum': 'minimum'}).stdout)
        ea, eb = a['extrema'][0], b['extrema'][0]
        self.assertEqual(ea['principal_masses_me'], eb['principal_masses_me'])
        self.assertEqual(ea['k_inv_angstrom'], eb['k_inv_angstrom'])

    def test_bad_lists_named_by_row(self):
        doc = {'format': 'bandmass-grid-1', 'reciprocal_vectors_inv_angstrom':
               [[1, 0, 0], [0, 1, 0], [0, 0, 1]], 'mesh': [2, 1, 1]}
        cases = [
            ([[0, 0, 0], [0, 0, 0]], 'are the same mesh point'),
            ([[0, 0, 0], [0.3, 0, 0]], "'k_points_fractional'[1] = (0.3, 0, 0) is not a point"),
            ([[0, 0, 0]], 'lists 1 points'),
        ]
        for ks, fragment in cases:
            path = self.write('bad.json', dict(doc, k_points_fractional=ks,
                                               energies_ev=[[0.0] * len(ks)]))
            p = call({'grid': path, 'band': 0})
            self.assertEqual(p.returncode, 2, p.stderr)
            self.assertIn(fragment, p.stderr)

    def test_spin_channels(self):
        # a non-magnetic calculation written spin-polarised: the down bands
        # equal the up bands. With spin_channels 2 each channel is its own set
        # of bands and the masses are those of the plain grid; stacked without
        # it, every band "touches" its twin and no mass is given.
        doc = json.load(open(os.path.join(DATA, 'si-12.json')))
        e = np.load(os.path.join(DATA, 'si-12.npy'))
        np.save(os.path.join(self.tmp.name, 'spin.npy'), np.ascontiguousarray(np.concatenate([e, e])))
        names = doc['band_names']
        doc.update({'energies_ev': 'spin.npy', 'spin_channels': 2,
                    'band_names': [f'up-{n}' for n in names] + [f'down-{n}' for n in names]})
        plain = json.loads(call({'grid': os.path.join(DATA, 'si-12.json'), 'band': 'c2',
                                 'extremum': 'all'}).stdout)['extrema']
        spin = json.loads(call({'grid': self.write('spin.json', doc), 'band': 'down-c2',
                                'extremum': 'all'}).stdout)['extrema']
        self.assertEqual([x['principal_masses_me'] for x in spin],
                         [x['principal_masses_me'] for x in plain])
        del doc['spin_channels']
        stacked = json.loads(call({'grid': self.write('stacked.json', doc), 'band': 'down-c2',
                                   'extremum': 'all'}).stdout)['extrema']
        self.assertTrue(any('degenerate-extremum' in x['warning_codes'] for x in stacked))
        self.assertTrue(any('spin_channels' in w for x in stacked for w in x['warnings']))

    def test_irreducible_wedge(self):
        # GPAW's 72 irreducible points of the 12^3 silicon mesh, unfolded with
        # the rotations spglib finds for the diamond structure plus time
        # reversal, give the full grid the code's own zone-to-wedge map gave
        # (si-12.json; the two DFT runs agree to 1e-8 eV)
        wedge = os.path.join(DATA, 'si-12-wedge.json')
        a = json.loads(call({'grid': wedge, 'band': 'c1', 'extremum': 'minimum'}).stdout)
        b = json.loads(call({'grid': os.path.join(DATA, 'si-12.json'), 'band': 'c1',
                             'extremum': 'minimum'}).stdout)
        for x, y in zip(a['extrema'][0]['principal_masses_me'],
                        b['extrema'][0]['principal_masses_me']):
            self.assertTrue(math.isclose(x, y, rel_tol=1e-5), (x, y))
        doc = json.load(open(wedge))
        # without the atoms the list is just incomplete
        p = call({'grid': self.write('w1.json', {k: v for k, v in doc.items()
                                                  if k not in ('positions_fractional', 'species')}),
                  'band': 0})
        self.assertEqual(p.returncode, 2)
        self.assertIn("give 'positions_fractional' and 'species'", p.stderr)
        # an atom moved off its site lowers the symmetry: the wedge no longer
        # covers the mesh (two species would not: zincblende with time reversal
        # has the same k-space symmetry as diamond)
        moved = [doc['positions_fractional'][0], [0.25, 0.25, 0.31]]
        p = call({'grid': self.write('w2.json', dict(doc, positions_fractional=moved)), 'band': 0})
        self.assertEqual(p.returncode, 2)
        self.assertIn('not an irreducible wedge', p.stderr)

    def test_shifted_mesh(self):
        # E = sum_a 2 t (1 - cos k_a a) on a simple cubic lattice, sampled on an
        # even 8^3 mesh shifted by half a step (no point at Gamma): with
        # mesh_offset the minimum is found at Gamma with m = hbar^2 / (2 t a^2)
        # (Taylor series of the cosine); without it the mesh would be placed
        # half a step off and k reported wrong
        a, t, n = 4.0, 0.5, 8
        f = (np.arange(n) + 0.5) / n
        fx, fy, fz = np.meshgrid(f, f, f, indexing='ij')
        e = sum(2 * t * (1 - np.cos(2 * np.pi * x)) for x in (fx, fy, fz))[np.newaxis]
        b = 2 * np.pi / a
        doc = {'format': 'bandmass-grid-1',
               'reciprocal_vectors_inv_angstrom': [[b, 0, 0], [0, b, 0], [0, 0, b]],
               'mesh': [n, n, n], 'mesh_offset': [0.5, 0.5, 0.5], 'energies_ev': e.tolist()}
        r = json.loads(call({'grid': self.write('mp.json', doc), 'band': 0,
                             'extremum': 'minimum'}).stdout)
        ex = r['extrema'][0]
        self.assertLess(max(abs(k) for k in ex['k_inv_angstrom']), 1e-6)
        for m in ex['principal_masses_me']:
            self.assertTrue(math.isclose(m, HBAR2_ME / (2 * t * a * a), rel_tol=1e-6))


if __name__ == '__main__':
    unittest.main(verbosity=2)
