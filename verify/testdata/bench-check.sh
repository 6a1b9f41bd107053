#!/bin/sh
# The whole `scorewright check` against the vectorised C pair loop
# (fused.c, mode v), built here with gcc and timed by alternate.sh, the
# two commands taking turns. Not part of CI (it needs gcc and takes
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
	bash verify/testdata/alternate.sh "$runs" \
		"/tmp/sw-bench check --outcomes 3 --preset $rule --resolution 400" '/tmp/sw-fusedv 3 400 v'
done
echo "== n = 3, resolution 1000 (501,501 points), preset quadratic"
/usr/bin/time -f "%U s user, %S s system, %e s wall, %M KiB peak" \
	/tmp/sw-bench check --outcomes 3 --preset quadratic --resolution 1000 >/dev/null
