#!/bin/sh
# The default comparison: RK4 against leapfrog on built-in problems over
# 1000 orbits, into results/runs/demo, then the report of that run.
set -eu
bin=${1:-build/propbench}
out=results/runs/demo
echo "propbench demo: RK4 vs leapfrog, 1000 orbits, on kepler-e0, kepler-e0.6, kepler-e0.9"
echo "and (one day is ~15.6 orbits, here 1000 orbits = ~64 days) leo-near-circular."
"$bin" sweep --problems kepler-e0,kepler-e0.6,kepler-e0.9,leo-near-circular \
    --methods rk4,leapfrog --steps-per-orbit 2000,8000 --orbits 1000 -j 2 --out "$out"
cat <<'TXT'

What to look for: leapfrog's energy error is "bounded" (it oscillates but does
not drift) while RK4's grows "linear"ly; RK4's position error grows about
quadratically and leapfrog's about linearly (the along-track phase drift).
At equal evaluations RK4 costs 4 per step, leapfrog 1.
Benchmarks on idealised problems do not validate an operational propagator;
defer to the mission's own verification and flight-dynamics practice.
TXT
if "$bin" report --help >/dev/null 2>&1; then
    "$bin" report "$out"
fi
echo "outputs: $out/summary.json, $out/series/*.csv"
