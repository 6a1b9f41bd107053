#!/usr/bin/env bash
# The README's "Paying for research" example, run as written, with the
# lines the README quotes checked, and the command's refusals.
set -euo pipefail
# A failed step names its line, so a silent grep -q says where it stopped.
trap '[[ $- != *e* ]] || echo "e2e-research: failed at line $LINENO: $BASH_COMMAND" >&2' ERR
cd "$(dirname "$0")/.."
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/scorewright" ./cmd/scorewright
sw="$work/scorewright"
cd "$work"
status() { set +e; "$@" >out 2>err; echo $?; set -e; }

"$sw" research --outcomes ice,open --base-rate 0.3,0.7 --kappa 20 --floor 0 --cap 100 \
  --step 0.05 --compare quadratic,spherical --forecasts 30 --cost 0.5 --out ice-best.toml --write-mix >out
grep -q '^ *quadratic *1 *80 *79 *30 *2400 *0 *0.08049$' out
grep -q '^ *best for research *5.749 *35.75 *30 *172.5 *1072 *1.7 *0.07722$' out
grep -q '^ *best + 10% quadratic *5.274 *40.17 *34.9 *158.2 *1205 *1.7 *0.07722$' out
grep -q 'formula: -max(42.857143\*p2, 100\*p1)$' out
grep -q 'costs 0.4749 per forecast' out
grep -q '^title = "best bounded rule for research mixed with 10 % of the quadratic rule' ice-best.toml
# The mix is strictly proper: its table passes the re-check; check agrees.
"$sw" table --design ice-best.toml >/dev/null
"$sw" check --design ice-best.toml >out
grep -q 'strictly-proper' out
# No overwrite without --force.
test "$(status "$sw" research --outcomes ice,open --base-rate 0.3,0.7 --floor 0 --cap 100 --step 0.05 --out ice-best.toml)" -eq 2
grep -q 'ice-best.toml: file exists (use --force to replace it)' err
# JSON and the three-outcome optimum.
"$sw" research --outcomes 3 --base-rate 0.2,0.3,0.5 --kappa 10 --floor 0 --cap 100 --step 0.1 --compare quadratic --json >out
grep -q '"formula": "-max(' out
grep -q '"mix_cost"' out
# Refusals: one line, exit 2.
test "$(status "$sw" research --outcomes 2 --floor 0 --mean-pay 5 --step 0.1)" -eq 2
grep -q 'give --cap C instead of --mean-pay' err
test "$(status "$sw" research --outcomes 2 --floor 0 --cap 10 --step 0.1 --model signal)" -eq 2
grep -q -- '--model signal needs --accuracy A or --confusion ROWS' err
echo "e2e-research: ok"
