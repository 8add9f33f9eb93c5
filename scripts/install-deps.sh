#!/bin/sh
# Installs the Debian packages propbench needs, only those that are missing.
# Called by the Makefile before every build; safe to run again (it does nothing
# when everything is present). Set PB_WITH_BROWSER=1 to also get chromium,
# PB_WITH_FUZZ=1 clang and its libFuzzer runtime (make fuzz).
set -u

pkgs="libgsl-dev libcriterion-dev gnuplot-nox libjansson-dev libinih-dev nettle-dev pkg-config parallel libxml2-utils man-db groff-base"
if [ "${PB_WITH_FUZZ:-0}" = 1 ]; then
    pkgs="$pkgs clang libclang-rt-14-dev"
fi
if [ "${PB_WITH_BROWSER:-0}" = 1 ]; then
    pkgs="$pkgs chromium"
fi

missing=""
for p in $pkgs; do
    if ! dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed"; then
        missing="$missing $p"
    fi
done
# the layout check is a Python script; any python3 on the PATH will do
command -v python3 >/dev/null 2>&1 || missing="$missing python3"
[ -z "$missing" ] && exit 0

echo "install-deps: missing Debian packages:$missing" >&2
if ! command -v apt-get >/dev/null 2>&1; then
    echo "install-deps: error: apt-get not found; install these packages by hand:$missing" >&2
    exit 1
fi
if [ "$(id -u)" -ne 0 ]; then
    if command -v sudo >/dev/null 2>&1 && sudo -n true 2>/dev/null; then
        SUDO="sudo -n"
    else
        echo "install-deps: error: not root and no password-less sudo; run as root:" >&2
        echo "    apt-get update && apt-get install -y$missing" >&2
        exit 1
    fi
else
    SUDO=""
fi
echo "install-deps: running apt-get update and apt-get install -y$missing" >&2
export DEBIAN_FRONTEND=noninteractive
$SUDO apt-get update -q >/dev/null 2>&1 || echo "install-deps: warning: apt-get update failed; trying the install anyway" >&2
# shellcheck disable=SC2086
if ! $SUDO apt-get install -y -q --no-install-recommends $missing >/dev/null; then
    echo "install-deps: error: apt-get install failed for:$missing" >&2
    exit 1
fi
echo "install-deps: installed:$missing" >&2
