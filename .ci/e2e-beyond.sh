#!/usr/bin/env bash
# End-to-end check of point forecasts, emphasis designs, distortion and
# lottery tables as a user runs them: a regional dairy buying milk-yield
# forecasts (litres per cow, 0..60) and an orchard co-operative's
# frost-night rule designed by emphasis.
set -euo pipefail
# A failed step names its line, so a silent grep -q says where it stopped.
trap '[[ $- != *e* ]] || echo "e2e-beyond: failed at line $LINENO: $BASH_COMMAND" >&2' ERR
cd "$(dirname "$0")/.."
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/scorewright" ./cmd/scorewright
sw="$work/scorewright"

status() { set +e; "$@" >"$work/out" 2>&1; echo $?; set -e; }

# Point forecasts: squared error passes, a convex generator fails (exit 1).
"$sw" check --interval 0,60 --preset squared-error --resolution 10 >"$work/out"
grep -q 'verdict: strictly-proper' "$work/out"
test "$(status "$sw" check --interval 0,60 --generator 'x^2' --resolution 10)" -eq 1
# An absolute-error payout rewards the median: audit says improper (exit 1).
test "$(status "$sw" audit --interval 0,60 --payout '40 - abs(x - y)' --resolution 10)" -eq 1
grep -q 'the mean is not the best report' "$work/out"
"$sw" audit --interval 0,60 --payout '40 - (x - y)^2/90' --json >"$work/out"
grep -q '"preset": "squared-error"' "$work/out"
# A point table in litres, written once, refused the second time (exit 2).
"$sw" table --interval 0,60 --preset squared-error --floor 0 --cap 40 --step 10 --unit 0.5 --out "$work/dairy.csv" >/dev/null
grep -q '^30,30.0,33.5,36.5,38.5,39.5,40.0,39.5,38.5,36.5,33.5,30.0$' "$work/dairy.csv"
test "$(status "$sw" table --interval 0,60 --preset squared-error --floor 0 --cap 40 --step 10 --out "$work/dairy.csv")" -eq 2

# Emphasis: the log weight reproduces -ln 0.3 and warns about both ends.
"$sw" eval --outcomes frost,clear --emphasis '1/(c*(1-c))' --report 0.3 --json >"$work/eval.json"
grep -q '1.20397280' "$work/eval.json"
grep -q 'unbounded near 0' "$work/eval.json"
test "$(status "$sw" eval --outcomes 2 --emphasis 'c - 0.5' --report 0.3)" -eq 2
grep -q 'negative' "$work/out"

# Distortion: a risk-averse forecaster shades 80 % toward the centre.
"$sw" distort --outcomes frost,clear --preset quadratic --floor 0 --cap 100 --step 0.05 --utility crra:2 --wealth 50 --belief 0.8 --json >"$work/d.json"
grep -q '"report"' "$work/d.json"
test "$(status "$sw" distort --outcomes 2 --preset quadratic --floor 0 --cap 100 --step 0.05 --utility crra:2)" -eq 2

# Lottery table: chances, the reason, the gambling caution.
"$sw" table --outcomes frost,clear --preset quadratic --floor 10 --cap 50 --step 0.25 --lottery --out "$work/lottery.md" >/dev/null
grep -q 'chance if frost' "$work/lottery.md"
grep -q 'Hossain & Okui 2013' "$work/lottery.md"
grep -q 'gambling' "$work/lottery.md"
echo "e2e-beyond: ok"
