#!/bin/sh
# seed.sh DIR - the fuzzer's first inputs: each reader's valid files from the
# tree, prefixed with the byte that picks the reader (fuzz_readers.c).
set -eu
dir=$1
mkdir -p "$dir"
i=0
for f in tests/data/*.oem; do
    [ -f "$f" ] || continue
    { printf '\000'; cat "$f"; } > "$dir/oem-$i"; i=$((i + 1))
done
for f in problems/examples/*.ini; do
    { printf '\001'; cat "$f"; } > "$dir/ini-$i"; i=$((i + 1))
done
if [ -f results/baseline/quick.json ]; then
    { printf '\003'; cat results/baseline/quick.json; } > "$dir/baseline-$i"
fi
