#!/usr/bin/env bash
# run.sh: set up (packages, build) and run the whole test suite with meson test.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
source "$here/setup.sh"
status=0
meson test -C "$build" --print-errorlogs "$@" || status=$?
# One plain closing line, counted from meson's own log.
/usr/bin/python3 - "$build/meson-logs/testlog.json" <<'PY'
import json, sys
counts = {"OK": 0, "FAIL": 0, "SKIP": 0}
for line in open(sys.argv[1]):
    r = json.loads(line)["result"]
    key = "OK" if r in ("OK", "EXPECTEDFAIL") else "SKIP" if r == "SKIP" else "FAIL"
    counts[key] += 1
print("%d passed, %d failed, %d skipped" % (counts["OK"], counts["FAIL"], counts["SKIP"]))
PY
exit "$status"
