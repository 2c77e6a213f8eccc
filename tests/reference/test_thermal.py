#!/usr/bin/python3
# test_thermal.py: thermal-mass against independent computations.
#
# The band: simple-cubic nearest-neighbour tight binding, E = -2t sum cos(k_i a)
# (a = 5 Angstrom, t = 0.5 eV), handed to bandmass as a 40^3 mesh.  The
# reference is a plain NumPy evaluation of the same definitions (Boltzmann
# transport in the constant relaxation-time approximation, N_c by the
# Boltzmann-weighted state count) on the analytic band and its analytic
# velocities over a 240^3 mesh, which no interpolation enters.  Identities:
# the band-bottom mass hbar^2 / (2 t a^2) at low temperature (Taylor
# expansion of the cosine); cubic symmetry makes the conductivity tensor
# isotropic; the non-degenerate Seebeck coefficient of a parabolic band with
# constant tau, -(k/e)(5/2 - eta) (Boltzmann transport, textbook; from memory),
# approached by the cosine band at low temperature.
import json
import os
import subprocess
import sys
import tempfile
import unittest

import numpy as np

CLI = sys.argv[1] if len(sys.argv) > 1 else os.environ['BANDMASS_CLI']
A, T_HOP = 5.0, 0.5
HBAR2_ME = 7.619964231    # eV A^2 (CODATA 2018)
KB = 8.617333262e-5       # eV/K (CODATA 2018)


def band(k):
    return -2 * T_HOP * np.cos(k * A).sum(-1)


def velocity(k):      # hbar v = dE/dk, eV A
    return 2 * T_HOP * A * np.sin(k * A)


def write_grid(folder, n):
    f = np.arange(n) / n
    k = 2 * np.pi / A * np.stack(np.meshgrid(f, f, f, indexing='ij'), -1)
    e = band(k)[None]
    np.save(os.path.join(folder, 'cos.npy'), e)
    doc = {'format': 'bandmass-grid-1', 'mesh': [n, n, n],
           'reciprocal_vectors_inv_angstrom': [[2 * np.pi / A, 0, 0], [0, 2 * np.pi / A, 0],
                                               [0, 0, 2 * np.pi / A]],
           'energies_ev': 'cos.npy', 'band_names': ['c']}
    path = os.path.join(folder, 'cos.json')
    json.dump(doc, open(path, 'w'))
    return path


def numpy_reference(T, density_cm3, n=160):
    """The same definitions, straight from the analytic band (NumPy only)."""
    f = (np.arange(n) + 0.5) / n
    k = 2 * np.pi / A * np.stack(np.meshgrid(f, f, f, indexing='ij'), -1).reshape(-1, 3)
    e, v = band(k), velocity(k)
    w = 1.0 / (len(e) * A ** 3)               # states per spin per A^3 and k-point
    kt = KB * T
    edge = -6 * T_HOP
    nc = 2 * w * np.exp(-(e - edge) / kt).sum()
    target = density_cm3 * 1e-24
    lo, hi = edge - 2.0, edge + 2.0
    for _ in range(100):
        mu = 0.5 * (lo + hi)
        nn = 2 * w * (1 / (1 + np.exp((e - mu) / kt))).sum()
        lo, hi = (mu, hi) if nn < target else (lo, mu)
    x = (e - mu) / kt
    mdf = np.exp(-np.abs(x)) / (1 + np.exp(-np.abs(x))) ** 2 / kt
    k0 = 2 * w * (v[:, 0] ** 2 * mdf).sum()
    k1 = 2 * w * (v[:, 0] ** 2 * mdf * (e - mu)).sum()
    nn = 2 * w * (1 / (1 + np.exp(x))).sum()
    # Hall sum, field along z: v_x v_y d2E/dk_y dk_x - v_x^2 d2E/dk_y^2 (the
    # mixed derivative is zero for this band)
    kh = 2 * w * (-v[:, 0] ** 2 * 2 * T_HOP * A * A * np.cos(k[:, 1] * A) * mdf).sum()
    return {'hall_factor': -nn * kh / k0 ** 2,'dos_mass_me': (nc / 2) ** (2 / 3) * 2 * np.pi * HBAR2_ME / kt,
            'cond_mass_me': HBAR2_ME * nn / k0, 'seebeck_uv_per_k': -k1 / k0 / T * 1e6,
            'fermi_level_ev': mu}


def thermal(grid, **req):
    req['grid'] = grid
    p = subprocess.run([CLI, 'call', 'thermal-mass'], capture_output=True, text=True,
                       input=json.dumps(req))
    if p.returncode != 0:
        raise AssertionError(p.stderr)
    return json.loads(p.stdout)


class CosineBand(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.tmp = tempfile.TemporaryDirectory()
        cls.grid = write_grid(cls.tmp.name, 40)
        cls.temps = [77.0, 300.0, 600.0]
        cls.res = thermal(cls.grid, bands=['c'], temperatures_k=cls.temps, density_cm3=1e18)

    def test_against_numpy(self):
        for T, p in zip(self.temps, self.res['points']):
            ref = numpy_reference(T, 1e18)
            with self.subTest(T=T):
                self.assertAlmostEqual(p['fermi_level_ev'], ref['fermi_level_ev'], delta=2e-4)
                self.assertLess(abs(p['dos_mass_me'] / ref['dos_mass_me'] - 1), 2e-3)
                for m in p['conductivity_principal_masses_me']:
                    self.assertLess(abs(m / ref['cond_mass_me'] - 1), 2e-3)
                for s in p['seebeck_uv_per_k']:
                    self.assertLess(abs(s / ref['seebeck_uv_per_k'] - 1), 2e-3)
                self.assertAlmostEqual(p['density_cm3'] / 1e18, 1.0, delta=1e-6)
                for r_h in p['hall_factor']:
                    self.assertLess(abs(r_h / ref['hall_factor'] - 1), 2e-3)

    def test_plain_mesh_sum_is_not_enough(self):
        # why the refinement exists: the same sum over the 40^3 mesh points
        # alone misses the 77 K conduction mass by more than a percent
        n = 40
        f = np.arange(n) / n
        k = 2 * np.pi / A * np.stack(np.meshgrid(f, f, f, indexing='ij'), -1).reshape(-1, 3)
        e, v = band(k), velocity(k)
        kt = KB * 77.0
        mdf = np.exp(-(e + 3.0) / kt)          # non-degenerate weights, shifted
        plain = HBAR2_ME * (mdf / kt).sum() / (v[:, 0] ** 2 * mdf / kt ** 2).sum()
        ref = numpy_reference(77.0, 1e18)['cond_mass_me']
        self.assertGreater(abs(plain / ref - 1), 0.01)
        got = self.res['points'][0]['conductivity_principal_masses_me'][0]
        self.assertLess(abs(got / ref - 1), 2e-3)

    def test_band_bottom_mass_at_low_temperature(self):
        # E = -6t + t a^2 k^2 + O(k^4): m = hbar^2 / (2 t a^2); the quartic
        # term raises the mass by about kT / (t) percent-wise at 20 K: < 0.5 %
        r = thermal(self.grid, bands=['c'], temperature_k=20.0, density_cm3=1e15)
        m = HBAR2_ME / (2 * T_HOP * A ** 2)
        p = r['points'][0]
        self.assertLess(abs(p['dos_mass_me'] / m - 1), 5e-3)
        for mc in p['conductivity_principal_masses_me']:
            self.assertLess(abs(mc / m - 1), 5e-3)
        # non-degenerate parabolic Seebeck, -(k/e)(5/2 - eta)
        eta = (p['fermi_level_ev'] - r['edge_ev']) / (KB * 20.0)
        s_ref = -KB * (2.5 - eta) * 1e6
        self.assertLess(abs(p['seebeck_uv_per_k'][0] / s_ref - 1), 5e-3)
        self.assertAlmostEqual(r['edge_ev'], -6 * T_HOP, delta=1e-9)
        # an isotropic parabolic band with constant tau has Hall factor 1
        # (Boltzmann transport, textbook identity)
        for r_h in p['hall_factor']:
            self.assertLess(abs(r_h - 1), 5e-3)

    def test_fermi_level_mode_and_holes(self):
        # the band mirrored (E -> -E) carries holes with the same masses, and a
        # chemical potential given directly reproduces the density it implies
        r = thermal(self.grid, bands=['c'], temperature_k=300.0, density_cm3=1e19)
        mu = r['points'][0]['fermi_level_ev']
        r2 = thermal(self.grid, bands=['c'], temperature_k=300.0, fermi_level_ev=mu)
        self.assertLess(abs(r2['points'][0]['density_cm3'] / 1e19 - 1), 1e-6)
        self.assertEqual(r['carriers'], 'electrons')

    def test_same_bits_for_any_thread_count(self):
        outs = [subprocess.run([CLI, 'call', 'thermal-mass'], capture_output=True, text=True,
                               check=True,
                               input=json.dumps({'grid': self.grid, 'bands': ['c'],
                                                 'temperatures_k': [77, 300],
                                                 'density_cm3': 1e18, 'threads': t})).stdout
                for t in (1, 2, 5)]
        self.assertEqual(outs[0], outs[1])
        self.assertEqual(outs[0], outs[2])

    def test_spin_channels(self):
        # two identical channels at spin degeneracy 1 are the non-polarised band
        # (a fact of the definitions); one channel alone has the same DOS mass
        e = np.load(os.path.join(self.tmp.name, 'cos.npy'))
        np.save(os.path.join(self.tmp.name, 'spin.npy'), np.concatenate([e, e]))
        doc = json.load(open(self.grid))
        doc.update({'energies_ev': 'spin.npy', 'spin_channels': 2, 'band_names': ['c_up', 'c_down']})
        spin = os.path.join(self.tmp.name, 'spin.json')
        json.dump(doc, open(spin, 'w'))
        plain = thermal(self.grid, bands=['c'], temperature_k=300.0, density_cm3=1e18)
        both = thermal(spin, bands=[0, 1], temperature_k=300.0, density_cm3=1e18,
                       spin_degeneracy=1)
        one = thermal(spin, bands=[0], temperature_k=300.0, density_cm3=5e17, spin_degeneracy=1)
        for r in (both, one):
            self.assertAlmostEqual(r['points'][0]['dos_mass_me'] / plain['points'][0]['dos_mass_me'],
                                   1.0, delta=1e-9)
            self.assertAlmostEqual(r['points'][0]['fermi_level_ev'],
                                   plain['points'][0]['fermi_level_ev'], delta=1e-9)

    def test_bad_requests(self):
        for req, word in (({'bands': ['c'], 'temperature_k': 300.0}, 'density_cm3'),
                          ({'bands': ['c'], 'temperature_k': 300.0, 'density_cm3': 1e30},
                           'density'),
                          ({'bands': ['x'], 'temperature_k': 300.0, 'density_cm3': 1e18}, 'x'),
                          ({'bands': 'conduction', 'temperature_k': 300.0, 'density_cm3': 1e18},
                           'gap')):
            req['grid'] = self.grid
            p = subprocess.run([CLI, 'call', 'thermal-mass'], capture_output=True, text=True,
                               input=json.dumps(req))
            self.assertEqual(p.returncode, 2, p.stderr)
            self.assertIn(word, p.stderr)


class BesselClosedForms(unittest.TestCase):
    """Non-degenerate averages of E = -2t sum cos(k_i a) factorise into 1D
    integrals of exp(x cos theta), x = 2t/kT, i.e. modified Bessel functions
    (DLMF 10.32.1: I_n(x) = (1/pi) int_0^pi exp(x cos th) cos(n th) dth):
      N_c = (2 / a^3) e^(-3x) I0(x)^3, so m_dos = 2 pi hbar^2 e^(-2x) I0(x)^2 / (a^2 kT);
      <v_x^2>: int sin^2 th e^(x cos th) = pi I1(x) / x, so m_c = hbar^2 I0(x) / (2 t a^2 I1(x));
      <cos th sin^2 th>/<sin^2 th> = I0/I1 - 2/x, so with eta = (mu - E_c)/kT
      S = -(k/e) [x (3 - I0/I1 + 2/x - 2 I1/I0) - eta]   (-> 5/2 - eta as x -> inf).
    Derived here; checked with SciPy's scaled Bessel functions. Target 0.1 %."""

    def test_closed_forms(self):
        from scipy.special import i0e, i1e
        for t, a in ((0.5, 3.0), (1.0, 4.0), (0.75, 3.5)):
            with tempfile.TemporaryDirectory() as tmp:
                f = np.arange(40) / 40
                c = np.cos(2 * np.pi * np.stack(np.meshgrid(f, f, f, indexing='ij'), 0)).sum(0)
                np.save(os.path.join(tmp, 'g.npy'), (-2 * t * c)[None])
                grid = os.path.join(tmp, 'g.json')
                json.dump({'format': 'bandmass-grid-1', 'mesh': [40, 40, 40],
                           'reciprocal_vectors_inv_angstrom': (2 * np.pi / a * np.eye(3)).tolist(),
                           'energies_ev': 'g.npy'}, open(grid, 'w'))
                temps = [77.0, 300.0, 600.0]
                r = thermal(grid, bands=[0], temperatures_k=temps, density_cm3=1e12)
            self.assertEqual(r.get('warning_codes', []), [])
            self.assertEqual(r['edge_k_fractional'], [0.0, 0.0, 0.0])
            for T, p in zip(temps, r['points']):
                x = 2 * t / (KB * T)
                q = i0e(x) / i1e(x)
                md = 2 * np.pi * HBAR2_ME * i0e(x) ** 2 / (a * a * KB * T)
                mc = HBAR2_ME * q / (2 * t * a * a)
                eta = (p['fermi_level_ev'] - r['edge_ev']) / (KB * T)
                s = -KB * 1e6 * (x * (3 - q + 2 / x - 2 / q) - eta)
                with self.subTest(t=t, a=a, T=T):
                    self.assertLess(abs(p['dos_mass_me'] / md - 1), 1e-3)
                    for m in p['conductivity_principal_masses_me']:
                        self.assertLess(abs(m / mc - 1), 1e-3)
                    for v in p['seebeck_uv_per_k']:
                        self.assertLess(abs(v / s - 1), 1e-3)


class GeometryAndConvergence(unittest.TestCase):
    """An orthorhombic cosine band (t = 0.5, 0.3, 0.8 eV; a = 4, 5, 3.5 A) at
    10 K, where only the band bottom is occupied: the conductivity masses are
    the band-edge masses hbar^2 / (2 t_i a_i^2) and the DOS mass their geometric
    mean (Taylor expansion), as valley-average gives them for one valley.  The
    rate of convergence: a non-parabolic band of many harmonics on the same
    lattice, E = (sqrt(1 + 4 alpha eps) - 1) / (2 alpha) with eps the cosine
    band measured from its bottom (the Kane form with eps for hbar^2 k^2 / 2m),
    against a direct sum of the analytic band on a fine mesh (NumPy, tests
    only).  A hexagonal cell (triangular lattice in plane): the tensor is
    diagonal with two equal in-plane values (six-fold symmetry)."""

    T_HOP, A_LAT = np.array([0.5, 0.3, 0.8]), np.array([4.0, 5.0, 3.5])

    def grid(self, tmp, n, alpha=0.0):
        t, a = self.T_HOP, self.A_LAT
        f = np.arange(n) / n
        F = np.stack(np.meshgrid(f, f, f, indexing='ij'), 0)
        e = 2 * sum(t[i] * (1 - np.cos(2 * np.pi * F[i])) for i in range(3))
        if alpha:
            e = (np.sqrt(1 + 4 * alpha * e) - 1) / (2 * alpha)
        np.save(os.path.join(tmp, f'o{n}.npy'), e[None])
        path = os.path.join(tmp, f'o{n}.json')
        json.dump({'format': 'bandmass-grid-1', 'mesh': [n] * 3,
                   'reciprocal_vectors_inv_angstrom': np.diag(2 * np.pi / a).tolist(),
                   'energies_ev': f'o{n}.npy'}, open(path, 'w'))
        return path, HBAR2_ME / (2 * t * a * a)

    def direct_sum(self, alpha, T, m=241, box=0.08):
        """Non-degenerate DOS and conductivity masses of the analytic band by a
        plain sum over a fine mesh of the corner of the zone that holds the
        states (|f| < 0.08: E above 40 kT at 10 K beyond it)."""
        t, a = self.T_HOP, self.A_LAT
        kt = KB * T
        f = np.linspace(-box, box, m)
        k = 2 * np.pi * np.stack(np.meshgrid(f, f, f, indexing='ij'), 0) / a[:, None, None, None]
        eps = 2 * sum(t[i] * (1 - np.cos(k[i] * a[i])) for i in range(3))
        de = [2 * t[i] * a[i] * np.sin(k[i] * a[i]) for i in range(3)]
        if alpha:
            root = np.sqrt(1 + 4 * alpha * eps)
            eps, de = (root - 1) / (2 * alpha), [d / root for d in de]
        w = np.exp(-eps / kt)
        nc = 2 * w.sum() * (f[1] - f[0]) ** 3 / np.prod(a)          # 1 / A^3
        md = 2 * np.pi * HBAR2_ME / kt * (nc / 2) ** (2 / 3)
        return md, np.array([HBAR2_ME * kt * w.sum() / (w * d * d).sum() for d in de])

    def test_band_edge_masses(self):
        with tempfile.TemporaryDirectory() as tmp:
            for n in (16, 32):
                g, m = self.grid(tmp, n)
                p = thermal(g, bands=[0], temperature_k=10.0, density_cm3=1e12)['points'][0]
                err = max(abs(p['dos_mass_me'] / np.prod(m) ** (1 / 3) - 1),
                          *abs(np.sort(p['conductivity_principal_masses_me']) / np.sort(m) - 1))
                # measured 6e-4 and 7e-4: the band's own non-parabolicity at 10 K,
                # not the mesh (one harmonic: the smooth series carries it exactly)
                with self.subTest(n=n):
                    self.assertLess(err, 1.5e-3)
        va = subprocess.run([CLI, 'call', 'valley-average'], capture_output=True, text=True,
                            check=True, input=json.dumps(
                                {'valley': {'principal_masses_me': m.tolist(),
                                            'axes': np.eye(3).tolist()},
                                 'point_group': 'C1', 'position': 'gamma'}))
        va = json.loads(va.stdout)
        self.assertLess(abs(p['dos_mass_me'] / va['dos_mass_me'] - 1), 1.5e-3)
        harm = 3 / sum(1 / np.array(p['conductivity_principal_masses_me']))
        self.assertLess(abs(harm / va['conductivity_mass_me'] - 1), 1.5e-3)

    def test_rate(self):
        alpha, T = 0.5, 10.0
        md, mc = self.direct_sum(alpha, T)
        errs = []
        with tempfile.TemporaryDirectory() as tmp:
            for n in (16, 32):
                g, _ = self.grid(tmp, n, alpha)
                p = thermal(g, bands=[0], temperature_k=T, density_cm3=1e12)['points'][0]
                errs.append(max(abs(p['dos_mass_me'] / md - 1),
                                *abs(np.sort(p['conductivity_principal_masses_me'])
                                     / np.sort(mc) - 1)))
        # measured 1.9e-2 and 1.9e-3: 10x for a halved step (order 3.3)
        self.assertLess(errs[1], 4e-3)
        self.assertGreater(errs[0] / errs[1], 6.0)

    def test_hexagonal_cell(self):
        a0, c0, th, tz, nxy, nz = 3.0, 5.0, 0.4, 0.2, 36, 12
        lat = np.array([[a0, 0, 0], [-a0 / 2, a0 * np.sqrt(3) / 2, 0], [0, 0, c0]])
        rec = 2 * np.pi * np.linalg.inv(lat).T
        F1, F2, F3 = np.meshgrid(np.arange(nxy) / nxy, np.arange(nxy) / nxy,
                                 np.arange(nz) / nz, indexing='ij')
        e = (-2 * th * (np.cos(2 * np.pi * F1) + np.cos(2 * np.pi * F2)
                        + np.cos(2 * np.pi * (F1 + F2))) - 2 * tz * np.cos(2 * np.pi * F3))
        with tempfile.TemporaryDirectory() as tmp:
            np.save(os.path.join(tmp, 'h.npy'), e[None])
            g = os.path.join(tmp, 'h.json')
            json.dump({'format': 'bandmass-grid-1', 'mesh': [nxy, nxy, nz],
                       'reciprocal_vectors_inv_angstrom': rec.tolist(),
                       'energies_ev': 'h.npy'}, open(g, 'w'))
            for T in (77.0, 300.0):
                tm = np.array(thermal(g, bands=[0], temperature_k=T, density_cm3=1e18)
                              ['points'][0]['conductivity_mass_tensor_me'])
                with self.subTest(T=T):
                    self.assertLess(abs(tm[0, 0] / tm[1, 1] - 1), 1e-4)
                    off = np.abs(tm - np.diag(np.diag(tm))).max()
                    self.assertLess(off, 1e-4 * tm[0, 0])
                    self.assertGreater(abs(tm[2, 2] / tm[0, 0] - 1), 0.05)


DATA = os.path.join(os.path.dirname(os.path.abspath(__file__)), '..', 'data', 'first-principles')


class SiliconConduction(unittest.TestCase):
    """First-principles silicon (tests/data/first-principles).  Reference: the
    DFT point masses of si-reference.json, m_l and m_t at the minimum; at 77 K
    the thermal masses of six ellipsoidal valleys are 6^(2/3) (m_l m_t^2)^(1/3)
    and 3 / (1/m_l + 2/m_t) to within the band's non-parabolicity (under 1 %
    at 77 K for alpha about 0.5 / eV: Jacoboni & Reggiani, Rev. Mod. Phys. 55,
    645 (1983), from memory).  No confident wrong answer: a mesh too coarse
    for the interpolant near the edge is flagged by the edge check."""

    @classmethod
    def setUpClass(cls):
        ref = json.load(open(os.path.join(DATA, 'si-reference.json')))
        ml, mt = ref['longitudinal_mass_me'][0], ref['transverse_mass_me'][0]
        cls.ml, cls.mt = ml, mt
        cls.md = 6 ** (2 / 3) * (ml * mt * mt) ** (1 / 3)
        cls.mc = 3 / (1 / ml + 2 / mt)

    def run_mesh(self, n):
        return thermal(os.path.join(DATA, f'si-{n}.json'), bands='conduction',
                       temperature_k=77.0, density_cm3=1e15)

    def test_32_mesh_matches_the_valley_masses(self):
        r = self.run_mesh(32)
        p = r['points'][0]
        self.assertEqual(r['bands'], ['c1', 'c2', 'c3', 'c4'])
        self.assertLess(abs(p['dos_mass_me'] / self.md - 1), 0.02)
        for m in p['conductivity_principal_masses_me']:
            self.assertLess(abs(m / self.mc - 1), 0.02)
        self.assertLess(r['edge_check']['relative_difference'], 0.05)
        # non-degenerate many-valley Hall factor with constant tau,
        # 3 K (K + 2) / (2 K + 1)^2, K = m_l / m_t (Herring, Bell Syst. Tech. J.
        # 34, 237 (1955); from memory)
        K = self.ml / self.mt
        r_ref = 3 * K * (K + 2) / (2 * K + 1) ** 2
        for r_h in p['hall_factor']:
            self.assertLess(abs(r_h / r_ref - 1), 0.02)
        self.assertNotIn('not-converged', r.get('warning_codes', []))

    def test_cubic_symmetry(self):
        # Si's point group is Oh (common practice, no source): the tensors of a
        # cubic crystal are multiples of the identity. The interpolant on the
        # fcc cell is not exactly symmetric between mesh points (with splines
        # alone the 24^3 tensor was 3.6 % anisotropic); the mesh energies are,
        # and the tensors are averaged
        # over the 48 rotations that leave them unchanged.
        r = self.run_mesh(24)
        self.assertEqual(r['sampling']['symmetry_operations'], 48)
        self.assertTrue(r['sampling']['hall_factor_symmetrized'])
        p = r['points'][0]
        t = np.array(p['conductivity_mass_tensor_me'])
        self.assertLess(np.abs(t - t[0, 0] * np.eye(3)).max(), 1e-9 * t[0, 0])
        s = np.array(p['seebeck_tensor_uv_per_k'])
        self.assertLess(np.abs(s - s[0, 0] * np.eye(3)).max(), 1e-9 * abs(s[0, 0]))
        self.assertLess(np.ptp(p['hall_factor']), 1e-9)

    def test_less_symmetry_than_the_lattice(self):
        # a simple cubic lattice carrying an orthorhombic band (hoppings 0.5,
        # 0.3, 0.8 eV): only the 8 rotations of D2h leave the data unchanged,
        # and the three band-edge masses hbar^2 / (2 t a^2) stay distinct
        a, hops, n = 4.0, (0.5, 0.3, 0.8), 16
        f = np.arange(n) / n
        F = np.meshgrid(f, f, f, indexing='ij')
        e = sum(-2 * t * np.cos(2 * np.pi * x) for t, x in zip(hops, F))
        with tempfile.TemporaryDirectory() as tmp:
            np.save(os.path.join(tmp, 'o.npy'), e[None])
            g = os.path.join(tmp, 'o.json')
            json.dump({'format': 'bandmass-grid-1', 'mesh': [n, n, n],
                       'lattice_vectors_angstrom': (a * np.eye(3)).tolist(),
                       'energies_ev': 'o.npy'}, open(g, 'w'))
            r = thermal(g, bands=[0], temperature_k=10.0, density_cm3=1e12)
        self.assertEqual(r['sampling']['symmetry_operations'], 8)
        t = np.diag(r['points'][0]['conductivity_mass_tensor_me'])
        want = HBAR2_ME / (2 * np.array(hops) * a * a)
        self.assertLess(np.abs(t / want - 1).max(), 0.02)

    def test_24_and_32_meshes_agree(self):
        # the same band from two meshes: the thermal masses agree within 1 %
        # from 77 to 600 K (measured: at most 0.33 % for m_d, 0.9 % for m_c at
        # 77 K); the 24^3 mesh puts the X crossing two mesh steps from the minimum
        temps = [77.0, 150.0, 300.0, 600.0]
        runs = [thermal(os.path.join(DATA, f'si-{n}.json'), bands='conduction',
                        temperatures_k=temps, density_cm3=1e15) for n in (24, 32)]
        for p24, p32 in zip(runs[0]['points'], runs[1]['points']):
            with self.subTest(T=p24['temperature_k']):
                self.assertLess(abs(p24['dos_mass_me'] / p32['dos_mass_me'] - 1), 0.01)
                for a, b in zip(p24['conductivity_principal_masses_me'],
                                p32['conductivity_principal_masses_me']):
                    self.assertLess(abs(a / b - 1), 0.01)
        for r in runs:
            self.assertNotIn('not-converged', r.get('warning_codes', []))
            # at 77 K the six valleys of the DFT point masses, within 2 %
            p = r['points'][0]
            self.assertLess(abs(p['dos_mass_me'] / self.md - 1), 0.02)
            self.assertLess(abs(p['conductivity_principal_masses_me'][0] / self.mc - 1), 0.02)

    def test_toward_the_48_mesh(self):
        # si-48-c.json (c1 and c2: the bands above hold no carriers below
        # 600 K) as the finer answer: 32^3 within 0.6 %, 24^3 within 1.5 %
        # (measured 0.54 % and 1.03 %, both at 77 K; the 64^3 grid of the same
        # setup agrees with 48^3 within 0.15 %)
        temps = [77.0, 300.0, 600.0]
        fine = thermal(os.path.join(DATA, 'si-48-c.json'), bands=[0, 1],
                       temperatures_k=temps, density_cm3=1e15)['points']
        for n, tol in ((32, 0.006), (24, 0.015)):
            coarse = thermal(os.path.join(DATA, f'si-{n}.json'), bands='conduction',
                             temperatures_k=temps, density_cm3=1e15)['points']
            for pc, pf in zip(coarse, fine):
                with self.subTest(n=n, T=pc['temperature_k']):
                    self.assertLess(abs(pc['dos_mass_me'] / pf['dos_mass_me'] - 1), tol)
                    self.assertLess(abs(pc['conductivity_principal_masses_me'][0]
                                        / pf['conductivity_principal_masses_me'][0] - 1), tol)

    def test_coarse_mesh_is_flagged(self):
        # 16^3 and below: the X crossing is within two mesh steps of the
        # minimum and the interpolated curvature there is 7 % (16^3) and 25 %
        # (12^3) off; the answer says so
        for n in (12, 16):
            r = self.run_mesh(n)
            with self.subTest(n=n):
                self.assertGreater(r['edge_check']['relative_difference'], 0.05)
                self.assertIn('not-converged', r['warning_codes'])

    def test_degenerate_valence_top_is_flagged(self):
        # the three top valence bands touch at Gamma (no spin-orbit coupling):
        # sorted, they have a cusp there, and the interpolated bands overshoot
        # the mesh maximum (0 eV, a mesh point); the answer must say so
        r = thermal(os.path.join(DATA, 'si-32.json'), bands='valence', temperature_k=300.0,
                    density_cm3=1e15)
        self.assertEqual(r['carriers'], 'holes')
        self.assertIsNone(r['edge_check'])
        self.assertIn('not-converged', r['warning_codes'])


if __name__ == '__main__':
    unittest.main(argv=sys.argv[:1], verbosity=2)
