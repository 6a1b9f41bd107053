#!/usr/bin/env bash
# End-to-end check of `scorewright check` and `scorewright audit` as a user
# runs them: build the binary, check a frost-night rule and a three-way
# harvest outlook, audit payout formulas, and check the exit statuses and
# JSON fields the CLI contract fixes.
set -euo pipefail
# A failed step names its line, so a silent grep -q says where it stopped.
trap '[[ $- != *e* ]] || echo "e2e-verify: failed at line $LINENO: $BASH_COMMAND" >&2' ERR
cd "$(dirname "$0")/.."
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/scorewright" ./cmd/scorewright
sw="$work/scorewright"

status() { set +e; "$@" >"$work/out" 2>"$work/err"; rc=$?; set -e; echo "$rc"; }

# A strictly proper preset: exit 0, the grid stated, stdout JSON only.
test "$(status "$sw" check --outcomes below,near,above --preset log --resolution 60 --json)" -eq 0
grep -q '"verdict": "strictly-proper"' "$work/out"
grep -q '"resolution": 60' "$work/out"
grep -q '"points": 1891' "$work/out"   # C(62, 2)
test ! -s "$work/err"
test "$(status "$sw" check --outcomes frost,clear --preset quadratic)" -eq 0
grep -q 'evidence, not a proof' "$work/out"

# Not concave near 1/2: exit 1 with the verdict printed.
test "$(status "$sw" check --outcomes frost,clear --generator 'p^2 - 4*(p - 0.5)^4')" -eq 1
grep -q 'verdict: improper' "$work/out"

# The linear payout: gap 1/8 at (3/4, 1/4), best report (1, 0).
test "$(status "$sw" audit --outcomes frost,clear --payout 'p[y]' --json)" -eq 1
tr -d ' \n' <"$work/out" | grep -q '"gap":{"max":0.125,"belief":\[0.75,0.25\],"best_report":\[1,0\]'
grep -q '"direction": "exaggerates"' "$work/out"

# A scaled Brier payout is identified with its scale and shift.
test "$(status "$sw" audit --outcomes 3 --payout '10 - 5*sum((p - hit)^2)' --resolution 40 --json)" -eq 0
id=$(tr -d ' \n' <"$work/out" | sed -n 's/.*"identified":{"preset":"quadratic","scale":\([^,]*\),"shift":\([^,]*\),.*/\1 \2/p')
test -n "$id"
awk -v s="${id% *}" -v t="${id#* }" 'BEGIN { exit !((s-5)^2 < 1e-18 && (t-10)^2 < 1e-18) }'

# Usage errors: exit 2, one line on stderr, nothing on stdout.
test "$(status "$sw" audit --outcomes 2 --payout 'p[y] + q')" -eq 2
test "$(wc -l <"$work/err")" -eq 1
test ! -s "$work/out"
test "$(status "$sw" check --outcomes 3 --preset quadratic --tolerance -1)" -eq 2
echo "verify end-to-end: ok"
