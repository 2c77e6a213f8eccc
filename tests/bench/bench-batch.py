#!/usr/bin/python3
# bench-batch.py: bandmass batch on 10,000 small mixed requests (fermi-integral,
# carrier-statistics, band-gap, constants) and on a set of band grids (24^3
# k-points, 8 bands, .npy; mass-tensor with "band": "all"), with 1 and 2
# threads, against a shell loop of `bandmass call` and a Python loop over the
# GI binding (Bandmass.call) doing the same items. Prints items per second of
# wall time and of CPU time (user + system: less swayed by other load on a
# shared machine), peak memory (/usr/bin/time -v) and whether the answers agree.
# Usage: bench-batch.py BANDMASS_CLI [GRIDS [SMALL]] (GRIDS 1000, SMALL 10000;
# the shell loop runs a slice of each set, as one process per item is slow).
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile
import time

import numpy as np

CLI = os.path.abspath(sys.argv[1])
N_GRIDS = int(sys.argv[2]) if len(sys.argv) > 2 else 1000
N_SMALL = int(sys.argv[3]) if len(sys.argv) > 3 else 10000
SHELL_SMALL, SHELL_GRIDS = min(N_SMALL, 1000), min(N_GRIDS, 100)
MESH, BANDS = 24, 8


def small_requests(n):
    rows = []
    for i in range(n):
        kind = i % 4
        if kind == 0:
            rows.append({"op": "fermi-integral", "request": {"order": 0.5, "eta": -5 + i * 1e-3}})
        elif kind == 1:
            rows.append({"op": "carrier-statistics", "request": {
                "material": "Si", "temperature_k": 100 + (i % 400),
                "donors": [{"species": "P", "density_cm3": 1e14 * (1 + i % 50)}]}})
        elif kind == 2:
            rows.append({"op": "band-gap", "request": {"material": "GaAs",
                                                       "temperature_k": 10 + i % 500}})
        else:
            rows.append({"op": "constants", "request": {}})
    return rows


def grid_requests(folder, n):
    k = np.arange(MESH) * 2 * np.pi / MESH
    kx, ky, kz = np.meshgrid(k, k, k, indexing='ij')
    c = np.cos(kx) + np.cos(ky) + np.cos(kz)
    rows = []
    for g in range(n):
        e = np.array([(1 if b >= BANDS // 2 else -1) * -2 * (0.3 + 0.05 * b + 1e-4 * g) * c
                      + 1.5 * (b - BANDS / 2) for b in range(BANDS)])
        np.save(os.path.join(folder, 'g%d.npy' % g), e)
        with open(os.path.join(folder, 'g%d.json' % g), 'w') as f:
            json.dump({"format": "bandmass-grid-1",
                       "reciprocal_vectors_inv_angstrom": [[1, 0, 0], [0, 1, 0], [0, 0, 1]],
                       "mesh": [MESH] * 3, "energies_ev": 'g%d.npy' % g}, f)
        rows.append({"op": "mass-tensor", "request": {"grid": 'g%d.json' % g, "band": "all"}})
    return rows


def write_manifest(path, rows):
    with open(path, 'w') as f:
        for r in rows:
            f.write(json.dumps(r) + '\n')


def run_batch(folder, manifest, threads):
    out = os.path.join(folder, 'out-%s-%d.jsonl' % (os.path.basename(manifest), threads))
    if os.path.exists(out):
        os.unlink(out)
    t = time.perf_counter()
    p = subprocess.run(['/usr/bin/time', '-v', CLI, 'batch', manifest, '--output', out,
                        '--threads', str(threads), '--quiet'], cwd=folder, capture_output=True,
                       text=True, check=True)
    wall = time.perf_counter() - t
    rss = int(re.search(r'Maximum resident set size \(kbytes\): (\d+)', p.stderr).group(1))
    with open(out) as f:
        items = [json.loads(x) for x in f.read().splitlines()[1:]]
    return wall, cpu_time(p.stderr), rss, items


def cpu_time(report):
    """User + system seconds from /usr/bin/time -v."""
    return sum(float(re.search(r'%s time \(seconds\): ([0-9.]+)' % k, report).group(1))
               for k in ('User', 'System'))


def shell_loop(folder, rows):
    script = os.path.join(folder, 'loop.sh')
    with open(script, 'w') as f:
        f.write('set -e\n')
        for i, r in enumerate(rows):
            req = os.path.join(folder, 'req%d.json' % i)
            with open(req, 'w') as q:
                json.dump(r['request'], q)
            f.write('"%s" call %s --compact --input req%d.json >> shell.jsonl\n' % (CLI, r['op'], i))
    if os.path.exists(os.path.join(folder, 'shell.jsonl')):
        os.unlink(os.path.join(folder, 'shell.jsonl'))
    t = time.perf_counter()
    p = subprocess.run(['/usr/bin/time', '-v', 'sh', script], cwd=folder, check=True,
                       capture_output=True, text=True)
    wall = time.perf_counter() - t
    with open(os.path.join(folder, 'shell.jsonl')) as f:
        return wall, cpu_time(p.stderr), [json.loads(x) for x in f]


def gi_loop(folder, rows):
    """Bandmass.call over the rows in a fresh /usr/bin/python3 (its own peak memory)."""
    code = r'''
import json, os, sys, time, resource
import gi
gi.require_version('Bandmass', '1.0')
from gi.repository import Bandmass
rows = [json.loads(x) for x in open(sys.argv[1])]
t = time.perf_counter()
c = time.process_time()
out = []
for r in rows:
    try:
        out.append(json.loads(Bandmass.call(r['op'], json.dumps(r['request']))))
    except gi.repository.GLib.Error as e:
        out.append({'error': e.message})
wall = time.perf_counter() - t
cpu = time.process_time() - c
json.dump({'wall': wall, 'cpu': cpu, 'rss': resource.getrusage(resource.RUSAGE_SELF).ru_maxrss,
           'answers': out}, open(sys.argv[2], 'w'))
'''
    manifest = os.path.join(folder, 'gi-rows.jsonl')
    write_manifest(manifest, rows)
    res = os.path.join(folder, 'gi-res.json')
    subprocess.run(['/usr/bin/python3', '-c', code, manifest, res], cwd=folder, check=True)
    with open(res) as f:
        r = json.load(f)
    return r['wall'], r['cpu'], r['rss'], r['answers']


def main():
    folder = tempfile.mkdtemp(prefix='bandmass-bench-batch-')
    try:
        t = time.perf_counter()
        small = small_requests(N_SMALL)
        grids = grid_requests(folder, N_GRIDS)
        write_manifest(os.path.join(folder, 'small.jsonl'), small)
        write_manifest(os.path.join(folder, 'grids.jsonl'), grids)
        print('bench-batch: %d small requests, %d grids of %d^3 k-points x %d bands (.npy, '
              '%.0f MB), made in %.1f s' % (N_SMALL, N_GRIDS, MESH, BANDS,
                                            N_GRIDS * BANDS * MESH ** 3 * 8 / 1e6,
                                            time.perf_counter() - t))
        print('load average at the start: %.2f' % os.getloadavg()[0])
        print('%-34s %8s %10s %14s %9s' % ('', 'items', 'items/s', 'items/CPU-s', 'peak MB'))
        row = '%-34s %8d %10.0f %14.0f %9s'

        for name, rows in (('small', small), ('grids', grids)):
            manifest = os.path.join(folder, name + '.jsonl')
            results = {}
            for threads in (1, 2):
                wall, cpu, rss, items = run_batch(folder, manifest, threads)
                results[threads] = items
                print(row % ('batch %s, %d thread%s' % (name, threads, '' if threads == 1 else 's'),
                             len(rows), len(rows) / wall, len(rows) / cpu, '%.1f' % (rss / 1024)))
            assert results[1] == results[2], 'thread counts disagree'
            assert all(x['status'] == 'ok' for x in results[1]), 'an item failed'
            # the same items, one `bandmass call` process each (a slice)
            part = rows[:SHELL_SMALL if name == 'small' else SHELL_GRIDS]
            wall, cpu, answers = shell_loop(folder, part)
            print(row % ('shell loop of bandmass call', len(part), len(part) / wall,
                         len(part) / cpu, '-'))
            assert answers == [x['response'] for x in results[1][:len(part)]], 'shell differs'
            # the same items through the GI binding, one process
            wall, cpu, rss, answers = gi_loop(folder, rows)
            print(row % ('Python loop over Bandmass.call', len(rows), len(rows) / wall,
                         len(rows) / cpu, '%.1f' % (rss / 1024)))
            assert answers == [x['response'] for x in results[1]], 'GI answers differ'
        print('answers: batch with 1 and 2 threads, the shell loop and the GI loop agree')
        print('load average at the end: %.2f' % os.getloadavg()[0])
    finally:
        shutil.rmtree(folder)


if __name__ == '__main__':
    main()
