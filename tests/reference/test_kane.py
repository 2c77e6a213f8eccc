#!/usr/bin/python3
# test_kane.py: kane-fit against its construction and independent routes.
# A k-table built from an ellipsoidal Kane band E (1 + alpha E) = sum hbar^2 k_i^2 / 2m_i
# (Kane, J. Phys. Chem. Solids 1, 249 (1957); the one-band form, from memory)
# must give back its masses and alpha; with noise, the stated standard errors
# must cover the truth at their nominal rate; the thermal masses of the fitted
# band are checked against SciPy quadrature of the density of states and a
# NumPy sum of the analytic velocities over k-space (tests only).
import json
import os
import subprocess
import sys
import tempfile
import unittest

import numpy as np
from scipy.integrate import quad

CLI = sys.argv[1] if len(sys.argv) > 1 else os.environ['BANDMASS_CLI']
HB = 7.619964231      # hbar^2 / m_e, eV A^2 (CODATA 2018)
KB = 8.617333262e-5   # eV/K
M = np.array([0.2, 0.3, 0.9])
ALPHA = 0.5
DATA = os.path.join(os.path.dirname(os.path.abspath(__file__)), '..', 'data', 'first-principles')


def kane_energy(k, m, alpha):
    gam = (HB / 2 * k ** 2 / m).sum(-1)
    return gam if alpha == 0 else (np.sqrt(1 + 4 * alpha * gam) - 1) / (2 * alpha)


def table(folder, noise=0.0, seed=0, alpha=ALPHA, n=9, reach=0.12):
    g = np.linspace(-reach, reach, n)
    k = np.stack(np.meshgrid(g, g, g, indexing='ij'), -1).reshape(-1, 3)
    e = kane_energy(k, M, alpha) + 1.0
    e += np.random.default_rng(seed).normal(0, noise, len(e)) if noise else 0
    path = os.path.join(folder, f'kane-{seed}.csv')
    with open(path, 'w') as f:
        f.write('kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,c_ev\n')
        for kk, ee in zip(k, e):
            f.write('%.10f,%.10f,%.10f,%.12f\n' % (*kk, ee))
    return path


def kane_fit(**req):
    p = subprocess.run([CLI, 'call', 'kane-fit'], input=json.dumps(req), capture_output=True,
                       text=True)
    if p.returncode != 0:
        raise AssertionError(p.stderr)
    return json.loads(p.stdout)


def sorted_masses(fit):
    return np.sort(np.abs(fit['principal_masses_me']))


class KaneTable(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.tmp = tempfile.TemporaryDirectory()

    def test_exact_band_comes_back(self):
        r = kane_fit(table=table(self.tmp.name), band='c', energy_window_ev=0.3)
        self.assertEqual(r['preferred'], 'kane')
        self.assertTrue(np.allclose(sorted_masses(r['kane']), M, rtol=1e-6))
        self.assertAlmostEqual(r['kane']['alpha_per_ev'], ALPHA, delta=1e-6)
        self.assertAlmostEqual(r['edge_ev'], 1.0, delta=1e-9)
        # the parabolic fit of a Kane band is heavier and leaves residuals
        self.assertTrue(np.all(sorted_masses(r['parabolic']) > M))
        self.assertGreater(r['parabolic']['rms_residual_ev'], 1e-3)

    def test_standard_errors_cover_the_truth(self):
        # 100 seeded draws of 2 meV noise: alpha within two standard errors in
        # about 95 % of them (a normal fit; the Gauss-Newton covariance)
        inside = 0
        for seed in range(100):
            # the whole table: a window cuts noisy points by their noisy energies
            r = kane_fit(table=table(self.tmp.name, noise=0.002, seed=seed), band='c',
                         energy_window_ev=1.0)
            k = r['kane']
            inside += abs(k['alpha_per_ev'] - ALPHA) < 2 * k['alpha_stderr_per_ev']
        self.assertGreaterEqual(inside, 88)
        self.assertLessEqual(inside, 99)

    def test_parabolic_band_prefers_parabolic(self):
        picks = [kane_fit(table=table(self.tmp.name, noise=0.001, seed=s, alpha=0.0), band='c',
                          energy_window_ev=0.3)['preferred'] for s in range(20)]
        self.assertGreaterEqual(picks.count('parabolic'), 14)

    def test_thermal_masses(self):
        temps = [77.0, 300.0, 600.0]
        r = kane_fit(table=table(self.tmp.name), band='c', energy_window_ev=0.3,
                     temperatures_k=temps)
        geo = np.prod(M) ** (1 / 3)
        for T, p in zip(temps, r['points']):
            kt = KB * T
            # DOS: int sqrt(gamma) (1 + 2 alpha E) e^(-E/kT) dE against the parabolic one
            i_k = quad(lambda e: np.sqrt(e * (1 + ALPHA * e)) * (1 + 2 * ALPHA * e)
                       * np.exp(-e / kt), 0, 80 * kt, epsabs=0, epsrel=1e-12)[0]
            i_p = 0.5 * np.sqrt(np.pi) * kt ** 1.5
            md = geo * (i_k / i_p) ** (2 / 3)
            # conductivity: k-space sum of the analytic velocity, scaled coordinates
            kmax = np.sqrt(2 * 30 * kt * (1 + 30 * ALPHA * kt) / HB)
            g = (np.arange(120) + 0.5) / 120 * 2 * kmax - kmax
            x = np.stack(np.meshgrid(g, g, g, indexing='ij'), -1).reshape(-1, 3)
            k = x * np.sqrt(M)              # k_i = sqrt(m_i) x_i: gamma = HB/2 |x|^2
            e = kane_energy(k, M, ALPHA)
            u = 1 + 2 * ALPHA * e
            w = np.exp(-e / kt)
            vx = HB * k[:, 0] / M[0] / u     # hbar v_x = dE/dk_x
            mcx = HB * kt * w.sum() / (vx * vx * w).sum()
            with self.subTest(T=T):
                self.assertLess(abs(p['dos_mass_me'] / md - 1), 1e-6)
                self.assertLess(abs(sorted(p['conductivity_principal_masses_me'])[0] / mcx - 1),
                                2e-3)
                # the masses rise with temperature (alpha > 0)
                self.assertGreater(p['dos_mass_me'], geo)


class SiliconGrid(unittest.TestCase):
    def test_silicon_conduction(self):
        # first-principles silicon, 32^3: the band-edge masses of the Kane fit
        # along the principal axes against the DFT point masses (si-reference.json)
        ref = json.load(open(os.path.join(DATA, 'si-reference.json')))
        r = kane_fit(grid=os.path.join(DATA, 'si-32.json'), band='c1', energy_window_ev=0.1)
        ml, mt = ref['longitudinal_mass_me'][0], ref['transverse_mass_me'][0]
        m = sorted_masses(r[r['preferred']])
        self.assertLess(abs(m[0] / mt - 1), 0.05)
        self.assertLess(abs(m[2] / ml - 1), 0.05)


if __name__ == '__main__':
    unittest.main(argv=sys.argv[:1], verbosity=2)
