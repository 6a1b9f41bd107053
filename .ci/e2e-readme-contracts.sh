#!/usr/bin/env bash
# The README's "Contract tables, lotteries and risk" examples, run as
# written, with the lines the README quotes checked.
set -euo pipefail
# A failed step names its line, so a silent grep -q says where it stopped.
trap '[[ $- != *e* ]] || echo "e2e-readme-contracts: failed at line $LINENO: $BASH_COMMAND" >&2' ERR
cd "$(dirname "$0")/.."
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/scorewright" ./cmd/scorewright
sw="$work/scorewright"
cd "$work"
status() { set +e; "$@" >out 2>&1; echo $?; set -e; }

# 1. Frost-night table; a second write is refused; coarse rounding is refused.
"$sw" table --outcomes frost,clear --preset quadratic --floor 0 --cap 100 --step 0.1 --unit 1 --out frost.csv >out
grep -q 're-check  passed, smallest margin 1$' out
grep -q '^0.7,0.3,91,51$' frost.csv
grep -q '^# A: 100$' frost.csv
grep -q '^# caution: Have any contract' frost.csv
test "$(status "$sw" table --outcomes frost,clear --preset quadratic --floor 0 --cap 100 --step 0.1 --unit 1 --out frost.csv)" -eq 2
grep -q 'frost.csv: file exists (use --force to replace it)' out
test "$(status "$sw" table --outcomes frost,clear --preset quadratic --floor 0 --cap 100 --step 0.2 --unit 25 --out coarse.csv)" -eq 1
grep -q 'FAILED, smallest margin 0$' out
test ! -e coarse.csv
test "$(status "$sw" table --outcomes frost,clear --preset quadratic --floor 0 --cap 100 --step 0.2 --unit 25 --out coarse.csv --force)" -eq 1
head -1 coarse.csv | grep -q '^# WARNING'
"$sw" table --outcomes frost,clear --preset quadratic --floor 10 --mean-pay 60 --reference 0.2,0.8 --step 0.1 --unit 0.01 --out mean.md >out
grep -q 'A = 69.52380952, B = 29.76190476' out

# 2. Milk-yield point forecasts.
"$sw" table --interval 20,40 --preset squared-error --floor 0 --cap 50 --step 2 --unit 0.5 --out milk.pdf >out
grep -q 'pay = A - B·D(y, x), A = 50, B = 0.125' out
grep -q 're-check  passed, smallest margin 0.5$' out
head -c 4 milk.pdf | grep -q '%PDF'

# 3. Weighted four-way outlook from a design file; beta emphasis with a menu file.
cat >outlook.toml <<'TOML'
version = 1
title = "Storm-category outlook for the ferry co-operative"
outcomes = ["calm", "gale", "storm", "hurricane"]
mode = "generator"
formula = "sum(w*p*(1-p))"
weights = [1, 1, 2, 4]

[budget]
floor = 0
cap = 30
step = 0.25
unit = 0.5
rounding = "down"
TOML
"$sw" table --design outlook.toml --out outlook.md >out
grep -q 'A = 30, B = 5$' out
grep -q 're-check  passed, smallest margin 0.25$' out
grep -q 'outcome weights:\*\* 1, 1, 2, 4' outlook.md
test "$(status "$sw" table --outcomes storm,calm --preset beta --param a=0.5 --param b=3 --floor 0 --cap 20 --step 0.05 --unit 0.01)" -eq 1
printf '# storm menu: fine where storms are rare\n0\n0.01\n0.02\n0.05\n0.1\n0.2\n0.35\n0.5\n0.75\n1\n' >storm-menu.csv
"$sw" table --outcomes storm,calm --preset beta --param a=0.5 --param b=3 --floor 0 --cap 20 --menu storm-menu.csv --unit 0.01 --out storm.tex >out
grep -q 're-check  passed, smallest margin 0.0052$' out
grep -q '^(0.02, 0.98)  0.0052    (0.01, 0.99)   (0.017045, 0.032738)$' out

# 4. A CRRA forecaster on the frost-night contract.
"$sw" distort --outcomes frost,clear --preset quadratic --floor 0 --cap 100 --step 0.05 --utility crra:2 --wealth 20 --belief 0.3,0.7 >out
grep -q 'best report (0.398286, 0.601714), 9.83 probability points away; menu pick (0.4, 0.6)' out
grep -q 'largest 15.5 points' out

# 5. The harvest outlook as a lottery.
"$sw" table --outcomes below,near,above --ordered --preset ranked --floor 0 --cap 40 --step 0.25 --unit 0.5 --lottery --out harvest-lottery.md >out
grep -q 'chance (pay - 0)/40 of winning a prize of 40' out
grep -q '^| 0.25 | 0.25 | 0.5 | 0.600 | 0.850 | 0.850 |$' harvest-lottery.md
grep -q 'lottery re-check  passed on the rounded chances' out
grep -q 'regulated as gambling' harvest-lottery.md
echo "e2e-readme-contracts: ok"
