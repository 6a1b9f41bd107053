#!/usr/bin/env bash
# The README's backtest worked example (the ferry co-operative), run as
# written: the CORP lines it quotes, the same report from the CSV and the
# JSON lines copy, the figure, and a quote left open named by its lines.
set -euo pipefail
# A failed step names its line, so a silent grep -q says where it stopped.
trap '[[ $- != *e* ]] || echo "e2e-backtest: failed at line $LINENO: $BASH_COMMAND" >&2' ERR
cd "$(dirname "$0")/.."
root=$PWD
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/scorewright" ./cmd/scorewright
sw="$work/scorewright"
cd "$work"
hist="$root/testdata/histories"

"$sw" backtest --outcomes late,"on time" --preset quadratic --floor 0 --cap 10 \
  --unit 0.01 --history "$hist/ferry-departures.jsonl" --figure ferry.png >jsonl.txt
grep -q '^  Gannet       late  rule A       0.26      0.1768   0.0339  0.2419  0.3848$' jsonl.txt
grep -q '^  Tern         late  rule A       0.26      0.1934  0.03198  0.2234  0.3848$' jsonl.txt
grep -q '^  2026-01         54   492.74$' jsonl.txt
grep -q '^  Gannet            150  1367.43   9.116       1$' jsonl.txt
grep -q 'no report menu was given: every forecast is paid by the exact formula' jsonl.txt
head -c 8 ferry.png | grep -q 'PNG'

"$sw" backtest --outcomes late,"on time" --preset quadratic --floor 0 --cap 10 \
  --unit 0.01 --history "$hist/ferry-departures.csv" >csv.txt
diff <(tail -n +2 jsonl.txt | grep -v 'reliability picture written') <(tail -n +2 csv.txt)

# A quote left open: the bad record names the lines it took in.
{ echo "forecaster,question,outcome,late,on time"; echo '"Smith, J,q1,late,0.3,0.7';
  for i in $(seq 1 50); do echo "Tern,q$i,late,0.4,0.6"; done; } >open.csv
"$sw" backtest --outcomes late,"on time" --preset quadratic --floor 0 --cap 10 --history open.csv >open.txt 2>&1 || true
grep -q 'lines 2–52: not valid CSV' open.txt
echo "e2e-backtest: passed"
