#!/usr/bin/env bash
# run.sh: set up (packages, build) and run the whole test suite with meson test.
#   tests/run.sh [MESON TEST ARGS]   the suite, in build/
#   tests/run.sh --sanitize          the suite again under AddressSanitizer and
#                                    UndefinedBehaviorSanitizer, in build-sanitize/
#   tests/run.sh --fuzz              each fuzz target briefly (clang's libFuzzer,
#                                    with both sanitizers), in build-fuzz/
# CI runs all three.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
pass=suite
case "${1:-}" in
    --sanitize) pass=sanitize; shift ;;
    --fuzz) pass=fuzz; shift ;;
esac
source "$here/setup.sh"

# One plain closing line, counted from meson's own log.
summary() {
    /usr/bin/python3 - "$1" "$2" <<'PY'
import json, sys
counts = {"OK": 0, "FAIL": 0, "SKIP": 0}
for line in open(sys.argv[1]):   # meson's log: testlog[-SETUP].json
    r = json.loads(line)["result"]
    key = "OK" if r in ("OK", "EXPECTEDFAIL") else "SKIP" if r == "SKIP" else "FAIL"
    counts[key] += 1
print("%s%d passed, %d failed, %d skipped" % (sys.argv[2], counts["OK"], counts["FAIL"],
                                              counts["SKIP"]))
PY
}

status=0
case "$pass" in
suite)
    meson test -C "$build" --print-errorlogs "$@" || status=$?
    summary "$build/meson-logs/testlog.json" ""
    ;;
sanitize)
    # valgrind cannot share the address space with AddressSanitizer: its tests
    # are skipped here (they ran in the suite)
    configure_build "$top/build-sanitize" -Db_sanitize=address,undefined \
        -Db_lundef=false --buildtype=debugoptimized
    meson test -C "$top/build-sanitize" --setup sanitize --print-errorlogs "$@" || status=$?
    summary "$top/build-sanitize/meson-logs/testlog-sanitize.json" "sanitizers: "
    ;;
fuzz)
    install_packages clang libclang-rt-14-dev
    CC=clang configure_build "$top/build-fuzz" -Dfuzz=true -Dfuzz_seconds=10 \
        -Db_sanitize=address,undefined -Db_lundef=false --buildtype=debugoptimized
    meson test -C "$top/build-fuzz" --suite fuzz --print-errorlogs "$@" || status=$?
    summary "$top/build-fuzz/meson-logs/testlog.json" "fuzzing: "
    ;;
esac
exit "$status"
