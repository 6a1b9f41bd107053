#!/bin/bash
# alternate.sh RUNS 'COMMAND A' 'COMMAND B': A and B in turn, RUNS times
# each after one warm-up of each, timed by /usr/bin/time (the kernel's
# accounting of each finished process). Prints the minimum and median of
# CPU seconds (user + system) and wall seconds for each, and the CPU ratio
# A/B: the ratio of the minima and the median of the run-by-run ratios (on
# a shared machine the pairs see the same load, so their ratio is steadier
# than either time). Not part of CI; the commands are split on spaces, so
# quote nothing inside them.
set -euf # -f: no file-name globbing of the split commands
runs=$1 a=$2 b=$3
$a >/dev/null 2>&1 || true
$b >/dev/null 2>&1 || true
t=$(mktemp)
trap 'rm -f "$t"' EXIT
for _ in $(seq "$runs"); do
	/usr/bin/time -o "$t" -f "%U %S %e" $a >/dev/null 2>&1 || true
	ta=$(tail -1 "$t")
	/usr/bin/time -o "$t" -f "%U %S %e" $b >/dev/null 2>&1 || true
	tb=$(tail -1 "$t")
	echo "$ta $tb"
done | awk '
function sorted(x, n, y,   i, j, t) { for (i = 1; i <= n; i++) y[i] = x[i]; for (i = 1; i <= n; i++) for (j = i + 1; j <= n; j++) if (y[j] < y[i]) { t = y[i]; y[i] = y[j]; y[j] = t } }
function med(x, n,   y) { sorted(x, n, y); return n % 2 ? y[(n + 1) / 2] : (y[n / 2] + y[n / 2 + 1]) / 2 }
function least(x, n,   y) { sorted(x, n, y); return y[1] }
{ ca[NR] = $1 + $2; wa[NR] = $3; cb[NR] = $4 + $5; wb[NR] = $6; r[NR] = ca[NR] / cb[NR] }
END {
	n = NR
	printf "A: cpu %.3f s min, %.3f s median; wall %.3f s min, %.3f s median\n", least(ca, n), med(ca, n), least(wa, n), med(wa, n)
	printf "B: cpu %.3f s min, %.3f s median; wall %.3f s min, %.3f s median\n", least(cb, n), med(cb, n), least(wb, n), med(wb, n)
	printf "A/B cpu: %.2f (minima), %.2f (median of the %d pairs)\n", least(ca, n) / least(cb, n), med(r, n), n
}'
