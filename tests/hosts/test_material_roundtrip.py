#!/usr/bin/python3
"""test_material_roundtrip.py: for every built-in material, the file written by
`bandmass materials --name X --json` is a material file: carrier-statistics,
band-gap, valley-average and hole-mass given that file answer as they do given
the name X.  Numbers are compared to a relative 1e-12 (the JSON writer prints
17 significant digits, so today they agree exactly; the tolerance leaves room
for a writer that prints the shortest round-trip form)."""
import json
import os
import subprocess
import sys
import tempfile

CLI = os.environ["BANDMASS_CLI"]


def run(*args):
    p = subprocess.run([CLI, *args], capture_output=True, text=True)
    return p.returncode, p.stdout, p.stderr


def same(a, b, path):
    if isinstance(a, dict):
        assert isinstance(b, dict) and a.keys() == b.keys(), (path, "keys differ")
        for k in a:
            same(a[k], b[k], path + "." + k)
    elif isinstance(a, list):
        assert isinstance(b, list) and len(a) == len(b), (path, "lengths differ")
        for i, (x, y) in enumerate(zip(a, b)):
            same(x, y, "%s[%d]" % (path, i))
    elif isinstance(a, float) and not isinstance(a, bool):
        assert a == b or abs(a - b) <= 1e-12 * max(abs(a), abs(b)), (path, a, b)
    else:
        assert a == b, (path, a, b)


REQUESTS = [
    ("carrier-statistics", ["--temperatures-k", "77,300,500",
                            "--donors", '[{"density_cm3": 1e16, "ionization_ev": 0.03}]',
                            "--acceptors", '[{"density_cm3": 1e15, "ionization_ev": 0.05}]']),
    ("carrier-statistics", ["--temperature-k", "300", "--statistics", "boltzmann"]),
    ("band-gap", ["--temperatures-k", "0,300,600"]),
    ("valley-average", []),
    ("hole-mass", ["--temperature-k", "250"]),
]

code, out, err = run("materials", "--json")
assert code == 0, err
names = [p["name"] for p in json.loads(out)["points"]]
assert len(names) == 10, names
checked = 0
with tempfile.TemporaryDirectory() as tmp:
    for name in names:
        path = os.path.join(tmp, name + ".json")
        code, out, err = run("materials", "--name", name, "--json")
        assert code == 0, err
        with open(path, "w") as f:
            f.write(out)
        for op, extra in REQUESTS:
            cn, on, en = run(op, "--material", name, *extra, "--json")
            cf, of, ef = run(op, "--material", path, *extra, "--json")
            assert cn == cf, (op, name, en, ef)
            if cn != 0:        # refused for the name (e.g. no hole data): refused alike
                continue
            same(json.loads(on), json.loads(of), "%s %s" % (op, name))
            checked += 1
print("ok     %d answers from %d material files equal those from the names" %
      (checked, len(names)))
