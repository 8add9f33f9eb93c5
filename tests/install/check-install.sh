#!/bin/sh
# check-install.sh ROOT STAGE - install propbench into STAGE (make install
# DESTDIR=STAGE PREFIX=/usr), build tests/install/consumer.c outside the tree
# with pkg-config alone, against the shared and then the static library, and
# run both. The stage is removed after a pass and kept after a failure.
set -eu
root=$1
stage=$2
rm -rf "$stage"
make -s -C "$root" install DESTDIR="$stage" PREFIX=/usr >/dev/null
export PKG_CONFIG_PATH="$stage/usr/lib/pkgconfig" PKG_CONFIG_SYSROOT_DIR="$stage"
# the manual page renders without a warning, and the completion completes
man_warn=$(MANWIDTH=80 man --warnings=all -l "$stage/usr/share/man/man1/propbench.1" 2>&1 >/dev/null)
[ -z "$man_warn" ] || { echo "check-install: man -l propbench.1: $man_warn" >&2; exit 1; }
MANWIDTH=80 man -l "$stage/usr/share/man/man1/propbench.1" 2>/dev/null | grep -q "EXIT STATUS"
comp=$(bash -c '. "$1"; COMP_WORDS=("$2" che); COMP_CWORD=1; _propbench; echo "${COMPREPLY[*]}"' sh \
    "$stage/usr/share/bash-completion/completions/propbench" "$stage/usr/bin/propbench")
[ "$comp" = check ] || { echo "check-install: completion of 'propbench che' gave '$comp'" >&2; exit 1; }
echo "check-install: the manual page renders (man -l) and bash completes verbs"
work="$stage/work"
mkdir -p "$work"
cp "$root/tests/install/consumer.c" "$work/"
cd "$work"
cc=${CC:-cc}
flags="-std=c11 -Wall -Wextra -Werror $(pkg-config --cflags propbench)"
echo "check-install: $cc consumer.c $(pkg-config --cflags --libs propbench)"
# shellcheck disable=SC2046
$cc $flags consumer.c -o consumer-shared $(pkg-config --libs propbench) -lm
LD_LIBRARY_PATH="$stage/usr/lib" ./consumer-shared
# the static archive, with the libraries it needs from --static
# shellcheck disable=SC2046
$cc $flags consumer.c -o consumer-static "$stage/usr/lib/libpropbench.a" \
    $(pkg-config --static --libs propbench | sed 's/-lpropbench//')
./consumer-static >/dev/null
# the headers from C++ too (extern "C"): a program calling the library links
if command -v c++ >/dev/null 2>&1; then
    printf '#include <propbench/propbench.h>\n#include <cstring>\nint main() { return std::strcmp(pb_version(), PB_VERSION) != 0 || !pb_method_find("rk4"); }\n' > cxx.cc
    # shellcheck disable=SC2046
    c++ -Wall -Wextra -Werror $(pkg-config --cflags propbench) cxx.cc -o cxx $(pkg-config --libs propbench)
    LD_LIBRARY_PATH="$stage/usr/lib" ./cxx
    echo "check-install: a C++ program links against the headers and the shared library"
fi
# a plug-in method built against the installed headers alone, loaded and
# certified by the installed program
cp "$root/examples/plugins/ralston3.c" "$work/"
# shellcheck disable=SC2046
$cc -std=c11 -Wall -Wextra -Werror -shared -fPIC $(pkg-config --cflags propbench) ralston3.c -o ralston3.so
"$stage/usr/bin/propbench" selftest --plugin ./ralston3.so >selftest.txt
grep -q "ralston3: 9 of 9 checks passed" selftest.txt
echo "check-install: the example plug-in, built against the installed headers, passes selftest"
# and is gated as a team would in its CI: a sweep with it (two workers), its
# baseline, a rerun checked against that baseline, bit for bit
pb="$stage/usr/bin/propbench"
for d in gate1 gate2; do
    "$pb" sweep --plugin ./ralston3.so --problems kepler-e0.5,leo-circular --methods ralston3,rk4 \
        --steps-per-orbit 200,400 --orbits 5 --repeats 0 -j 2 --quiet --out "$d"
done
grep -q '"sha256"' gate1/summary.json
"$pb" baseline gate1 --out gate.json >/dev/null
"$pb" check --strict --baseline gate.json gate2 >check.txt
grep -q "PASS" check.txt
"$pb" run --plugin ./ralston3.so --problem kepler-e0.5 --method ralston3 --steps-per-orbit 200 \
    --orbits 2 --repeats 0 --quiet --out gate-run
"$pb" select --plugin ./ralston3.so --problem kepler-e0.5 --orbits 5 --max-pos-err 1e-4 \
    --methods ralston3 --quiet --out select.json
echo "check-install: the plug-in through run, sweep -j 2, select, baseline and check --strict"
echo "check-install: the shared and the static build both passed"
rm -rf "$stage"
