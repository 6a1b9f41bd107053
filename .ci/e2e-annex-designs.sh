#!/usr/bin/env bash
# End-to-end check of the annexes of three invented designs as a reader
# opens them: a ferry operator paying for "sailing cancelled" forecasts in
# money and as a lottery, and an untitled harbour office design of point
# forecasts. The PDF's text is extracted (pdftotext) and every page is
# rendered to PNG (pdftoppm). Installs poppler-utils when missing.
set -euo pipefail
# A failed step names its line, so a silent grep -q says where it stopped.
trap '[[ $- != *e* ]] || echo "e2e-annex-designs: failed at line $LINENO: $BASH_COMMAND" >&2' ERR
cd "$(dirname "$0")/.."
if ! command -v pdftotext >/dev/null || ! command -v pdftoppm >/dev/null; then
  (apt-get install -y poppler-utils >/dev/null 2>&1 || { apt-get update >/dev/null && apt-get install -y poppler-utils >/dev/null; })
fi
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/scorewright" ./cmd/scorewright
sw="$work/scorewright"
designs=testdata/designs
export SOURCE_DATE_EPOCH=1767225600
fail() { echo "e2e-annex-designs: $*" >&2; exit 1; }

# The ferry operator, in money.
"$sw" table --design "$designs/ferry.toml" --out "$work/ferry.pdf" >"$work/ferry.out"
pdftotext "$work/ferry.pdf" "$work/ferry.txt"
t="$work/ferry.txt"
grep -q '^Sailing-cancelled forecasts — Gullhaven Ferries$' "$t"
grep -q 'Gullhaven Ferry Company' "$t"
grep -q 'the buyer pays the forecaster the amount in NOK' "$t"
grep -q 'not a valid forecast' "$t"
grep -q 'pay if "sailing cancelled" = 600 − 400·(1 − p)²' "$t"
grep -q '416392.00 NOK' "$t"
grep -q '^verdict kind: grid evidence' "$t"
grep -q 'mathematics, not law' "$t"
grep -q 'qualified counsel' "$t"
grep -q 'Sailing-cancelled forecasts — Gullhaven Ferries — payment annex' "$t"
# The CLI states the same cost, with the currency on every amount.
grep -q '^        a forecaster who only reports the base rate: 570.40 NOK per forecast, 416392.00 NOK per season$' "$work/ferry.out"
grep -q '^        the buyer.s worst case (every forecast paid the largest amount): 600.00 NOK per forecast, 438000.00 NOK per season$' "$work/ferry.out"
pdfinfo "$work/ferry.pdf" | grep -q '^Producer: *scorewright'

# The same design as a lottery: the draw, the prize with its currency, the
# re-check on the rounded chances.
"$sw" table --design "$designs/ferry.toml" --lottery --out "$work/lottery.pdf" >"$work/lottery.out"
grep -q '^lottery re-check  passed on the rounded chances' "$work/lottery.out"
pdftotext "$work/lottery.pdf" "$work/lottery.txt"
t="$work/lottery.txt"
grep -q 'the buyer pays the forecaster 200 NOK and' "$t"
grep -q 'a prize of 400 NOK' "$t"
grep -q 'draw a whole number from 1 to 1000' "$t"
grep -q 'Drawable chances, re-checked' "$t"
grep -q 'regulated as gambling' "$t"
grep -q '0.098' "$t"

# The untitled point design: the closed formula in x and y, the worst case
# as its cost, and a running head that says "Payment annex" once.
"$sw" table --design "$designs/harbour.toml" --out "$work/harbour.pdf" >/dev/null
pdftotext "$work/harbour.pdf" "$work/harbour.txt"
t="$work/harbour.txt"
grep -q '^Payment annex$' "$t"
if grep -q 'Payment annex — payment annex' "$t"; then fail "the untitled annex says payment annex twice"; fi
grep -q 'pay = 100 − 6.25·(y − x)²' "$t"
grep -q '4. What the contract costs' "$t"
grep -q '36500.0' "$t"
grep -q 'Gullhaven Harbour Office' "$t"
grep -q '^verdict kind: grid evidence' "$t"

# Every page renders.
for f in ferry lottery harbour; do
  pdftoppm -r 60 -png "$work/$f.pdf" "$work/$f-page"
  pages=$(pdfinfo "$work/$f.pdf" | awk '/^Pages:/ {print $2}')
  test "$(ls "$work/$f-page"-*.png | wc -l)" -eq "$pages"
done
# The README's picture of the water annex's first page is the page the
# current build makes.
"$sw" table --design "$designs/water.toml" --out "$work/water.pdf" >/dev/null
pdftoppm -f 1 -l 1 -r 80 -png "$work/water.pdf" "$work/water-page"
if ! cmp -s "$work/water-page-1.png" testdata/annex/page-1.png; then
  fail "testdata/annex/page-1.png (the README's annex page) is not the current first page; make it again with: SOURCE_DATE_EPOCH=1767225600 scorewright table --design testdata/designs/water.toml --out water.pdf && pdftoppm -f 1 -l 1 -r 80 -png water.pdf page && cp page-1.png testdata/annex/page-1.png"
fi
echo "e2e-annex-designs: ok"
