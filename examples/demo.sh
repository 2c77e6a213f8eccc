#!/usr/bin/env bash
# demo.sh: the Lakemoor Institute screening study (examples/study.py): three
# fictional compounds from model bands next to Si, Ge and GaAs, run through
# `bandmass batch`. Installs what is missing, builds, runs the study, prints
# its ranked report and the folder with the report, batch results and plots.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
source "$here/../tests/setup.sh"

out="$build/demo-study"
/usr/bin/python3 "$here/study.py" "$build/plugin/bandmass" "$out"
echo
echo "These are model numbers for screening: check them against measurement before"
echo "any decision that matters, and defer to the applicable codes and practice."
