#!/usr/bin/python3
# test_batch_mpi.py: bandmass-mpi over two ranks writes what bandmass batch
# writes (the header's started_utc and its workers key aside), and resumes a
# torn output the same way.
# Usage: test_batch_mpi.py MPIRUN BANDMASS_MPI; BANDMASS_CLI names bandmass.
import json
import os
import shutil
import subprocess
import sys
import tempfile
import unittest

CLI = os.environ['BANDMASS_CLI']
MPIRUN, MPI_CLI = sys.argv.pop(1), sys.argv.pop(1)
# as root Open MPI wants to be told; two ranks on fewer cores need oversubscribing
MPI_ARGS = ['--oversubscribe'] + (['--allow-run-as-root'] if os.geteuid() == 0 else [])


def header_and_items(path):
    with open(path) as f:
        head, rest = f.read().split('\n', 1)
    head = json.loads(head)
    for key in ('started_utc', 'threads', 'ranks'):
        head.pop(key, None)
    return head, rest


class BatchMpi(unittest.TestCase):
    def setUp(self):
        self.dir = tempfile.mkdtemp(prefix='bandmass-batch-mpi-')
        with open(os.path.join(self.dir, 'm.jsonl'), 'w') as f:
            for i in range(60):
                if i % 4 == 0:
                    f.write(json.dumps({"op": "fermi-integral",
                                        "request": {"order": 1.5, "eta": i / 7 - 3}}) + '\n')
                elif i % 4 == 1:
                    f.write(json.dumps({"op": "carrier-statistics",
                                        "request": {"material": "GaAs",
                                                    "temperature_k": 50 + 7 * i}}) + '\n')
                elif i % 4 == 2:
                    f.write('{"op": "no-such-operation"}\n')
                else:
                    f.write(json.dumps({"op": "band-gap", "request": {
                        "material": "Si", "temperatures_k": [10, 100 + i]}, "id": "g%d" % i})
                        + '\n')
        subprocess.run([CLI, 'batch', 'm.jsonl', '--output', 'ref.jsonl', '--quiet'],
                       cwd=self.dir, check=True)

    def tearDown(self):
        shutil.rmtree(self.dir)

    def mpi(self, *args):
        env = dict(os.environ, OMPI_MCA_btl='self,vader', OMPI_MCA_rmaps_base_oversubscribe='1')
        p = subprocess.run([MPIRUN, *MPI_ARGS, '-np', '2', MPI_CLI, *args], cwd=self.dir,
                           capture_output=True, text=True, env=env, timeout=240)
        self.assertEqual(p.returncode, 0, p.stderr)
        return p

    def test_same_as_batch(self):
        p = self.mpi('m.jsonl', '--output', 'mpi.jsonl')
        self.assertIn('45 ok, 15 failed', p.stderr)
        ref, got = (header_and_items(os.path.join(self.dir, n)) for n in ('ref.jsonl', 'mpi.jsonl'))
        self.assertEqual(got, ref)
        with open(os.path.join(self.dir, 'mpi.jsonl')) as f:
            self.assertEqual(json.loads(f.readline())['ranks'], 2)

    def test_resume(self):
        with open(os.path.join(self.dir, 'ref.jsonl'), 'rb') as f:
            whole = f.read()
        cut = whole.index(b'\n', len(whole) // 2) + 40
        with open(os.path.join(self.dir, 'part.jsonl'), 'wb') as f:
            f.write(whole[:cut])
        p = self.mpi('m.jsonl', '--output', 'part.jsonl')
        with open(os.path.join(self.dir, 'part.jsonl'), 'rb') as f:
            self.assertEqual(f.read(), whole)
        self.assertIn('%d skipped' % (whole[:cut].count(b'\n') - 1), p.stderr)


if __name__ == '__main__':
    unittest.main(verbosity=2)
