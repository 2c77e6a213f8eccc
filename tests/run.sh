#!/usr/bin/env bash
# run.sh: set up (packages, build) and run the whole test suite with meson test.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
source "$here/setup.sh"
meson test -C "$build" --print-errorlogs "$@"
