#!/usr/bin/env bash
# The numbers a person reads in the command's output: no binary noise
# (1.3447999999999998, 3.05e-16 left over from a cancellation), no Go
# slice printing, no optimiser status words; backtest and distort without
# --step pay by the exact formula and say so; audit names its outcomes.
set -euo pipefail
trap '[[ $- != *e* ]] || echo "e2e-numbers: failed at line $LINENO: $BASH_COMMAND" >&2' ERR
cd "$(dirname "$0")/.."
root=$PWD
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/scorewright" ./cmd/scorewright
sw="$work/scorewright"
fail() { echo "e2e-numbers: $*" >&2; exit 1; }
o="$work/out"
mkdir "$o"
"$sw" check --outcomes frost,clear --preset quadratic --resolution 200 >"$o/check-quadratic.txt"
"$sw" check --outcomes 3 --preset spherical --resolution 40 >"$o/check-spherical.txt"
"$sw" check --outcomes 2 --generator 'p^2 - 4*(p-0.5)^4' --resolution 200 >"$o/check-improper.txt" || test $? -eq 1
"$sw" audit --outcomes rain,dry --payout '10 - 5*sum((p - hit)^2)' --resolution 200 >"$o/audit.txt"
"$sw" eval --outcomes frost,clear --preset log --report 0.7,0.3 --belief 0.6,0.4 >"$o/eval.txt"
"$sw" table --design testdata/designs/water.toml --format json >"$o/table.json" 2>/dev/null
"$sw" table --design testdata/designs/harbour.toml --format md >"$o/point.md"
"$sw" distort --outcomes frost,clear --preset quadratic --floor 0 --cap 100 --utility crra:2 --wealth 20 --belief 0.3,0.7 >"$o/distort.txt"
"$sw" backtest --outcomes late,"on time" --preset quadratic --floor 0 --cap 10 \
  --history "$root/testdata/histories/ferry-departures.csv" >"$o/backtest.txt"
"$sw" research --outcomes frost,clear --preset quadratic --floor 0 --cap 10 --step 0.1 >"$o/research.txt"

# Binary noise: long runs of 9s or 0s, and tiny exponents that are not a
# stated tolerance, residual or deviation.
if grep -HE '[0-9]{3,}9999[0-9]|\.[0-9]*0000000[1-9]' "$o"/*; then fail "binary noise"; fi
if grep -HE '[0-9]e-1[0-9]' "$o"/* | grep -vE 'residual|deviation|tolerance|rounding floor|plus [0-9.e-]+ where|than 1e-1[0-9] relative'; then fail "a rounding remainder printed as a value"; fi
# Go's printing of slices, maps and structs; optimiser status words.
if grep -HE '\[[A-Za-z]+ [A-Za-z]+\]|map\[|&\{|Convergence|Failure|IterationLimit' "$o"/*; then fail "Go or optimiser words in the output"; fi
grep -q 'D(q, p) >= 0 over every grid pair (smallest 0, up to the rounding the tolerance allows)' "$o/check-quadratic.txt"
grep -q 'finite range of effort per outcome over the grid reports: 1: \[-1, 0\]' "$o/check-spherical.txt"
grep -q 'base rate (0.5, 0.5) over frost, clear;' "$o/research.txt"

# Without --step: the exact formula, said.
grep -q 'no menu: reports are paid by the exact formula, unrounded' "$o/distort.txt"
grep -q 'no report menu was given: every forecast is paid by the exact formula' "$o/backtest.txt"
grep -q '^  menu: none: reports are paid by the exact formula' "$o/backtest.txt"
# audit names the outcomes it was given.
grep -q 'over 2 outcomes (rain, dry)' "$o/audit.txt"
grep -q 'rain: \[0, 10\], dry: \[0, 10\]' "$o/audit.txt"
echo "e2e-numbers: ok"
