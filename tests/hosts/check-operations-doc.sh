#!/bin/sh
# check-operations-doc.sh CLI DOC: DOC (docs/operations.md) must be exactly what
# `bandmass ops --markdown` prints from the registry's tables. To refresh it:
#     build/plugin/bandmass ops --markdown > docs/operations.md
set -eu
cli=$1
doc=$2
out=$(mktemp)
trap 'rm -f "$out"' EXIT
"$cli" ops --markdown > "$out"
if ! diff -u "$doc" "$out"; then
    echo "docs/operations.md is out of date: regenerate it with" >&2
    echo "    bandmass ops --markdown > docs/operations.md" >&2
    exit 1
fi
