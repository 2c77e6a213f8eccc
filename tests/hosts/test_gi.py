#!/usr/bin/python3
# test_gi.py: the GObject-introspection API (Bandmass-1.0) from Python: it must
# answer as the command line does, raise GLib.Error on bad input, and take NumPy grids.
import json
import math
import os
import subprocess
import tempfile
import time
import unittest
import unittest.mock

import gi
gi.require_version('Bandmass', '1.0')
from gi.repository import Bandmass, GLib  # noqa: E402
import numpy as np  # noqa: E402

CLI = os.environ['BANDMASS_CLI']


def cli(*args, stdin='{}', ok=True):
    p = subprocess.run([CLI, *args], input=stdin, capture_output=True, text=True)
    if ok and p.returncode != 0:
        raise AssertionError(f'bandmass {" ".join(args)} failed: {p.stderr}')
    return p


def has_operation(name):
    return any(o.get_name() == name for o in Bandmass.list_operations())


def cosine_band(t_ev, a, n, e0=0.0):
    """A simple-cubic nearest-neighbour band E = e0 + sum_i 2 t_i (1 - cos(k_i a))
    on an n^3 mesh over the reciprocal cell; shape (1, n, n, n), eV."""
    f = np.arange(n) / n
    k = 2 * np.pi / a * f                       # k_i for reduced coordinate f
    kx, ky, kz = np.meshgrid(k, k, k, indexing='ij')
    e = e0 + sum(2 * t * (1 - np.cos(kk * a)) for t, kk in zip(t_ev, (kx, ky, kz)))
    return e[np.newaxis]


def write_band_grid_document(path, energies, recip, names):
    """The file route for a grid: a band grid document (README, "File
    formats") whose energies sit in a .npy file beside it."""
    npy = os.path.splitext(path)[0] + '.npy'
    np.save(npy, np.ascontiguousarray(energies, dtype=float))
    doc = {
        'format': 'bandmass-grid-1',
        'reciprocal_vectors_inv_angstrom': np.asarray(recip).reshape(3, 3).tolist(),
        'mesh': list(energies.shape[1:]),
        'energies_ev': os.path.basename(npy),
        'band_names': names,
    }
    with open(path, 'w') as f:
        json.dump(doc, f)


class Calls(unittest.TestCase):
    def test_call_equals_cli(self):
        gi_answer = Bandmass.call('constants', '{}')
        cli_answer = cli('call', 'constants', '--compact').stdout.strip()
        self.assertEqual(gi_answer, cli_answer)
        self.assertEqual(Bandmass.call('constants', None), cli_answer)   # NULL means {}

    def test_errors_are_glib_errors(self):
        for op, request, code in [
                ('constants', '{"colour": 1}', Bandmass.Error.INVALID_INPUT),
                ('constants', '{"a": ', Bandmass.Error.INVALID_INPUT),
                ('nonesuch', '{}', Bandmass.Error.UNKNOWN_OPERATION)]:
            with self.assertRaises(GLib.Error) as caught:
                Bandmass.call(op, request)
            e = caught.exception
            self.assertEqual(e.domain, 'bandmass-error-quark')
            self.assertEqual(e.code, int(code))
            self.assertTrue(e.matches(Bandmass.Error.quark(), code))
            # the same words as the command line prints
            p = cli('call', op, stdin=request, ok=False)
            self.assertEqual(p.returncode, 2)
            self.assertEqual(p.stderr.strip(), 'bandmass: error: ' + e.message)


class OperationList(unittest.TestCase):
    def test_matches_cli_ops_json(self):
        cli_ops = json.loads(cli('ops', '--json').stdout)
        gi_ops = Bandmass.list_operations()
        self.assertEqual([o.get_name() for o in gi_ops], [o['name'] for o in cli_ops])
        self.assertEqual(json.loads(Bandmass.describe_operations()), cli_ops)
        for info, want in zip(gi_ops, cli_ops):
            self.assertEqual(info.get_summary(), want['summary'])
            params = info.get_params()
            self.assertEqual(len(params), len(want['params']))
            for p, w in zip(params, want['params']):
                self.assertEqual(p.get_name(), w['name'])
                self.assertEqual(list(p.get_kinds()), w['kind_names'])
                self.assertEqual(' or '.join(p.get_kinds()), w['kinds'])
                names = ['string', 'number', 'integer', 'boolean', 'array', 'object']
                self.assertEqual([k for i, k in enumerate(names) if p.get_kind_flags() & (1 << i)],
                                 w['kind_names'])
                self.assertEqual(p.get_required(), w['required'])
                d = p.get_default_json()
                self.assertEqual(None if d is None else json.loads(d), w['default'])
                self.assertEqual(p.get_summary(), w['summary'])
                self.assertEqual(p.get_unit(), w['unit'])
                for (has, value, inclusive), bound in ((p.get_minimum(), w['minimum']),
                                                       (p.get_maximum(), w['maximum'])):
                    self.assertEqual(has, bound is not None)
                    if bound is not None:
                        self.assertEqual((value, inclusive), (bound['value'], bound['inclusive']))
                # a NULL array (no choices) comes to Python as []
                self.assertEqual(list(p.get_choices() or []),
                                 [c['name'] for c in w['choices'] or []])
                self.assertEqual(list(p.get_choice_descriptions() or []),
                                 [c['description'] for c in w['choices'] or []])
            fields = info.get_response()
            self.assertEqual([(f.get_name(), f.get_unit(), f.get_optional(), f.get_meaning())
                              for f in fields],
                             [(f['name'], f['unit'], f['optional'], f['meaning'])
                              for f in want['response']])
            self.assertEqual([f.get_name() for f in fields[-2:]], ['warnings', 'warning_codes'])

    def test_lookup(self):
        self.assertEqual(Bandmass.lookup_operation('constants').get_name(), 'constants')
        self.assertIsNone(Bandmass.lookup_operation('nonesuch'))


class Bands(unittest.TestCase):
    def test_numpy_array_goes_straight_in(self):
        e = cosine_band((0.5, 1.0, 2.0), 4.0, 6)
        recip = np.eye(3) * 2 * np.pi / 4.0
        b = Bandmass.Bands.new_from_array(e.ravel(), 1, e.shape[1:], recip.ravel())
        self.assertEqual(b.get_nbands(), 1)
        self.assertEqual(list(b.get_mesh()), [6, 6, 6])
        np.testing.assert_array_equal(b.get_reciprocal_vectors(), recip.ravel())
        self.assertFalse(b.get_band_names())   # NULL: no names (PyGObject gives [])
        self.assertTrue(b.set_band_names(['cb']))
        self.assertEqual(b.get_band_names(), ['cb'])
        with self.assertRaises(GLib.Error) as caught:
            b.set_band_names(['cb', 'vb'])
        self.assertIn('2 band names given for 1 bands', caught.exception.message)

    def test_size_mismatch_is_named(self):
        with self.assertRaises(GLib.Error) as caught:
            Bandmass.Bands.new_from_array([0.0] * 5, 2, [2, 3, 2], np.eye(3).ravel())
        e = caught.exception
        self.assertTrue(e.matches(Bandmass.Error.quark(), Bandmass.Error.INVALID_INPUT))
        self.assertIn('5 energies given', e.message)
        self.assertIn('24 expected', e.message)

    def test_lattice_gives_reciprocal_vectors(self):
        # face-centred cubic primitive vectors, a = 5.43 A
        a = 5.43
        lat = 0.5 * a * np.array([[0, 1, 1], [1, 0, 1], [1, 1, 0]])
        e = np.zeros((1, 2, 2, 2))
        b = Bandmass.Bands.new_from_lattice(e.ravel(), 1, [2, 2, 2], lat.ravel())
        recip = np.array(b.get_reciprocal_vectors()).reshape(3, 3)
        # identity a_i . b_j = 2 pi delta_ij, and NumPy's own inverse
        np.testing.assert_allclose(lat @ recip.T, 2 * np.pi * np.eye(3), atol=1e-12)
        np.testing.assert_allclose(recip, 2 * np.pi * np.linalg.inv(lat).T, rtol=1e-12)
        with self.assertRaises(GLib.Error) as caught:
            Bandmass.Bands.new_from_lattice(e.ravel(), 1, [2, 2, 2],
                                            np.array([[1, 0, 0], [2, 0, 0], [0, 0, 1.0]]).ravel())
        self.assertIn('singular', caught.exception.message)


class BandsFromBuffers(unittest.TestCase):
    """NumPy arrays go in as one block of bytes (gi/overrides/Bandmass.py and
    Bands.new_from_bytes), never value by value."""

    def test_override_is_loaded(self):
        self.assertEqual(Bandmass.Bands.__module__, 'gi.overrides.Bandmass')

    def test_memory_file_block_is_a_copy(self):
        # the grid keeps its own copy: changing the array afterwards changes
        # nothing (the override maps a memory file where it can)
        e = cosine_band((0.5, 1.0, 2.0), 4.0, 6)
        recip = np.eye(3) * 2 * np.pi / 4.0
        request = '{"band": 0, "extremum": "minimum"}'
        b = Bandmass.Bands.new_from_array(e, 1, (6, 6, 6), recip)
        want = b.call('mass-tensor', request)
        e[:] = 0.0
        self.assertEqual(b.call('mass-tensor', request), want)

    def test_without_memory_files(self):
        # where no memory file can be made, the bytes go through GLib.Bytes
        e = cosine_band((0.5, 1.0, 2.0), 4.0, 6)
        recip = np.eye(3) * 2 * np.pi / 4.0
        request = '{"band": 0, "extremum": "minimum"}'
        want = Bandmass.Bands.new_from_array(e, 1, (6, 6, 6), recip).call('mass-tensor', request)
        with unittest.mock.patch.object(os, 'memfd_create', side_effect=OSError('no memfd'),
                                        create=True):
            b = Bandmass.Bands.new_from_array(e, 1, (6, 6, 6), recip)
        self.assertEqual(b.call('mass-tensor', request), want)

    def test_any_shape_same_grid(self):
        e = cosine_band((0.5, 1.0, 2.0), 4.0, 6)               # shape (1, 6, 6, 6)
        recip = np.eye(3) * 2 * np.pi / 4.0
        request = '{"band": 0, "extremum": "minimum"}'
        want = Bandmass.Bands.new_from_array(e.ravel().tolist(), 1, [6, 6, 6],
                                             recip.ravel().tolist()).call('mass-tensor', request)
        for given in (e, e.ravel(), np.asfortranarray(e[0])[np.newaxis], memoryview(e.ravel())):
            b = Bandmass.Bands.new_from_array(given, 1, (6, 6, 6), recip)
            self.assertEqual(b.call('mass-tensor', request), want)
        b = Bandmass.Bands.new_from_bytes(GLib.Bytes.new(e.tobytes()), 1, [6, 6, 6],
                                          recip.ravel())
        self.assertEqual(b.call('mass-tensor', request), want)
        lat = 4.0 * np.eye(3)
        b = Bandmass.Bands.new_from_lattice(e, 1, [6, 6, 6], lat)
        np.testing.assert_allclose(b.get_reciprocal_vectors(), recip.ravel(), rtol=1e-15)

    def test_size_errors_are_named(self):
        with self.assertRaises(GLib.Error) as caught:
            Bandmass.Bands.new_from_array(np.zeros((2, 2, 3, 1)), 2, [2, 3, 2], np.eye(3))
        self.assertIn('12 energies given', caught.exception.message)
        self.assertIn('24 expected', caught.exception.message)
        with self.assertRaises(GLib.Error) as caught:
            Bandmass.Bands.new_from_bytes(GLib.Bytes.new(b'1234567890'), 1, [1, 1, 1],
                                          np.eye(3).ravel())
        self.assertIn('10 bytes of energies is not a whole number of 8-byte doubles',
                      caught.exception.message)

    def test_large_grid_is_fast(self):
        # 96^3 x 4 doubles (28 MB) go over as one block (a memory file the
        # grid maps, or a GLib.Bytes where there is none): at most the cost
        # of copying the bytes twice, not of 3.5 million conversions (about
        # 0.8 s). On a shared machine a fresh 28 MB block may cost far more
        # than a reused one, so each call is compared with two plain copies
        # timed beside it; tests/bench prints the figure.
        e = np.random.default_rng(1).random((4, 96, 96, 96))
        ours, copies = [], []
        for _ in range(5):
            t0 = time.perf_counter()
            a = e.tobytes()
            c = bytearray(a)
            copies.append(time.perf_counter() - t0)
            del a, c
            t0 = time.perf_counter()
            b = Bandmass.Bands.new_from_array(e, 4, (96, 96, 96), np.eye(3))
            ours.append(time.perf_counter() - t0)
            del b
        ours.sort()
        copies.sort()
        self.assertLess(ours[2], 3 * copies[2] + 0.05, (ours, copies))


EXAMPLE_EXTREMUM = {
    'kind': 'maximum', 'dims': 3, 'divergent': False, 'energy_ev': -0.25,
    'k_inv_angstrom': [0.1, 0.0, -0.2], 'k_fractional': [0.05, 0.0, None],
    'principal_masses_me': [-0.5, None, -1.25],
    'principal_axes': [[0, 0, 1], [0, 1, 0], [1, 0, 0]],
    'inverse_mass_tensor_per_me': [[-0.8, 0, 0], [0, 0, 0], [0, 0, -2.0]],
    'fit_rms_ev': 2e-5, 'warnings': ['a direction is not sampled'],
}


class Extremum(unittest.TestCase):
    def test_reads_every_field(self):
        x = Bandmass.Extremum.new_from_json(json.dumps(EXAMPLE_EXTREMUM))
        self.assertEqual(x.get_kind(), 'maximum')
        self.assertEqual(x.get_energy(), -0.25)
        self.assertEqual(list(x.get_k()), [0.1, 0.0, -0.2])
        kf = x.get_k_fractional()
        self.assertEqual(kf[:2], [0.05, 0.0])
        self.assertTrue(math.isnan(kf[2]))               # null reads as NaN
        m = x.get_principal_masses()
        self.assertEqual((m[0], m[2]), (-0.5, -1.25))
        self.assertTrue(math.isnan(m[1]))
        self.assertEqual(list(x.get_principal_axes()), [0, 0, 1, 0, 1, 0, 1, 0, 0])
        self.assertEqual(list(x.get_inverse_mass_tensor()), [-0.8, 0, 0, 0, 0, 0, 0, 0, -2.0])
        self.assertEqual(x.get_fit_rms(), 2e-5)
        self.assertEqual(x.get_warnings(), ['a direction is not sampled'])
        self.assertEqual(json.loads(x.get_json()), EXAMPLE_EXTREMUM)

    def test_divergent_and_table_extremum(self):
        x = Bandmass.Extremum.new_from_json(json.dumps(dict(
            EXAMPLE_EXTREMUM, k_fractional=None, divergent=True, dims=2,
            principal_masses_me=[0.2, 'divergent', None])))
        self.assertTrue(all(math.isnan(v) for v in x.get_k_fractional()))
        m = x.get_principal_masses()
        self.assertEqual(m[0], 0.2)
        self.assertEqual(m[1], math.inf)                 # "divergent"
        self.assertTrue(math.isnan(m[2]))                # not sampled
        self.assertTrue(x.get_divergent())
        self.assertEqual(x.get_dims(), 2)

    def test_wrong_shape_names_the_key(self):
        bad = dict(EXAMPLE_EXTREMUM, principal_axes=[[0, 0, 1], [0, 1, 0]])
        with self.assertRaises(GLib.Error) as caught:
            Bandmass.Extremum.new_from_json(json.dumps(bad))
        self.assertIn('"principal_axes"', caught.exception.message)
        with self.assertRaises(GLib.Error) as caught:
            Bandmass.Extremum.new_from_json('[1, 2]')
        self.assertTrue(caught.exception.matches(Bandmass.Error.quark(),
                                                 Bandmass.Error.INVALID_INPUT))


@unittest.skipUnless(has_operation('mass-tensor'),
                     'the registry has no mass-tensor operation yet')
class MassTensorFromNumpy(unittest.TestCase):
    T = (0.5, 1.0, 2.0)   # eV, hopping energies along x, y, z
    A = 4.0               # Angstrom
    N = 24

    def setUp(self):
        self.e = cosine_band(self.T, self.A, self.N, e0=1.1)
        self.recip = np.eye(3) * 2 * np.pi / self.A
        self.bands = Bandmass.Bands.new_from_array(self.e.ravel(), 1,
                                                   self.e.shape[1:], self.recip.ravel())

    def test_round_trip_masses(self):
        extrema = self.bands.find_extrema(None)   # one band: band 0, every extremum
        minima = [x for x in extrema if x.get_kind() == 'minimum']
        self.assertEqual(len(minima), 1)
        x = minima[0]
        self.assertAlmostEqual(x.get_energy(), 1.1, places=6)
        # near k = 0, 2 t (1 - cos ka) = t a^2 k^2 + O(k^4) (Taylor series), so
        # hbar^2 / (2 m) = t a^2 and m / m_e = (hbar^2 / m_e) / (2 t a^2);
        # hbar^2 / m_e from the constants operation (CODATA via GSL).
        consts = json.loads(Bandmass.call('constants', None))['constants']
        h2m = consts['hbar2_over_me_ev_a2']['value']
        want = sorted(h2m / (2 * t * self.A ** 2) for t in self.T)
        got = sorted(x.get_principal_masses())
        np.testing.assert_allclose(got, want, rtol=1e-6)

    def test_numpy_route_equals_file_route(self):
        with tempfile.TemporaryDirectory() as tmp:
            path = os.path.join(tmp, 'grid.json')
            write_band_grid_document(path, self.e, self.recip, ['cb'])
            request = {'grid': path, 'band': 'cb', 'extremum': 'minimum'}
            by_cli = json.loads(cli('call', 'mass-tensor', '--compact',
                                    stdin=json.dumps(request)).stdout)
            from_file = Bandmass.Bands.new_from_file(path)
            self.assertEqual(from_file.get_band_names(), ['cb'])
            by_file = from_file.find_extrema('{"band": "cb", "extremum": "minimum"}')
        self.bands.set_band_names(['cb'])
        from_numpy = self.bands.find_extrema('{"band": "cb", "extremum": "minimum"}')
        self.assertEqual(len(by_cli['extrema']), 1)
        self.assertEqual(len(from_numpy), 1)
        self.assertEqual(len(by_file), 1)
        for x in (from_numpy[0], by_file[0]):
            # the same numbers, bit for bit, whichever way the grid came in
            self.assertEqual(json.loads(x.get_json()), by_cli['extrema'][0])
            self.assertEqual(x.get_kind(), 'minimum')
            np.testing.assert_array_equal(
                x.get_inverse_mass_tensor(),
                np.array(by_cli['extrema'][0]['inverse_mass_tensor_per_me']).ravel())

    def test_file_rewritten_under_a_live_bands(self):
        # A Bands from a file holds its own energies: the .npy rewritten in
        # place with other values (numpy.save truncates and writes the same
        # file), or cut to a few bytes, changes none of its answers and
        # raises no SIGBUS in this process.
        request = '{"band": "cb", "extremum": "minimum"}'
        with tempfile.TemporaryDirectory() as tmp:
            path = os.path.join(tmp, 'grid.json')
            npy = os.path.join(tmp, 'grid.npy')
            write_band_grid_document(path, self.e, self.recip, ['cb'])
            bands = Bandmass.Bands.new_from_file(path)
            before = [json.loads(x.get_json()) for x in bands.find_extrema(request)]
            self.assertEqual(len(before), 1)
            np.save(npy, self.e + 0.5)                     # same size, other values
            same_size = [json.loads(x.get_json()) for x in bands.find_extrema(request)]
            os.truncate(npy, 16)                           # shorter than the data
            shrunk = [json.loads(x.get_json()) for x in bands.find_extrema(request)]
            self.assertEqual(same_size, before)
            self.assertEqual(shrunk, before)
            # a new load sees the cut file and names it
            with self.assertRaises(GLib.Error) as caught:
                Bandmass.Bands.new_from_file(path)
            self.assertIn('grid.npy', caught.exception.message)

    def test_find_extrema_equals_the_operation(self):
        # every extremum of the band, with the search's own warnings first
        request = '{"band": 0, "extremum": "all"}'
        response = json.loads(self.bands.call('mass-tensor', request))
        extrema = self.bands.find_extrema(request)
        self.assertEqual(len(extrema), len(response['extrema']))
        self.assertGreater(len(extrema), 1)
        for x, want in zip(extrema, response['extrema']):
            self.assertEqual(json.loads(x.get_json()), want)
            self.assertEqual(x.get_warnings(), response['warnings'] + want['warnings'])
            self.assertEqual(x.get_kind(), want['kind'])
            self.assertEqual(x.get_energy(), want['energy_ev'])
            self.assertEqual(list(x.get_k()), want['k_inv_angstrom'])
            self.assertEqual(list(x.get_k_fractional()), want['k_fractional'])
            self.assertEqual(x.get_fit_rms(), want['fit_rms_ev'])
            for got, m in zip(x.get_principal_masses(), want['principal_masses_me']):
                if m == 'divergent':
                    self.assertEqual(got, math.inf)
                elif m is None:
                    self.assertTrue(math.isnan(got))
                else:
                    self.assertEqual(got, m)

    def test_sheet_masses_not_sampled_are_nan(self):
        # a 2D sheet (n3 = 1): the normal direction is not sampled (null, NaN)
        e = cosine_band((0.5, 1.0), 4.0, 12)[:, :, :, :1]
        e = np.ascontiguousarray(e)
        recip = np.eye(3) * 2 * np.pi / 4.0
        sheet = Bandmass.Bands.new_from_array(e, 1, [12, 12, 1], recip)
        request = '{"band": 0, "extremum": "minimum"}'
        want = json.loads(sheet.call('mass-tensor', request))['extrema'][0]
        x = sheet.find_extrema(request)[0]
        self.assertEqual(x.get_dims(), 2)
        self.assertEqual(json.loads(x.get_json()), want)
        masses = x.get_principal_masses()
        self.assertEqual([math.isnan(m) for m in masses],
                         [m is None for m in want['principal_masses_me']])

    def test_grid_key_given_twice_is_an_error(self):
        with self.assertRaises(GLib.Error) as caught:
            self.bands.find_extrema('{"band": 0, "grid": "other.json"}')
        self.assertIn('"grid" of mass-tensor is given twice', caught.exception.message)

    def test_missing_file_is_an_error(self):
        with self.assertRaises(GLib.Error) as caught:
            Bandmass.Bands.new_from_file('/nonexistent/grid.json')
        self.assertIn('/nonexistent/grid.json', caught.exception.message)

    def test_bad_request_is_an_error(self):
        with self.assertRaises(GLib.Error) as caught:
            self.bands.find_extrema('{"band": 3}')
        self.assertTrue(caught.exception.matches(Bandmass.Error.quark(),
                                                 Bandmass.Error.INVALID_INPUT))

if __name__ == '__main__':
    unittest.main(verbosity=2)
