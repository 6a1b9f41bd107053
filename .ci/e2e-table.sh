#!/usr/bin/env bash
# End-to-end check of `scorewright table` as a user runs it: build the
# binary, export an orchard co-operative's frost-night table in every
# format, and check the refusals and exit statuses the CLI contract fixes.
set -euo pipefail
# A failed step names its line, so a silent grep -q says where it stopped.
trap '[[ $- != *e* ]] || echo "e2e-table: failed at line $LINENO: $BASH_COMMAND" >&2' ERR
cd "$(dirname "$0")/.."
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/scorewright" ./cmd/scorewright
sw="$work/scorewright"
export SOURCE_DATE_EPOCH=1767225600
rule=(--outcomes frost,clear --preset quadratic --floor 0 --cap 100 --step 0.1 --unit 1)

for f in csv md json tex svg png pdf xlsx html; do
  "$sw" table "${rule[@]}" --out "$work/annex.$f" >/dev/null
  test -s "$work/annex.$f"
done
# Brier table of the issue: at p = 0.7 it pays 91 (frost) and 51 (clear).
grep -q '^0.7,0.3,91,51$' "$work/annex.csv"
grep -q 'qualified counsel' "$work/annex.md"
head -c 4 "$work/annex.pdf" | grep -q '%PDF'

# An existing file is not overwritten without --force (exit 2).
set +e
"$sw" table "${rule[@]}" --out "$work/annex.csv" >/dev/null 2>&1; rc=$?
set -e
test "$rc" -eq 2

# Coarse rounding ties menu items: refused, nothing written (exit 1).
set +e
"$sw" table "${rule[@]}" --step 0.2 --unit 25 --out "$work/coarse.csv" >/dev/null 2>&1; rc=$?
set -e
test "$rc" -eq 1
test ! -e "$work/coarse.csv"

# The log rule at p = 0 is refused with both ways out (exit 2) ...
set +e
msg=$("$sw" table --outcomes frost,clear --preset log --floor 0 --cap 50 --step 0.05 2>&1 >/dev/null); rc=$?
set -e
test "$rc" -eq 2
echo "$msg" | grep -q -- '--report-floor'
echo "$msg" | grep -q -- '--clamp'
# ... and priced with a clamp, whose honesty gap is reported.
"$sw" table --outcomes frost,clear --preset log --floor 0 --cap 50 --step 0.05 --unit 0.01 --clamp 0.01 --json |
  grep -q '"clamp_gap"'
echo "e2e-table: ok"
