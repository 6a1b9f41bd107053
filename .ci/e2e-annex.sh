#!/usr/bin/env bash
# End-to-end check of the annexes as a user opens them: an invented water
# utility's design exported as PDF, XLSX and HTML; the PDF's text is
# extracted (pdftotext), its attached design is detached and fingerprinted
# again, and its first page is rendered to PNG (pdftoppm). Installs
# poppler-utils when missing.
set -euo pipefail
# A failed step names its line, so a silent grep -q says where it stopped.
trap '[[ $- != *e* ]] || echo "e2e-annex: failed at line $LINENO: $BASH_COMMAND" >&2' ERR
cd "$(dirname "$0")/.."
if ! command -v pdftotext >/dev/null || ! command -v pdftoppm >/dev/null || ! command -v pdfdetach >/dev/null; then
  (apt-get install -y poppler-utils >/dev/null 2>&1 || { apt-get update >/dev/null && apt-get install -y poppler-utils >/dev/null; })
fi
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/scorewright" ./cmd/scorewright
sw="$work/scorewright"
export SOURCE_DATE_EPOCH=1767225600
for f in pdf xlsx html; do
  "$sw" table --design testdata/designs/water.toml --out "$work/water.$f" >/dev/null
  test -s "$work/water.$f"
done

# The README's example, as written there.
(cd "$work" && "$sw" table --design "$OLDPWD/testdata/designs/water.toml" --out readme.pdf) >"$work/out"
grep -q '^cost  at the base rate (0.1, 0.9) (the buyer.s base rate), per forecast and per season:$' "$work/out"
grep -q '^        a forecaster who only reports the base rate: 143.25 EUR per forecast, 52286.25 EUR per season$' "$work/out"
grep -q '^wrote readme.pdf (pdf)$' "$work/out"

pdftotext "$work/water.pdf" "$work/water.txt"
txt="$work/water.txt"
# The Unicode font prints B·L and the closed formula as written.
grep -q 'A - B·L(p, k)' "$txt"
grep -q '150 − 75·(1 − p)²' "$txt"
# Parties, currency, blank lines for what is unset, the clause, the cost.
grep -q 'Kestrel Vale Water Board' "$txt"
grep -q 'Signed on' "$txt"
grep -q 'the buyer pays the forecaster the amount in EUR' "$txt"
grep -q 'not a valid forecast' "$txt"
grep -q '52286.25 EUR' "$txt"
# The table runs over pages with its head repeated.
test "$(grep -c 'payment table, continued' "$txt")" -ge 1
grep -q '89.25' "$txt"
# The comment that opens the formula is not the record's formula line.
grep -q '^formula: 1 - sum(p^2)' "$txt"
grep -q 'qualified counsel' "$txt"
# The fingerprint printed is the SHA-256 of the attached design, and the
# attached design makes the same table again.
pdfdetach -saveall -o "$work" "$work/water.pdf"
fp=$(sha256sum "$work/design.toml" | cut -d' ' -f1)
grep -q "$fp" "$txt"
"$sw" table --design "$work/design.toml" --format csv >"$work/again.csv"
"$sw" table --design testdata/designs/water.toml --format csv >"$work/first.csv"
cmp "$work/again.csv" "$work/first.csv"
pdfinfo "$work/water.pdf" | grep -q '^Producer: *scorewright'

# Terms without a season length: the cost table has no season column
# (its cell once ran over the amounts beside it) and a sentence says why.
"$sw" table --outcomes frost,clear --preset quadratic --floor 0 --cap 40 --step 0.05 --unit 0.1 --out "$work/noseason.pdf" >/dev/null
pdftotext -layout "$work/noseason.pdf" "$work/noseason.txt"
grep -q 'do not state the forecasts per season, so no season total is given' "$work/noseason.txt"
if grep -q 'forecasts per season not stated' "$work/noseason.txt"; then echo "e2e-annex: a season cell in a table without a season"; exit 1; fi
grep -Eq '^ *a forecaster who only reports the base rate +30\.0 units$' "$work/noseason.txt"

pdftoppm -f 1 -l 1 -r 60 -png "$work/water.pdf" "$work/page"
test -s "$work/page-1.png"
head -c 2 "$work/water.xlsx" | grep -q PK
grep -q '<meta name="generator" content="scorewright' "$work/water.html"
echo "e2e-annex: ok"
