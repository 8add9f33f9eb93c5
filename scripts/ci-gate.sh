#!/bin/sh
# ci-gate.sh - the regression gate for a team's own repository (README,
# "A CI job for your own repository"): build the team's plug-in, sweep its
# methods on its problems, check the run against the committed baseline and
# the mission's requirements, and leave JUnit XML and a Markdown summary for
# the CI page. Exit status: check's (0 pass, 1 regression or requirement not
# met, 2 bad input); a failed build or sweep exits with its own status.
#
#   scripts/ci-gate.sh [--plugin-source SRC.c]... [--plugin FILE.so]...
#       (--suite NAME | --methods M,.. --problems P,.. [--steps-per-orbit N,..]
#        [--tolerances T,..] [--orbits N])
#       [--baseline FILE] [--require EXPR]... [--timing] [-j N]
#       [--out DIR] [--propbench PROG]
#
# --plugin-source builds SRC.c into DIR/plugins/ against the installed
# headers (pkg-config propbench), or against $PB_INCLUDE when set (a source
# tree's include/). DIR (default ci-out) receives run/, check.xml, check.md.
set -eu

pb=${PROPBENCH:-propbench}
out=ci-out
jobs=2
sweep_args=""
check_args=""
plugins=""
sources=""
baseline=""
have_req=0

usage() { sed -n '2,19p' "$0" | sed 's/^# \{0,1\}//' >&2; exit 2; }
need() { [ $# -ge 2 ] || { echo "ci-gate: $1 needs a value" >&2; exit 2; }; }
# quote one argument for the eval below
q() { printf "'%s'" "$(printf '%s' "$1" | sed "s/'/'\\\\''/g")"; }

while [ $# -gt 0 ]; do
    case "$1" in
    --plugin-source) need "$@"; sources="$sources $(q "$2")"; shift 2 ;;
    --plugin) need "$@"; plugins="$plugins --plugin $(q "$2")"; shift 2 ;;
    --suite|--methods|--problems|--steps-per-orbit|--tolerances|--orbits|--horizon-s)
        need "$@"; sweep_args="$sweep_args $1 $(q "$2")"; shift 2 ;;
    --baseline) need "$@"; baseline=$2; check_args="$check_args --baseline $(q "$2")"; shift 2 ;;
    --require) need "$@"; have_req=1; check_args="$check_args --require $(q "$2")"; shift 2 ;;
    --timing) check_args="$check_args --timing"; shift ;;
    -j) need "$@"; jobs=$2; shift 2 ;;
    --out) need "$@"; out=$2; shift 2 ;;
    --propbench) need "$@"; pb=$2; shift 2 ;;
    -h|--help) usage ;;
    *) echo "ci-gate: unknown option '$1' (see --help)" >&2; exit 2 ;;
    esac
done
[ -n "$sweep_args" ] || { echo "ci-gate: give --suite or --methods and --problems" >&2; exit 2; }
[ -n "$baseline" ] || [ "$have_req" = 1 ] || { echo "ci-gate: give --baseline or --require" >&2; exit 2; }

mkdir -p "$out/plugins"
# 1. the team's plug-in, against the installed headers (or $PB_INCLUDE)
eval "set -- $sources"
for src in "$@"; do
    so="$out/plugins/$(basename "$src" .c).so"
    if [ -n "${PB_INCLUDE:-}" ]; then cflags="-I$PB_INCLUDE"; else cflags=$(pkg-config --cflags propbench); fi
    echo "ci-gate: building $so" >&2
    # shellcheck disable=SC2086
    ${CC:-cc} -std=c11 -O2 -Wall -Wextra -Werror -shared -fPIC $cflags "$src" -o "$so"
    plugins="$plugins --plugin $(q "$so")"
done
# 2. the sweep (a fresh folder: an earlier run is never checked by mistake)
rm -rf "$out/run"
eval "\"\$pb\" sweep $plugins $sweep_args -j \"\$jobs\" --quiet --out \"\$out/run\""
# 3. the gate: baseline and requirements; only failing cases in the log
set +e
eval "\"\$pb\" check $check_args --only-failures --junit \"\$out/check.xml\" --markdown \"\$out/check.md\" \"\$out/run\""
rc=$?
echo "ci-gate: JUnit in $out/check.xml, summary in $out/check.md (exit $rc)" >&2
exit $rc
