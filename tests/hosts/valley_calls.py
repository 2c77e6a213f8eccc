# valley_calls.py: the check list and the valley-average call shared by the
# valley test scripts of this folder.
import json
import os
import subprocess
import sys

CLI = sys.argv[1] if len(sys.argv) > 1 else os.environ['BANDMASS_CLI']
failures = []


def check(what, ok):
    print(("ok     " if ok else "FAILED ") + what)
    if not ok:
        failures.append(what)


def call(request, expect_ok=True, op='valley-average'):
    """The response, or (expect_ok False and a refusal) the finished process."""
    p = subprocess.run([CLI, 'call', op], input=json.dumps(request),
                       capture_output=True, text=True)
    if expect_ok and p.returncode != 0:
        raise SystemExit(op + ' failed: ' + p.stderr)
    return json.loads(p.stdout) if p.returncode == 0 else p
