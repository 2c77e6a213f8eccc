#!/usr/bin/python3
# test_noisy_tables.py: mass-tensor on noisy k-tables (measured-data style).
#
# References: the synthetic bands' own masses, and the statistics of a
# least-squares estimate. Over many independent Gaussian noise draws, the
# truth lies within two standard errors in about 95 % of them (a property of
# the normal distribution: P(|z| <= 2) = 0.954). The spread of
# (m - truth) / stderr is then 1. The draws are seeded, so the figures are
# fixed. hbar^2 / (2 m_e) = 3.80998212 eV Angstrom^2 (CODATA 2018).
import json
import os
import subprocess
import sys
import tempfile
import unittest

import numpy as np

CLI = sys.argv[1] if len(sys.argv) > 1 else os.environ['BANDMASS_CLI']
H = 3.80998212
DRAWS = 200
TMP = tempfile.mkdtemp(prefix='bandmass-noisy-')


def call(request):
    p = subprocess.run([CLI, 'call', 'mass-tensor'], input=json.dumps(request),
                       capture_output=True, text=True)
    if p.returncode != 0:
        raise AssertionError(p.stderr)
    return json.loads(p.stdout)


def write(name, header, rows):
    path = os.path.join(TMP, name)
    with open(path, 'w') as f:
        f.write(header + '\n')
        for r in rows:
            f.write(','.join('%.8f' % v for v in r) + '\n')
    return path


def cut(seed, m=-0.25, noise=3e-3, n=41, kmax=0.15):
    """A photoemission-like cut: 41 points, hole mass -0.25, 3 meV noise."""
    rng = np.random.default_rng(seed)
    k = np.linspace(-kmax, kmax, n)
    e = H * k ** 2 / m + noise * rng.standard_normal(n)
    return write('cut.csv', 'kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,vb_ev',
                 zip(k, 0 * k, 0 * k, e))


def plane(seed, m1=0.2, m2=0.6, noise=2e-3, n=15, kmax=0.1):
    """A 15 x 15 map with masses 0.20 and 0.60 and 2 meV noise."""
    rng = np.random.default_rng(seed)
    kx, ky = np.meshgrid(np.linspace(-kmax, kmax, n), np.linspace(-kmax, kmax, n))
    e = H * (kx ** 2 / m1 + ky ** 2 / m2) + noise * rng.standard_normal(kx.shape)
    return write('map.csv', 'kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,cb_ev',
                 zip(kx.ravel(), ky.ravel(), 0 * kx.ravel(), e.ravel()))


def kane(seed, m=0.067, alpha=0.64, noise=2e-3, n=61, kmax=0.12):
    """A Kane band E(1 + alpha E) = hbar^2 k^2 / 2m with 2 meV noise."""
    rng = np.random.default_rng(seed)
    k = np.linspace(-kmax, kmax, n)
    g = H * k ** 2 / m
    e = (-1 + np.sqrt(1 + 4 * alpha * g)) / (2 * alpha) + noise * rng.standard_normal(n)
    return write('kane.csv', 'kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,cb_ev',
                 zip(k, 0 * k, 0 * k, e))


def draws(make, extremum, truth):
    """masses, standard errors, total errors: arrays (draws x masses)."""
    out = {'m': [], 'se': [], 'err': [], 'e': []}
    for seed in range(DRAWS):
        e = call({'table': make(seed), 'extremum': extremum})['extrema'][0]
        out['m'].append(e['principal_masses_me'][:len(truth)])
        out['se'].append(e['principal_masses_stderr_me'][:len(truth)])
        out['err'].append(e['principal_masses_error_me'][:len(truth)])
        out['e'].append(e)
    for key in ('m', 'se', 'err'):
        out[key] = np.array(out[key], dtype=float)
    return out


class Coverage(unittest.TestCase):
    def check(self, make, extremum, truth):
        d = draws(make, extremum, truth)
        for i, t in enumerate(truth):
            z = (d['m'][:, i] - t) / d['se'][:, i]
            inside = np.mean(np.abs(z) <= 2)
            print('%s mass %d: mean %.5f (truth %.3f), inside 2 stderr %.1f %%, '
                  'sd(z) %.3f' % (make.__name__, i, d['m'][:, i].mean(), t, 100 * inside,
                                  z.std()))
            with self.subTest(case=make.__name__, mass=i):
                self.assertLess(abs(d['m'][:, i].mean() / t - 1), 0.005)
                self.assertTrue(0.90 <= inside <= 0.98, inside)
                self.assertTrue(0.8 <= z.std() <= 1.25, z.std())
                # the total error is never below the standard error
                self.assertTrue(np.all(d['err'][:, i] >= d['se'][:, i] * (1 - 1e-12)))
        return d

    def test_cut(self):
        d = self.check(cut, 'maximum', [-0.25])
        # the window grew over the cut, and the residual is not blamed on
        # non-parabolicity
        grown = np.mean([e['fit_window']['chosen_by'] == 'grown' for e in d['e']])
        self.assertGreater(grown, 0.95)
        blamed = sum('non-parabolic' in e['warning_codes'] for e in d['e'])
        self.assertEqual(blamed, 0)

    def test_map(self):
        self.check(plane, 'minimum', [0.2, 0.6])


class NonParabolicNoisy(unittest.TestCase):
    """Where the band is not parabolic the standard error alone does not cover
    the band-edge mass (bias); the total error must, or the mass is flagged."""

    def test_kane(self):
        covered = 0
        for seed in range(50):
            e = call({'table': kane(seed), 'extremum': 'minimum'})['extrema'][0]
            m, err = e['principal_masses_me'][0], e['principal_masses_error_me'][0]
            ok = abs(m - 0.067) <= 2 * err
            covered += ok
            with self.subTest(seed=seed):
                self.assertTrue(ok or not e['converged'])
        self.assertGreaterEqual(covered, 45)


class CleanData(unittest.TestCase):
    """Exact energies of a non-parabolic band keep the small default window
    (the terms beyond quadratic are significant at once)."""

    def test_default_window_on_exact_kane(self):
        k = np.linspace(-0.12, 0.12, 61)
        g = H * k ** 2 / 0.067
        e = (-1 + np.sqrt(1 + 4 * 0.64 * g)) / (2 * 0.64)
        path = write('kane-exact.csv', 'kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,cb_ev',
                     zip(k, 0 * k, 0 * k, e))
        x = call({'table': path, 'extremum': 'minimum'})['extrema'][0]
        self.assertEqual(x['fit_window']['chosen_by'], 'default')
        self.assertLess(x['fit_window']['beyond_quadratic_p_value'], 0.01)
        m, err = x['principal_masses_me'][0], x['principal_masses_error_me'][0]
        self.assertLessEqual(abs(m - 0.067), 2 * err)


class TwoColumnCut(unittest.TestCase):
    """k_inv_angstrom along a direction given in the request: the same mass and
    standard error as the three-column table of the same points."""

    def test_same_as_cartesian(self):
        rng = np.random.default_rng(7)
        s = np.linspace(-0.15, 0.15, 41)
        e = H * s ** 2 / -0.25 + 3e-3 * rng.standard_normal(41)
        d = np.array([1.0, 1.0, 0.0]) / np.sqrt(2)
        two = write('two.csv', 'k_inv_angstrom,vb_ev', zip(s, e))
        three = write('three.csv', 'kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,vb_ev',
                      zip(s * d[0], s * d[1], s * d[2], e))
        a = call({'table': two, 'cut_direction': [1, 1, 0]})['extrema'][0]
        b = call({'table': three})['extrema'][0]
        # (the three-column file holds k rounded to 1e-8)
        np.testing.assert_allclose(a['principal_masses_me'][0], b['principal_masses_me'][0],
                                   rtol=1e-6)
        np.testing.assert_allclose(a['principal_masses_stderr_me'][0],
                                   b['principal_masses_stderr_me'][0], rtol=1e-5)
        np.testing.assert_allclose(a['principal_axes'][0], d, atol=1e-12)

    def test_direction_required(self):
        s = np.linspace(-0.1, 0.1, 11)
        two = write('two-bare.csv', 'k_inv_angstrom,vb_ev', zip(s, -s ** 2))
        p = subprocess.run([CLI, 'call', 'mass-tensor'], input=json.dumps({'table': two}),
                           capture_output=True, text=True)
        self.assertEqual(p.returncode, 2)
        self.assertIn('cut_direction', p.stderr)
        self.assertEqual(p.stdout, '')


if __name__ == '__main__':
    unittest.main(argv=sys.argv[:1], verbosity=2)
