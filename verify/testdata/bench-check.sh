#!/bin/sh
# The whole `scorewright check` against the vectorised C pair loop
# (fused.c, mode v), built here with gcc and timed in one farm-bench run,
# the two commands taking turns. Not part of CI (it needs gcc and takes
# minutes): run it by hand from the repository root and copy the figures
# into BENCHMARKS.md with this command.
#
#   sh verify/testdata/bench-check.sh [RUNS]
set -eu
runs=${1:-5}
gcc -O3 -march=native -ffast-math -o /tmp/sw-fusedv verify/testdata/fused.c -lm
go build -o /tmp/sw-bench ./cmd/scorewright
for rule in quadratic log; do
	echo "== n = 3, resolution 400, preset $rule, against the vectorised C loop"
	farm-bench -n "$runs" --warmup 1 --timeout 900 --vs '/tmp/sw-fusedv 3 400 v' -- \
		/tmp/sw-bench check --outcomes 3 --preset "$rule" --resolution 400
done
echo "== n = 3, resolution 1000 (501,501 points), preset quadratic"
farm-bench -n 1 --warmup 0 --timeout 900 -- \
	/tmp/sw-bench check --outcomes 3 --preset quadratic --resolution 1000
