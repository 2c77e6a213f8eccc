#!/bin/sh
# run-fuzzer.sh FUZZER START CORPUS ARTIFACTS: one brief libFuzzer run of a
# target (BANDMASS_FUZZ_SECONDS, default 12) from the starting inputs (made by
# make_start_inputs.py when missing) and what earlier runs kept in CORPUS. An input
# that stops the target is saved under ARTIFACTS and fails the test: copy it
# to tests/fuzz/regressions/TARGET/ once fixed.
set -eu
fuzzer="$1" start="$2" corpus="$3" artifacts="$4"
here="$(cd "$(dirname "$0")" && pwd)"
if [ ! -d "$start" ]; then
    /usr/bin/python3 "$here/make_start_inputs.py" "$(dirname "$start")" "${BANDMASS_CLI:-}" >/dev/null
fi
mkdir -p "$corpus" "$artifacts"
ASAN_OPTIONS="${ASAN_OPTIONS:-allocator_may_return_null=1:detect_leaks=1}"
UBSAN_OPTIONS="${UBSAN_OPTIONS:-halt_on_error=1:print_stacktrace=1}"
G_SLICE=always-malloc
export ASAN_OPTIONS UBSAN_OPTIONS G_SLICE
# -timeout: one input taking longer is a finding (every request is bounded);
# -rss_limit_mb: so is one that needs more memory than this
# -error_exitcode: libFuzzer's own default, 77, is what meson reads as "skipped"
exec "$fuzzer" -max_total_time="${BANDMASS_FUZZ_SECONDS:-12}" -timeout=30 -rss_limit_mb=2560 \
    -error_exitcode=1 -timeout_exitcode=1 \
    -max_len=65536 -print_final_stats=1 -artifact_prefix="$artifacts/" "$corpus" "$start"
