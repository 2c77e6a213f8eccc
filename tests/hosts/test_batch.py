#!/usr/bin/python3
# test_batch.py: bandmass batch and batch-table. Items come out in manifest
# order whatever the thread count, each answer equals `bandmass call` on the
# same request, failing lines become failed items naming their line, a run
# stopped mid-way (a torn last line, or a killed process) resumes to the same
# output, the input checksums are those of hashlib, and batch-table's CSV
# holds the chosen response fields.
# BANDMASS_CLI names the program.
import csv
import hashlib
import io
import json
import os
import shutil
import signal
import subprocess
import tempfile
import time
import unittest

import mpmath
import numpy as np

CLI = os.environ['BANDMASS_CLI']


def run(*args, cwd=None, check=True):
    p = subprocess.run([CLI, *args], capture_output=True, text=True, cwd=cwd)
    if check and p.returncode != 0:
        raise AssertionError(f'bandmass {" ".join(args)}: exit {p.returncode}: {p.stderr}')
    return p


def make_grid(folder, name, n, nbands, t0):
    """A cosine band set on an n^3 mesh, as a .npy file and its grid document."""
    k = np.arange(n) * 2 * np.pi / n
    kx, ky, kz = np.meshgrid(k, k, k, indexing='ij')
    bands = []
    for b in range(nbands):
        sign = 1 if b >= nbands // 2 else -1
        t = t0 + 0.05 * b
        bands.append(sign * -2 * t * (np.cos(kx) + np.cos(ky) + np.cos(kz)) + 1.5 * (b - nbands / 2))
    np.save(os.path.join(folder, name + '.npy'), np.array(bands))
    with open(os.path.join(folder, name + '.json'), 'w') as f:
        json.dump({"format": "bandmass-grid-1",
                   "reciprocal_vectors_inv_angstrom": [[1, 0, 0], [0, 1, 0], [0, 0, 1]],
                   "mesh": [n, n, n], "energies_ev": name + '.npy'}, f)
    return name + '.json'


def lines(path):
    with open(path) as f:
        return [json.loads(x) for x in f]


def items_only(path):
    """The item lines as text (the header holds the start time)."""
    with open(path) as f:
        return f.read().split('\n', 1)[1]


class Batch(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.dir = tempfile.mkdtemp(prefix='bandmass-batch-')
        d = cls.dir
        cls.grids = [make_grid(d, 'g%d' % i, 12, 4, 0.3 + 0.02 * i) for i in range(3)]
        with open(os.path.join(d, 'mat.json'), 'w') as f:
            # the built-in silicon written out, read back as a material file
            f.write(run('materials', '--name', 'Si', '--json').stdout)
        # slow items (grids) between quick ones, so that with two threads
        # items finish out of order
        rows = []
        for i in range(40):
            if i % 7 == 3:
                rows.append({"op": "mass-tensor", "request": {"grid": cls.grids[i % 3],
                                                              "band": "all"}})
            elif i % 3 == 0:
                rows.append({"op": "fermi-integral", "request": {"order": 0.5, "eta": i / 10 - 1}})
            elif i % 3 == 1:
                rows.append({"op": "carrier-statistics",
                             "request": {"material": "Si", "temperature_k": 200 + 5 * i,
                                         "donors": [{"species": "P", "density_cm3": 1e15 * i}]},
                             "id": "cs-%d" % i})
            else:
                rows.append({"op": "constants", "request": {}})
        rows.append({"op": "carrier-statistics", "request": {"material": "mat.json",
                                                             "temperature_k": 300}, "id": "file"})
        rows.append({"op": "mass-tensor", "request": {"band": 0}, "each": {"grid": cls.grids},
                     "id": "tpl"})
        cls.manifest = os.path.join(d, 'm.jsonl')
        with open(cls.manifest, 'w') as f:
            for r in rows:
                f.write(json.dumps(r) + '\n')
        cls.rows = rows
        cls.full = os.path.join(d, 'full.jsonl')
        run('batch', 'm.jsonl', '--output', 'full.jsonl', '--threads', '2', '--quiet', cwd=d)

    @classmethod
    def tearDownClass(cls):
        shutil.rmtree(cls.dir)

    def test_order_and_answers(self):
        out = lines(self.full)
        head, items = out[0], out[1:]
        self.assertEqual(head['format'], 'bandmass-batch-1')
        self.assertEqual(head['threads'], 2)
        self.assertEqual(head['items'], len(self.rows) - 1 + len(self.grids))
        with open(self.manifest, 'rb') as f:
            self.assertEqual(head['manifest_sha256'], hashlib.sha256(f.read()).hexdigest())
        self.assertEqual(head['bandmass_version'], run('--version').stdout.split()[1])
        expect_ids = [r.get('id', n + 1) for n, r in enumerate(self.rows[:-1])]
        expect_ids += ['tpl#%d' % (k + 1) for k in range(len(self.grids))]
        self.assertEqual([x['id'] for x in items], expect_ids)
        self.assertTrue(all(x['status'] == 'ok' for x in items), items)
        # each answer is the registry's: the same as `bandmass call` gives
        for n in (0, 1, 2, 3, 40):
            r = self.rows[n]
            want = json.loads(subprocess.run([CLI, 'call', r['op'], '--compact'],
                                             input=json.dumps(r['request']), text=True,
                                             capture_output=True, cwd=self.dir,
                                             check=True).stdout)
            self.assertEqual(items[n]['response'], want)
        for k, g in enumerate(self.grids):
            want = json.loads(subprocess.run([CLI, 'call', 'mass-tensor', '--compact'],
                                             input=json.dumps({"band": 0, "grid": g}), text=True,
                                             capture_output=True, cwd=self.dir,
                                             check=True).stdout)
            self.assertEqual(items[len(self.rows) - 1 + k]['response'], want)
        # F_1/2(eta) = -Li_{3/2}(-e^eta) (DLMF 25.12.16), mpmath's polylog
        for n in (0, 6, 9):
            eta = n / 10 - 1
            self.assertAlmostEqual(items[n]['response']['values'],
                                   float(mpmath.re(-mpmath.polylog(1.5, -mpmath.exp(eta)))),
                                   places=12)

    def test_thread_count_invariance(self):
        for threads in ('1', '3'):
            out = os.path.join(self.dir, 't%s.jsonl' % threads)
            run('batch', 'm.jsonl', '--output', out, '--threads', threads, '--quiet', cwd=self.dir)
            self.assertEqual(lines(out)[0]['threads'], int(threads))
            self.assertEqual(items_only(out), items_only(self.full))
        # standard output: the same lines
        p = run('batch', 'm.jsonl', '--threads', '2', '--quiet', cwd=self.dir)
        self.assertEqual(p.stdout.split('\n', 1)[1], items_only(self.full))
        self.assertEqual(p.stderr, '')

    def test_checksums(self):
        items = lines(self.full)[1:]
        seen = 0
        for x in items:
            for inp in x['inputs']:
                path = os.path.join(self.dir, inp['path'])
                with open(path, 'rb') as f:
                    self.assertEqual(inp['sha256'], hashlib.sha256(f.read()).hexdigest())
                seen += 1
        keys = {inp['key'] for x in items for inp in x['inputs']}
        self.assertEqual(keys, {'grid', 'grid.energies_ev', 'material'})
        # a built-in material name is no file
        self.assertEqual(items[1]['inputs'], [])
        self.assertGreater(seen, 8)

    def test_resume_torn_line(self):
        with open(self.full, 'rb') as f:
            whole = f.read()
        ends = [i + 1 for i, c in enumerate(whole) if c == ord('\n')]
        for cut in (ends[0], ends[5] + 17, ends[20] - 1, ends[-1] - 3, len(whole)):
            out = os.path.join(self.dir, 'r.jsonl')
            with open(out, 'wb') as f:
                f.write(whole[:cut])
            p = run('batch', 'm.jsonl', '--output', out, '--threads', '2', cwd=self.dir)
            with open(out, 'rb') as f:
                self.assertEqual(f.read(), whole, 'cut at byte %d' % cut)
            done = sum(1 for e in ends[1:] if e <= cut)
            self.assertIn('%d skipped' % done, p.stderr)
            self.assertIn('%d done' % (len(ends) - 1 - done), p.stderr)

    def test_resume_after_kill(self):
        # a longer run, killed while it writes, then run again
        d = tempfile.mkdtemp(dir=self.dir)
        manifest = os.path.join(d, 'long.jsonl')
        with open(manifest, 'w') as f:
            for i in range(3000):
                f.write(json.dumps({"op": "carrier-statistics",
                                    "request": {"material": "Si", "temperature_k": 100 + i / 10}})
                        + '\n')
        ref = os.path.join(d, 'ref.jsonl')
        run('batch', manifest, '--output', ref, '--quiet', '--threads', '2')
        out = os.path.join(d, 'out.jsonl')
        p = subprocess.Popen([CLI, 'batch', manifest, '--output', out, '--quiet'])
        deadline = time.monotonic() + 30
        while time.monotonic() < deadline and (not os.path.exists(out)
                                               or os.path.getsize(out) < 200000):
            time.sleep(0.01)
        p.send_signal(signal.SIGKILL)
        p.wait()
        with open(out, 'rb') as f:
            part = f.read()
        self.assertLess(part.count(b'\n'), 3001, 'the run ended before the kill')
        with open(out, 'ab') as f:
            f.write(b'{"id": 17, "stat')   # as if killed inside a write
        run('batch', manifest, '--output', out, '--quiet')
        with open(ref) as a, open(out) as b:
            ra, rb = a.read().split('\n', 1), b.read().split('\n', 1)
        self.assertEqual(rb[1], ra[1])
        self.assertEqual(json.loads(rb[0])['manifest_sha256'], json.loads(ra[0])['manifest_sha256'])

    def test_failing_items(self):
        d = self.dir
        text = ('{"op": "constants"}\n'
                'not json\n'
                '\n'
                '{"request": {}}\n'
                '{"op": "no-such-operation", "request": {}}\n'
                '{"op": "fermi-integral", "request": {"order": 0.7, "eta": 0}}\n'
                '{"op": "mass-tensor", "request": {"grid": "absent.json"}}\n'
                '[1, 2]\n'
                '{"op": "constants", "colour": "red"}\n'
                '{"op": "constants", "id": 1}\n'
                '{"op": "fermi-integral", "request": {"order": 0.5, "eta": 0}, "id": "last"}\n')
        with open(os.path.join(d, 'bad.jsonl'), 'w') as f:
            f.write(text)
        p = run('batch', 'bad.jsonl', '--output', 'bad-out.jsonl', cwd=d)
        items = lines(os.path.join(d, 'bad-out.jsonl'))[1:]
        self.assertEqual([x['line'] for x in items], [1, 2, 4, 5, 6, 7, 8, 9, 10, 11])
        self.assertEqual([x['status'] for x in items],
                         ['ok'] + ['failed'] * 8 + ['ok'])
        msgs = [x.get('error', {}).get('message', '') for x in items]
        for x, m in zip(items[1:9], msgs[1:9]):
            self.assertTrue(m.startswith('manifest line %d: ' % x['line']), m)
        self.assertIn('not valid JSON', msgs[1])
        self.assertIn('missing key "op"', msgs[2])
        self.assertIn('unknown operation "no-such-operation"', msgs[3])
        self.assertEqual(items[3]['error']['code'], 'unknown-operation')
        self.assertIn('order', msgs[4])
        self.assertEqual(items[4]['error']['code'], 'invalid-input')
        self.assertIn('absent.json', msgs[5])
        self.assertEqual(items[5]['error']['code'], 'io')
        self.assertEqual(items[5]['inputs'], [{"key": "grid", "path": "absent.json",
                                               "sha256": None}])
        self.assertIn('not a JSON object', msgs[6])
        self.assertIn('unknown key "colour"', msgs[7])
        self.assertIn('id 1 is already used on manifest line 1', msgs[8])
        self.assertIn('2 ok, 8 failed', p.stderr)

    def test_refusals(self):
        d = self.dir
        p = run('batch', 'no-such-manifest.jsonl', cwd=d, check=False)
        self.assertEqual(p.returncode, 2)
        self.assertIn('no-such-manifest.jsonl', p.stderr)
        os.makedirs(os.path.join(d, 'folder'), exist_ok=True)
        p = run('batch', 'm.jsonl', '--output', 'folder', cwd=d, check=False)
        self.assertEqual((p.returncode, 'it is a directory' in p.stderr), (2, True), p.stderr)
        link = os.path.join(d, 'link.jsonl')
        if not os.path.lexists(link):
            os.symlink('full.jsonl', link)
        p = run('batch', 'm.jsonl', '--output', 'link.jsonl', cwd=d, check=False)
        self.assertEqual((p.returncode, 'symbolic link' in p.stderr), (2, True), p.stderr)
        # another manifest's output is not resumed, nor touched
        with open(os.path.join(d, 'other.jsonl'), 'w') as f:
            f.write('{"op": "constants"}\n')
        with open(self.full, 'rb') as f:
            before = f.read()
        p = run('batch', 'other.jsonl', '--output', 'full.jsonl', cwd=d, check=False)
        self.assertEqual(p.returncode, 2)
        self.assertIn('another manifest', p.stderr)
        with open(self.full, 'rb') as f:
            self.assertEqual(f.read(), before)
        # a file that is no batch output is not appended to
        with open(os.path.join(d, 'notes.txt'), 'w') as f:
            f.write('my notes\n')
        p = run('batch', 'm.jsonl', '--output', 'notes.txt', cwd=d, check=False)
        self.assertEqual(p.returncode, 2)
        with open(os.path.join(d, 'notes.txt')) as f:
            self.assertEqual(f.read(), 'my notes\n')
        # nor is one without a line end (a torn header is only ever a header's start)
        for text in ('no line end', '{"format":"bandmass-batch-2"'):
            with open(os.path.join(d, 'torn.txt'), 'w') as f:
                f.write(text)
            p = run('batch', 'm.jsonl', '--output', 'torn.txt', cwd=d, check=False)
            self.assertEqual(p.returncode, 2, text)
            with open(os.path.join(d, 'torn.txt')) as f:
                self.assertEqual(f.read(), text)
        with open(os.path.join(d, 'torn.txt'), 'w') as f:
            f.write('{"format":"bandm')
        run('batch', 'm.jsonl', '--output', 'torn.txt', '--quiet', cwd=d)
        self.assertEqual(items_only(os.path.join(d, 'torn.txt')), items_only(self.full))
        p = run('batch', 'm.jsonl', '--threads', '0', cwd=d, check=False)
        self.assertEqual(p.returncode, 2)

    def test_batch_table(self):
        d = self.dir
        fields = 'fermi_level_ev,values,points[0].temperature_k,extrema[0].principal_masses_me[1],' \
                 'band.index,nosuch.key'
        p = run('batch-table', 'full.jsonl', '--fields', fields, cwd=d)
        rows = list(csv.reader(io.StringIO(p.stdout)))
        self.assertEqual(rows[0], ['id', 'status'] + fields.split(','))
        items = lines(self.full)[1:]
        self.assertEqual(len(rows), len(items) + 1)
        for row, x in zip(rows[1:], items):
            self.assertEqual(row[0], str(x['id']))
            self.assertEqual(row[1], x['status'])
            r = x['response']
            if 'fermi_level_ev' in r:
                self.assertEqual(float(row[2]), r['fermi_level_ev'])
            else:
                self.assertEqual(row[2], '')
            if x['op'] == 'fermi-integral':
                self.assertEqual(float(row[3]), r['values'])
            if x['op'] == 'mass-tensor' and 'band' in r:
                self.assertEqual(float(row[5]), r['extrema'][0]['principal_masses_me'][1])
                self.assertEqual(row[6], str(r['band']['index']))
            self.assertEqual(row[7], '')
        # "extrema.0.principal_masses_me.1" is the same field (bandmass plot's spelling)
        p2 = run('batch-table', 'full.jsonl', '--fields',
                 fields.replace('points[0]', 'points.0').replace('extrema[0].principal_masses_me[1]',
                                                                  'extrema.0.principal_masses_me.1'),
                 cwd=d)
        self.assertEqual(p2.stdout.splitlines()[1:], p.stdout.splitlines()[1:])
        # an object or a list is its JSON
        p = run('batch-table', 'full.jsonl', '--fields', 'warnings', cwd=d)
        self.assertEqual(list(csv.reader(io.StringIO(p.stdout)))[1][2], '[]')
        # to a file, and two outputs in one table
        run('batch-table', 'full.jsonl', 'full.jsonl', '--fields', 'values', '--output',
            'table.csv', cwd=d)
        with open(os.path.join(d, 'table.csv')) as f:
            self.assertEqual(len(f.read().splitlines()), 2 * len(items) + 1)
        for bad, where in (('a..b', 'character 3'), ('a[x]', 'character 2'), ('[0]', 'character 1'),
                           ('a.', 'character 2'), ('a]b', 'character 2'), ('a[1]b', 'character 5'),
                           ('', 'empty field')):
            p = run('batch-table', 'full.jsonl', '--fields', 'values,' + bad, cwd=d, check=False)
            self.assertEqual(p.returncode, 2, bad)
            self.assertIn('--fields: field', p.stderr)
            self.assertIn(where, p.stderr, bad)
            self.assertEqual(p.stdout, '')
        p = run('batch-table', 'm.jsonl', '--fields', 'values', cwd=d, check=False)
        self.assertEqual(p.returncode, 2)
        self.assertIn('not the output of bandmass batch', p.stderr)


if __name__ == '__main__':
    unittest.main(verbosity=2)
