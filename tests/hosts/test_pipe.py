#!/usr/bin/python3
# test_pipe.py: the output of mass-tensor feeds valley-average as it is, through
# the command line and through Python (GObject introspection), electrons and holes.
import json
import math
import os
import subprocess
import sys
import tempfile
import unittest
from pathlib import Path

import gi
gi.require_version('Bandmass', '1.0')
from gi.repository import Bandmass  # noqa: E402

CLI = os.environ['BANDMASS_CLI']
EXAMPLES = Path(__file__).resolve().parents[2] / 'examples'

# hbar^2 / m_e = 7.61996 eV Angstrom^2 (CODATA; shared reference list).
HBAR2_ME = 7.61996
# The demo band of orvane telluride in examples/make_compounds.py (fcc, a = 6.1 A). Expanding its
# tight-binding forms to second order (a mathematical identity, done by hand):
# at X the conduction band has d2E/dq_x2 = 2 a^2 (t_1 + t_2) along Gamma-X and
# 2 a^2 t_2 across it; at Gamma the valence band has d2E/dq2 = -2 a^2 t_v.
A, T_V, T_1, T_2 = 6.1, 0.45, 0.30, 0.22
M_ALONG = HBAR2_ME / (2 * A * A * (T_1 + T_2))     # 0.19691
M_ACROSS = HBAR2_ME / (2 * A * A * T_2)            # 0.46542
M_HOLE = HBAR2_ME / (2 * A * A * T_V)              # 0.22754


def cli(*args):
    p = subprocess.run([CLI, *args], capture_output=True, text=True)
    if p.returncode != 0:
        raise AssertionError(f'bandmass {" ".join(args)} failed: {p.stderr}')
    return p.stdout


class Pipe(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.tmp = tempfile.TemporaryDirectory()
        subprocess.run([sys.executable, str(EXAMPLES / 'make_compounds.py'), cls.tmp.name],
                       check=True)
        cls.grid = os.path.join(cls.tmp.name, 'OrTe-grid.json')

    @classmethod
    def tearDownClass(cls):
        cls.tmp.cleanup()

    def test_other_demo_compounds(self):
        # kestrel antimonide: cosine bands 2t(1 - cos ka) have m = hbar^2 / (2 t a^2)
        # (second-order expansion, an identity); vessium nitride: a Kane band whose
        # lattice form eps -> hbar^2 k^2 / 2m at Gamma keeps the band-edge mass m
        for name, band, want in (('KeSb', 'conduction', [HBAR2_ME / (2 * 0.95 * 4.2 ** 2)] * 2
                                  + [HBAR2_ME / (2 * 0.12 * 6.4 ** 2)]),
                                 ('KeSb', 'valence', [-HBAR2_ME / (2 * 0.25 * 6.4 ** 2)]
                                  + [-HBAR2_ME / (2 * 0.35 * 4.2 ** 2)] * 2),
                                 ('VsN', 'conduction', [0.12] * 3)):
            grid = os.path.join(self.tmp.name, name + '-grid.json')
            r = json.loads(cli('mass-tensor', '--grid', grid, '--band', band, '--extremum',
                               'minimum' if band == 'conduction' else 'maximum', '--json'))
            e = r['extrema'][0]
            for got, err, ref in zip(e['principal_masses_me'], e['principal_masses_error_me'],
                                     sorted(want, key=abs)):
                self.assertLessEqual(abs(got - ref), max(2 * err, 1e-4 * abs(ref)),
                                     f'{name} {band}: {got} +- {err} against {ref}')

    def check_x_valleys(self, r):
        # X sits on the zone face: 6 positions, 3 full valleys; multi-valley
        # textbook formulas (shared reference list): m_d = g^(2/3) (m1 m2 m3)^(1/3),
        # cubic m_c = 3 / (1/m1 + 1/m2 + 1/m3).
        self.assertEqual(r['position'], 'face')
        self.assertEqual(r['carrier'], 'electron')
        self.assertEqual(r['valley_count'], 3.0)
        md = 3 ** (2 / 3) * (M_ALONG * M_ACROSS ** 2) ** (1 / 3)
        mc = 3 / (1 / M_ALONG + 2 / M_ACROSS)
        self.assertTrue(math.isclose(r['dos_mass_me'], md, rel_tol=1e-6), r['dos_mass_me'])
        self.assertTrue(math.isclose(r['conductivity_mass_me'], mc, rel_tol=1e-6))

    def test_cli_electron_valley(self):
        mt = cli('mass-tensor', '--grid', self.grid, '--band', 'conduction',
                 '--extremum', 'minimum', '--json')
        # the whole response (one extremum) and its single element both plug in
        whole = json.loads(cli('valley-average', '--valley', mt, '--point-group', 'Oh', '--json'))
        self.check_x_valleys(whole)
        element = json.dumps(json.loads(mt)['extrema'][0])
        one = json.loads(cli('valley-average', '--valley', element, '--point-group', 'Oh',
                             '--json'))
        self.assertEqual(one['dos_mass_me'], whole['dos_mass_me'])

    def test_extremum_with_every_option_plugs_in(self):
        # whatever keys mass-tensor adds on request (band cuts, a refinement
        # stencil) an extremum still goes into valley-average as it is
        mt = cli('mass-tensor', '--grid', self.grid, '--band', 'conduction', '--extremum',
                 'minimum', '--cuts', '--stencil', '--json')
        e = json.loads(mt)['extrema'][0]
        self.assertIn('band_cuts', e)
        self.assertIn('refinement_stencil', e)
        r = json.loads(cli('valley-average', '--valley', json.dumps(e), '--point-group', 'Oh',
                           '--json'))
        self.check_x_valleys(r)

    def test_cli_hole_valley(self):
        mt = cli('mass-tensor', '--grid', self.grid, '--band', 'valence',
                 '--extremum', 'maximum', '--json')
        r = json.loads(cli('valley-average', '--valley', mt, '--point-group', 'Oh', '--json'))
        self.assertEqual(r['position'], 'gamma')
        self.assertEqual(r['carrier'], 'hole')
        self.assertIn('carrier_note', r)
        self.assertTrue(math.isclose(r['dos_mass_me'], M_HOLE, rel_tol=1e-6))

    def test_python_pipe(self):
        mt = json.loads(Bandmass.call('mass-tensor', json.dumps(
            {'grid': self.grid, 'band': 'conduction', 'extremum': 'all'})))
        minima = [e for e in mt['extrema'] if e['kind'] == 'minimum']
        self.assertTrue(minima)
        r = json.loads(Bandmass.call('valley-average', json.dumps(
            {'valley': minima[0], 'point_group': 'Oh'})))
        self.check_x_valleys(r)
        # a list of extrema with their offsets: the same average
        lst = json.loads(Bandmass.call('valley-average', json.dumps(
            {'valleys': [dict(minima[0], energy_offset_ev=0.0)]})))
        self.assertEqual(lst['carrier'], 'electron')

    def test_refusals_name_the_reason(self):
        mt = json.loads(cli('mass-tensor', '--grid', self.grid, '--band', 'conduction',
                            '--extremum', 'minimum', '--json'))
        e = mt['extrema'][0]
        cases = [
            (dict(e, kind='saddle'), 'saddle'),
            (dict(e, principal_masses_me=['divergent', 0.4, 0.4]), 'divergent'),
            (dict(e, principal_masses_me=[None, 0.4, 0.4]), 'do not sample'),
            (dict(e, dims=2), 'all three'),
            (dict(e, principal_masses_me=[-0.2, 0.4, 0.4]), 'both signs'),
        ]
        for valley, fragment in cases:
            p = subprocess.run([CLI, 'valley-average', '--valley', json.dumps(valley),
                                '--point-group', 'Oh'], capture_output=True, text=True)
            self.assertEqual(p.returncode, 2, p.stderr)
            self.assertIn(fragment, p.stderr)
        two = dict(mt, extrema=[e, e])
        p = subprocess.run([CLI, 'valley-average', '--valley', json.dumps(two),
                            '--point-group', 'Oh'], capture_output=True, text=True)
        self.assertEqual(p.returncode, 2)
        self.assertIn('exactly one extremum', p.stderr)


if __name__ == '__main__':
    unittest.main(verbosity=2)
