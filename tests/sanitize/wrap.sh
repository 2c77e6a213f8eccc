#!/bin/sh
# wrap.sh: runs one test of the sanitizer pass (meson test --setup sanitize).
# Programs built with the sanitizers run as they are, leak checking on. An
# interpreter that loads the library (python3, gjs, octave-cli, sh) was not
# built with AddressSanitizer, whose run-time must come first in the process:
# it gets it by LD_PRELOAD, and leak checking off, since interpreters keep
# memory until exit by design. Valgrind cannot run under AddressSanitizer (both
# claim the address space): its tests are skipped here (exit 77) and run in the
# normal pass.
prog="$1"
case "$(basename "$prog")" in
    valgrind*) echo "valgrind does not run under AddressSanitizer: skipped" >&2; exit 77 ;;
esac
if ! readelf -d "$(command -v "$prog")" 2>/dev/null | grep -q 'libasan'; then
    LD_PRELOAD="$BANDMASS_ASAN_RUNTIME${LD_PRELOAD:+ $LD_PRELOAD}"
    ASAN_OPTIONS="$ASAN_OPTIONS:detect_leaks=0"
    export LD_PRELOAD ASAN_OPTIONS
fi
exec "$@"
