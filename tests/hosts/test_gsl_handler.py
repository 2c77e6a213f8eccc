#!/usr/bin/python3
"""test_gsl_handler.py: a host with its own ideas about GSL's process-wide
error handler. The handler is global to the process and calls run
concurrently, so the library cannot switch it around each call; instead no
request may reach a GSL error path at all.

1. The host installs its own handler before the first call: the library's
   one-time set-up must leave it in place.
2. Every request of the corpus runs through the C entry point with that
   (recording) handler: no GSL error may be reported.
3. The host resets GSL's default handler (which aborts the process) and runs
   the corpus again: the process must survive.

The corpus: the example requests of examples/requests and tests/hosts/requests,
the hostile mutations of request_fuzz.py, and requests at the edges of the
domains GSL is called on (Fermi-Dirac integrals near overflow and underflow,
extreme temperatures, a first-principles grid)."""
import ctypes as C
import json
import os
import random
import re
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import request_fuzz  # noqa: E402
from test_ctypes import Api, call, lib  # noqa: E402,F401

SRC = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
GRID = os.path.join(SRC, 'tests', 'data', 'grid-small.json')
OK, INVALID_INPUT, IO, NO_CONVERGENCE = 0, 1, 2, 4


def libgsl_path():
    """The GSL the library was linked with, as mapped into this process."""
    for line in open('/proc/self/maps'):
        path = line.split()[-1]
        if re.search(r'/libgsl\.so[.0-9]*$', path):
            return path
    raise SystemExit('libgsl is not mapped into the process')


gsl = C.CDLL(libgsl_path())
HANDLER = C.CFUNCTYPE(None, C.c_char_p, C.c_char_p, C.c_int, C.c_int)
gsl.gsl_set_error_handler.restype = C.c_void_p
gsl.gsl_set_error_handler.argtypes = [C.c_void_p]

reached = []


@HANDLER
def recording_handler(reason, file, line, gsl_errno):
    reached.append('%s (%s:%d, GSL error %d)' % (reason.decode(), file.decode(), line,
                                                 gsl_errno))


def handler_address(h):
    return C.cast(h, C.c_void_p).value


def corpus():
    """(operation, request text, folder to run in) for every request."""
    out = []
    req_dir = os.path.join(SRC, 'examples', 'requests')
    readme = open(os.path.join(req_dir, 'README.md')).read()
    for name, op in re.findall(r'^\| (\S+\.json) \| ([a-z-]+) \|', readme, re.M):
        out.append((op, open(os.path.join(req_dir, name)).read(), req_dir))
    host_dir = os.path.join(SRC, 'tests', 'hosts', 'requests')
    for name in sorted(os.listdir(host_dir)):
        out.append((name[:-5], open(os.path.join(host_dir, name)).read(), host_dir))
    examples = request_fuzz.examples(GRID)
    rng = random.Random(20261203)
    for op in sorted(examples):
        out.append((op, json.dumps(examples[op]), SRC))
        for _ in range(40):
            out.append((op, json.dumps(request_fuzz.mutate(examples[op], rng)), SRC))
    # Fermi-Dirac integrals on both sides of where a double under- or overflows
    # (F_j(eta) ~ eta^(j+1) / Gamma(j+2) for large eta, e^eta far below 0).
    etas = [-1e308, -1e4, -745.2, -708.5, -708.0, -40.0, 0.0, 40.0, 1e4, 1e100, 5.6e102,
            5.8e102, 1e123, 3.4e123, 1e154, 1.4e154, 3.8e205, 3.9e205, 1e300, 1.7e308]
    for order in (-0.5, 0, 0.5, 1, 1.5, 2):
        out.append(('fermi-integral', json.dumps({'order': order, 'eta': etas}), SRC))
        for eta in etas:
            out.append(('fermi-integral', json.dumps({'order': order, 'eta': eta}), SRC))
    for v in (5e-324, 1e-300, 1e-10, 1.0, 1e10, 1e300, 1.7e308):
        out.append(('fermi-integral', json.dumps({'order': 0.5, 'values': [v],
                                                  'inverse': True}), SRC))
    for t in (1e-3, 1.0, 1e4, 1e6, 1e300):
        out.append(('carrier-statistics', json.dumps({'material': 'Si', 'temperature_k': t,
                    'donors': [{'density_cm3': 1e16, 'ionization_ev': 0.045}]}), SRC))
        out.append(('sheet-density', json.dumps({'subbands': [{'energy_ev': 0.0,
                    'mass_me': 0.067}], 'temperature_k': t, 'fermi_level_ev': 1e3}), SRC))
        out.append(('band-gap', json.dumps({'material': 'GaAs', 'temperature_k': t}), SRC))
    for luttinger in ([6.98, 2.06, 2.93], [1e300, 1e-300, 1e300], [1.0, 0.5, 0.5]):
        out.append(('hole-mass', json.dumps({'heavy_hole_mass_me': 0.49,
                    'light_hole_mass_me': 0.16, 'luttinger_parameters': luttinger}), SRC))
    fp = os.path.join(SRC, 'tests', 'data', 'first-principles', 'si-12.json')
    for band in ('v1', 'c1'):
        out.append(('mass-tensor', json.dumps({'grid': fp, 'band': band}), SRC))
    return out


def run(api, requests):
    """Runs every request; returns the number that did not answer as allowed."""
    bad = 0
    for op, text, folder in requests:
        os.chdir(folder)
        status, response, message = call(api, op, text)
        if status not in (OK, INVALID_INPUT, IO, NO_CONVERGENCE):
            bad += 1
            print('status %d for %s %.200s: %s' % (status, op, text, message))
        elif status == OK and response is None:
            bad += 1
            print('no response for %s %.200s' % (op, text))
    return bad


def main():
    # 1. the host's own handler, installed before the library is first used
    gsl.gsl_set_error_handler(handler_address(recording_handler))
    api = lib.bandmass_plugin_get_api(1).contents
    status, _, _ = call(api, 'constants', '{}')
    assert status == OK
    current = gsl.gsl_set_error_handler(handler_address(recording_handler))
    kept = current == handler_address(recording_handler)
    print('host handler kept by the library set-up:', kept)

    requests = corpus()
    print('%d requests' % len(requests))
    # 2. recording: which requests reach a GSL error path, if any
    bad = 0
    for op, text, folder in requests:
        before = len(reached)
        bad += run(api, [(op, text, folder)])
        for r in reached[before:]:
            print('GSL error reached by %s %.200s: %s' % (op, text, r))
    # 3. GSL's default handler (abort on any error): the process must survive
    gsl.gsl_set_error_handler(None)
    bad += run(api, requests)
    print('%d requests with the default handler: the process survived' % len(requests))
    failed = (not kept) or reached or bad
    print('FAILED' if failed else 'ok', '- GSL errors reached: %d, bad answers: %d'
          % (len(reached), bad))
    return 1 if failed else 0


if __name__ == '__main__':
    sys.exit(main())
