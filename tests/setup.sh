#!/usr/bin/env bash
# setup.sh: installs what a fresh Debian 12 machine lacks, then configures and
# builds bandmass into build/. Sourced by tests/run.sh and examples/demo.sh;
# install_packages and configure_build serve run.sh's other passes too.
set -euo pipefail

top="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
build="$top/build"

packages=(gcc pkg-config meson ninja-build python3 libgsl-dev libglib2.0-dev
          libjson-glib-dev gobject-introspection libgirepository1.0-dev
          python3-gi python3-numpy python3-scipy python3-mpmath gjs
          octave liboctave-dev time valgrind libsymspg-dev r-base-dev r-cran-matrix
          libcairo2-dev fonts-dejavu-core libopenmpi-dev)

# install_packages PACKAGE...: installs those not installed yet (apt-get).
install_packages() {
    local missing=() p sudo=""
    for p in "$@"; do
        dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
    done
    if [ ${#missing[@]} -gt 0 ]; then
        echo "bandmass setup: installing ${missing[*]}" >&2
        [ "$(id -u)" -eq 0 ] || sudo="sudo"
        $sudo apt-get update -qq
        DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${missing[@]}" >&2
    fi
}

install_packages "${packages[@]}"

# configure_build DIR [MESON OPTION...]: configures DIR once (later runs keep
# its options), then builds it.
configure_build() {
    local dir="$1"
    shift
    if [ ! -f "$dir/build.ninja" ]; then
        meson setup "$dir" "$top" -Dwerror=true "$@" >&2
    fi
    ninja -C "$dir" >&2
}

configure_build "$build"
