#!/usr/bin/env bash
# run.sh: set up (packages, build) and run the whole test suite with meson test.
#   tests/run.sh [MESON TEST ARGS]   the suite, in build/
#   tests/run.sh --sanitize          the suite again under AddressSanitizer and
#                                    UndefinedBehaviorSanitizer, in build-sanitize/
#   tests/run.sh --fuzz              each fuzz target briefly (clang's libFuzzer,
#                                    with both sanitizers), in build-fuzz/
#   tests/run.sh --threads           the threaded entry-point test under
#                                    ThreadSanitizer (constants, a grid search,
#                                    thermal-mass on threads of its own) and
#                                    bandmass batch on two threads, in build-tsan/
# CI runs all four.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
pass=suite
case "${1:-}" in
    --sanitize) pass=sanitize; shift ;;
    --fuzz) pass=fuzz; shift ;;
    --threads) pass=threads; shift ;;
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
threads)
    # GLib is not built with the thread sanitizer, so its own locks are invisible
    # to it; the library's threads are joined (bm-parallel.c), which it sees
    configure_build "$top/build-tsan" -Db_sanitize=thread -Db_lundef=false \
        --buildtype=debugoptimized
    fp="$top/tests/data/first-principles"
    for spec in "constants|{}|8x200" \
        "mass-tensor|{\"grid\": \"$fp/si-12.json\", \"band\": \"c1\", \"extremum\": \"minimum\"}|4x10" \
        "thermal-mass|{\"grid\": \"$fp/si-12.json\", \"bands\": \"conduction\", \"temperatures_k\": [300], \"density_cm3\": 1e15, \"threads\": 2}|2x2"; do
        IFS='|' read -r op request calls <<<"$spec"
        if G_SLICE=always-malloc BANDMASS_ABI_OP="$op" \
            TSAN_OPTIONS="halt_on_error=1 suppressions=$top/tests/hosts/tsan.supp" \
            BANDMASS_ABI_REQUEST="$request" BANDMASS_ABI_CALLS="$calls" \
            BANDMASS_CLI="$top/build-tsan/plugin/bandmass" \
            BANDMASS_LIB="$top/build-tsan/plugin/libbandmass-1.0.so" \
            "$top/build-tsan/tests/hosts/test-abi" -p /abi/threads >&2; then
            echo "threads: $op ($calls threads x calls): no race reported"
        else
            echo "threads: $op ($calls threads x calls): FAILED"
            status=1
        fi
    done
    # bandmass batch on two threads: items of several operations, a grid, a
    # failing line, lines written in order from whichever thread finished
    manifest="$(mktemp "${TMPDIR:-/tmp}/bandmass-tsan-XXXXXX.jsonl")"
    for i in 1 2 3 4 5 6 7 8; do
        echo "{\"op\": \"carrier-statistics\", \"request\": {\"material\": \"Si\", \"temperature_k\": ${i}00}}"
        echo "{\"op\": \"fermi-integral\", \"request\": {\"order\": 0.5, \"eta\": $i}}"
        echo "{\"op\": \"mass-tensor\", \"request\": {\"grid\": \"$fp/si-12.json\", \"band\": \"c1\"}}"
        echo "{\"op\": \"no-such-operation\"}"
    done >"$manifest"
    if G_SLICE=always-malloc \
        TSAN_OPTIONS="halt_on_error=1 suppressions=$top/tests/hosts/tsan.supp" \
        "$top/build-tsan/plugin/bandmass" batch "$manifest" --threads 2 --quiet >/dev/null; then
        echo "threads: batch (2 threads, 32 items): no race reported"
    else
        echo "threads: batch (2 threads, 32 items): FAILED"
        status=1
    fi
    rm -f "$manifest"
    ;;
esac
exit "$status"
