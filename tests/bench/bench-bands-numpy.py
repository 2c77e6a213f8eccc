#!/usr/bin/python3
# bench-bands-numpy.py: how long Bandmass.Bands.new_from_array takes for a
# NumPy array of 96^3 x 4 doubles (28 MB) through the PyGObject override
# (one block: a memory file the grid maps), against the introspected call
# that converts value by value, and against plain NumPy copies of the same
# array. A fresh 28 MB block costs page faults that a reused one does not, so
# the first call and the best of several are both printed, then where the
# time goes: the override's steps and those of the two-copy way (a Python
# bytes, then a GLib.Bytes) with the minor page faults of each, and the first
# and second search of a mapped grid (the first reads the mapped pages in).
import os
import resource
import subprocess
import sys
import time

import gi
gi.require_version('Bandmass', '1.0')
from gi.repository import Bandmass, GLib  # noqa: E402
from gi.module import get_introspection_module  # noqa: E402
import gi.overrides.Bandmass as override  # noqa: E402
import numpy as np  # noqa: E402

N = 96
REPEATS = 7


def search_all(grid):
    """The minima of every band: reads the whole grid once."""
    for band in range(grid.get_nbands()):
        grid.call('mass-tensor', '{"band": %d, "extremum": "minimum"}' % band)
    return grid


def timed(fn):
    t0 = time.perf_counter()
    out = fn()
    return time.perf_counter() - t0, out


def faults():
    return resource.getrusage(resource.RUSAGE_SELF).ru_minflt


def steps(named):
    """Each (name, function) timed in turn, with its page faults."""
    rows, out = [], None
    for name, fn in named:
        f0 = faults()
        t, out = timed(lambda: fn(out))
        rows.append((name, t, faults() - f0))
    return rows


def smooth_bands():
    """Four smooth periodic bands (few extrema, so a search is quick)."""
    x = 2 * np.pi * np.arange(N) / N
    c = np.cos(x)
    s = c[:, None, None] + c[None, :, None] + c[None, None, :]
    return np.stack([s + 2.0 * b for b in range(4)])


def main():
    e = smooth_bands()
    recip = np.eye(3)
    mesh = (N, N, N)
    flat_recip = list(recip.ravel())

    first, b = timed(lambda: Bandmass.Bands.new_from_array(e, 4, mesh, recip))
    assert b.get_nbands() == 4
    ours = [first] + [timed(lambda: Bandmass.Bands.new_from_array(e, 4, mesh, recip))[0]
                      for _ in range(REPEATS - 1)]
    copy_first, _ = timed(e.copy)
    copies = [copy_first] + [timed(e.copy)[0] for _ in range(REPEATS - 1)]
    tobytes = [timed(e.tobytes)[0] for _ in range(REPEATS)]
    plain = get_introspection_module('Bandmass').Bands
    per_value, _ = timed(lambda: plain.new_from_array(e.ravel(), 4, list(mesh), flat_recip))

    print('Bandmass.Bands from NumPy: %d^3 x 4 doubles, %.1f MB' % (N, e.nbytes / 1e6))
    print('%-44s %10s %10s' % ('', 'first_s', 'best_s'))
    print('%-44s %10.4f %10.4f' % ('new_from_array (override, one block)', ours[0], min(ours)))
    print('%-44s %10.4f %10.4f' % ('numpy copy (e.copy())', copies[0], min(copies)))
    print('%-44s %10.4f %10.4f' % ('numpy e.tobytes()', tobytes[0], min(tobytes)))
    print('%-44s %10.4f' % ('introspected call, value by value', per_value))
    print('best of %d: %.1f ms (target < 50 ms); %.0fx faster than value by value'
          % (REPEATS, 1e3 * min(ours), per_value / min(ours)))

    print('one call step by step, with the minor page faults the process sees '
          '(%d-byte pages):' % resource.getpagesize())
    mapped = steps([
        ('override: write into a memory file and map it',
         lambda _: override._mapped_bytes(memoryview(e))),
        ('  Bands.new_from_bytes (checks, no copy)',
         lambda block: Bandmass.Bands.new_from_bytes(block, 4, list(mesh), flat_recip)),
        ('  first search, all 4 bands (reads the pages in)', search_all),
        ('  second search, all 4 bands', search_all),
    ])
    two_copies = steps([
        ('two copies: e.tobytes()', lambda _: e.tobytes()),
        ('  GLib.Bytes.new (the block the grid keeps)', lambda data: GLib.Bytes.new(data)),
        ('  Bands.new_from_bytes (checks, no copy)',
         lambda block: Bandmass.Bands.new_from_bytes(block, 4, list(mesh), flat_recip)),
        ('  first search, all 4 bands', search_all),
    ])
    for name, t, nf in mapped + two_copies:
        print('  %-50s %8.1f ms %7d faults' % (name, 1e3 * t, nf))

    if 'GLIBC_TUNABLES' not in os.environ:
        # The same with the C allocator told to keep freed memory (no trim,
        # no fresh mapping per 28 MB block): what is left is the copying.
        print('\nagain, with freed memory kept by the allocator '
              '(GLIBC_TUNABLES=glibc.malloc.trim_threshold=1073741824:'
              'glibc.malloc.mmap_threshold=33554432):')
        env = dict(os.environ, GLIBC_TUNABLES='glibc.malloc.trim_threshold=1073741824:'
                   'glibc.malloc.mmap_threshold=33554432')
        sys.stdout.flush()
        subprocess.run([sys.executable, __file__], env=env, check=True)


if __name__ == '__main__':
    main()
