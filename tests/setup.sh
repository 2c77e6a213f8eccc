#!/usr/bin/env bash
# setup.sh: installs what a fresh Debian 12 machine lacks, then configures and
# builds bandmass into build/. Sourced by tests/run.sh and examples/demo.sh.
set -euo pipefail

top="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
build="$top/build"

packages=(gcc pkg-config meson ninja-build python3 libgsl-dev libglib2.0-dev
          libjson-glib-dev gobject-introspection libgirepository1.0-dev
          python3-gi python3-numpy python3-scipy python3-mpmath gjs
          octave liboctave-dev time valgrind libsymspg-dev)

missing=()
for p in "${packages[@]}"; do
    dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
    echo "bandmass setup: installing ${missing[*]}" >&2
    sudo=""
    [ "$(id -u)" -eq 0 ] || sudo="sudo"
    $sudo apt-get update -qq
    DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${missing[@]}" >&2
fi

if [ ! -f "$build/build.ninja" ]; then
    meson setup "$build" "$top" -Dwerror=true >&2
fi
ninja -C "$build" >&2
