#!/usr/bin/python3
"""test_demo_study.py: the demo study (examples/study.py) runs end to end
through bandmass batch within a minute, every item answers, the report ranks
every candidate, the plots are written, and the figures it rests on are the
ones the operations give (the model compounds' band-edge masses against their
tight-binding expansions; Si, Ge, GaAs conductivity masses from the handbook
valleys: m_c = 3 / (1/m_l + 2/m_t), a textbook identity)."""
import json
import os
import subprocess
import sys
import tempfile
import time
import unittest
from pathlib import Path

CLI = os.environ['BANDMASS_CLI']
STUDY = Path(__file__).resolve().parents[2] / 'examples' / 'study.py'


class DemoStudy(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.tmp = tempfile.TemporaryDirectory()
        cls.out = Path(cls.tmp.name) / 'study'
        t0 = time.perf_counter()
        cls.result = subprocess.run(['/usr/bin/python3', str(STUDY), CLI, str(cls.out)],
                                 capture_output=True, text=True)
        cls.seconds = time.perf_counter() - t0

    @classmethod
    def tearDownClass(cls):
        cls.tmp.cleanup()

    def test_runs_and_reports(self):
        self.assertEqual(self.result.returncode, 0, self.result.stderr)
        # under a minute once built; the sanitizer pass runs four times slower
        limit = 240.0 if 'BANDMASS_ASAN_RUNTIME' in os.environ else 60.0
        self.assertLess(self.seconds, limit)
        print('study: %.1f s' % self.seconds, file=sys.stderr)
        report = json.loads((self.out / 'report.json').read_text())
        names = [r['candidate'] for r in report['rows']]
        self.assertEqual(names, ['OrTe', 'KeSb', 'VsN', 'Si', 'Ge', 'GaAs'])
        for r in report['rows']:
            self.assertIsNotNone(r['conductivity_mass_me'], r)
            self.assertIsNotNone(r['thermal_velocity_cm_per_s'], r)
        self.assertIn('lightest conductivity mass: GaAs', self.result.stdout)
        self.assertEqual(len((self.out / 'report.csv').read_text().splitlines()), 7)
        pngs = sorted(p.name for p in self.out.glob('*.png'))
        self.assertEqual(len(pngs), 15, pngs)

    def test_every_item_answered(self):
        for n in (1, 2, 3):
            lines = (self.out / f'results-{n}.jsonl').read_text().splitlines()
            items = [json.loads(x) for x in lines[1:]]
            self.assertTrue(items)
            for it in items:
                self.assertEqual(it['status'], 'ok', it)

    def test_figures_from_the_models(self):
        rows = {r['candidate']: r for r in json.loads((self.out / 'report.json').read_text())['rows']}
        # KeSb: one Gamma valley, cosine band: m = hbar^2 / (2 t a^2) in the plane
        # (t = 0.95 eV, a = 4.2 A) and along c (t = 0.12 eV, c = 6.4 A); hbar^2/m_e
        # = 7.61996 eV A^2 (CODATA, from memory)
        ma, mc = 7.61996 / (2 * 0.95 * 4.2 ** 2), 7.61996 / (2 * 0.12 * 6.4 ** 2)
        self.assertAlmostEqual(rows['KeSb']['conductivity_mass_me'], 3 / (2 / ma + 1 / mc), 3)
        self.assertEqual(rows['OrTe']['valleys'], 3.0)   # six X half valleys
        # Si handbook valleys m_l 0.98, m_t 0.19 (Sze & Ng 2007, from memory)
        self.assertAlmostEqual(rows['Si']['conductivity_mass_me'],
                               3 / (1 / 0.98 + 2 / 0.19), 2)


if __name__ == '__main__':
    unittest.main(verbosity=2)
