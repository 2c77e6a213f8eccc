#!/usr/bin/python3
"""make_start_inputs.py OUT [CLI]: the starting inputs of the fuzz targets, drawn from the
project's own test and example files, written to OUT/<target>/:

  grid      band grid documents (tests/data, the first-principles corpus)
  npy       .npy arrays (tests/data, small first-principles arrays)
  ktable    k-tables (tests/data, the first-principles stencils and lines,
            the example line cut)
  material  material files (examples/requests) and, given the command line
            CLI, every built-in material as `materials --name X` writes it
  request   "OP\\n" + a request: each operation's example of the request
            fuzz test, the example requests and the hosts' requests

The targets run in tests/data, so file names in the starting inputs are written
relative to it (or absolute)."""
import glob
import json
import os
import re
import shutil
import subprocess
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
SRC = os.path.dirname(os.path.dirname(HERE))
DATA = os.path.join(SRC, 'tests', 'data')
sys.path.insert(0, os.path.join(SRC, 'tests', 'hosts'))
import request_fuzz  # noqa: E402

MAX_INPUT_BYTES = 200 * 1024     # larger files slow every run of a target


def relink(value, folder):
    """A file name relative to folder, rewritten so that it works from DATA."""
    if isinstance(value, str) and not os.path.isabs(value):
        path = os.path.join(folder, value)
        if os.path.isfile(path):
            return os.path.relpath(path, DATA)
    return value


def put(out, target, name, data):
    folder = os.path.join(out, target)
    os.makedirs(folder, exist_ok=True)
    with open(os.path.join(folder, name), 'wb') as f:
        f.write(data if isinstance(data, bytes) else data.encode())


def copy_files(out, target, patterns, edit=None):
    for pattern in patterns:
        for path in sorted(glob.glob(os.path.join(SRC, pattern))):
            if os.path.getsize(path) > MAX_INPUT_BYTES:
                continue
            data = open(path, 'rb').read()
            if edit:
                data = edit(path, data)
            put(out, target, os.path.basename(path), data)


def grid_document(path, data):
    """A grid document whose .npy file is named relative to tests/data."""
    try:
        doc = json.loads(data)
    except ValueError:
        return data
    folder = os.path.dirname(path)
    for key in ('energies_ev', 'energies_hartree', 'energies_rydberg'):
        if key in doc:
            doc[key] = relink(doc[key], folder)
    return json.dumps(doc).encode()


def requests(out):
    for op, req in sorted(request_fuzz.examples('grid-small.json').items()):
        put(out, 'request', 'example-' + op, op + '\n' + json.dumps(req))
    req_dir = os.path.join(SRC, 'examples', 'requests')
    readme = open(os.path.join(req_dir, 'README.md')).read()
    for name, op in re.findall(r'^\| (\S+\.json) \| ([a-z-]+) \|', readme, re.M):
        req = json.load(open(os.path.join(req_dir, name)))
        for key in ('grid', 'table', 'material'):
            if key in req:
                req[key] = relink(req[key], req_dir)
        put(out, 'request', 'examples-' + name, op + '\n' + json.dumps(req))
    host_dir = os.path.join(SRC, 'tests', 'hosts', 'requests')
    for name in sorted(os.listdir(host_dir)):
        put(out, 'request', 'hosts-' + name, name[:-5] + '\n' + open(os.path.join(host_dir, name)).read())


def materials(out, cli):
    copy_files(out, 'material', ['examples/requests/*-material.json'])
    if not cli:
        return
    listing = json.loads(subprocess.run([cli, 'materials', '--json'], check=True,
                                        capture_output=True).stdout)
    for row in listing['points']:
        text = subprocess.run([cli, 'materials', '--name', row['name'], '--json'], check=True,
                              capture_output=True).stdout
        put(out, 'material', 'builtin-' + row['name'] + '.json', text)


def main():
    out = sys.argv[1]
    cli = sys.argv[2] if len(sys.argv) > 2 else None
    shutil.rmtree(out, ignore_errors=True)
    copy_files(out, 'grid', ['tests/data/*.json', 'tests/data/first-principles/si-*.json'],
               grid_document)
    copy_files(out, 'npy', ['tests/data/*.npy', 'tests/data/first-principles/*.npy'])
    copy_files(out, 'ktable', ['tests/data/*.csv', 'tests/data/*.tsv',
                               'tests/data/first-principles/*.csv', 'examples/requests/*.csv'])
    materials(out, cli)
    requests(out)
    for target in sorted(os.listdir(out)):
        print('%-9s %3d starting inputs' % (target, len(os.listdir(os.path.join(out, target)))))


if __name__ == '__main__':
    main()
