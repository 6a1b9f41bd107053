#!/usr/bin/env bash
# End-to-end check of the workbench: the real binary in a detached tmux
# session of fixed size; keys are sent, the pane is captured and checked,
# the window is resized to 80x24 and 60x20, and the program quits. The
# risk view is opened on both demos.
set -euo pipefail
# A failed step names its line, so a silent grep -q says where it stopped.
trap '[[ $- != *e* ]] || echo "e2e-tui: failed at line $LINENO: $BASH_COMMAND" >&2' ERR
cd "$(dirname "$0")/.."

if ! command -v tmux >/dev/null 2>&1; then
  if command -v apt-get >/dev/null 2>&1 && [ "$(id -u)" = 0 ]; then
    apt-get install -y -qq tmux >/dev/null 2>&1 || true
  fi
fi
if ! command -v tmux >/dev/null 2>&1; then
  echo "######################################################################"
  echo "## e2e-tui: SKIPPED — tmux is not installed and could not be added. ##"
  echo "######################################################################"
  exit 0
fi

work=$(mktemp -d)
sock="$work/tmux.sock"
session="sw-e2e-$$"
t() { tmux -S "$sock" "$@"; }
cleanup() { t kill-server >/dev/null 2>&1 || true; rm -rf "$work"; }
trap cleanup EXIT

go build -o "$work/scorewright" ./cmd/scorewright

# wait_for TEXT: poll the pane until TEXT shows (at most about 20 s).
wait_for() {
  for _ in $(seq 1 200); do
    if t capture-pane -p -t "$session" | grep -qF -- "$1"; then return 0; fi
    sleep 0.1
  done
  echo "e2e-tui: never saw: $1"; echo "---- pane ----"; t capture-pane -p -t "$session"; exit 1
}
key() { t send-keys -t "$session" "$@"; sleep 0.2; }

repo=$(pwd)
cd "$work"
# Recovery files go to a state directory of the run's own.
export XDG_STATE_HOME="$work/state"
t new-session -d -s "$session" -x 120 -y 40 "TERM=xterm-256color XDG_STATE_HOME=$work/state ./scorewright; echo EXITED-\$?; sleep 30"
wait_for "Orchard co-operative"
wait_for "Verdict strictly-proper"
wait_for "menu re-check passed"

# Type a bad formula; the error shows under it with a caret; q is text.
key Down; key Down; key Down; key Enter; key End
key " + q"
wait_for 'unknown name "q"'
wait_for "^"
key BSpace; key BSpace; key BSpace; key BSpace
wait_for "compiles"
key Escape

# Help overlay.
key "?"
wait_for "Anywhere"
key Escape

# Backtest: load the frost history; the view shows the reliability
# picture and the totals; esc goes back to the panes.
key C-d
wait_for "Load a forecast history"
key M-Home
key "$repo/testdata/histories/orchard-frost.csv"
key Enter
wait_for "perfect reliability"
wait_for 'observed frequency of "frost"'
wait_for "176 forecasts, 4 rows skipped"
wait_for "Alder"
key Escape
wait_for "Picture"

# Risk view: the frost curve under CRRA 1, then CRRA 2 (coefficient row,
# two steps right); 9.52 points is what `scorewright distort` gives for
# the same inputs. esc goes back to the panes.
key C-r
wait_for "truthful report"
wait_for "chosen belief"
key Down; key Right; key Right
wait_for "risk-averse (CRRA 2)"
wait_for "Largest distortion 9.52 probability points"
key Escape
wait_for "Picture"

# Budget pane: rounding to whole fives breaks the frost table (rows are
# marked TIE or BEATEN); f proposes the coarsest unit that passes and 1
# takes it. Then the checks pane opens a check's full text.
key Tab; key Tab; key Tab
wait_for "Budget and table · field 1 of"
for _ in $(seq 1 8); do key Down; done
wait_for "field 9 of"
key Right; key Right; key Right; key Right
wait_for "menu re-check FAILED"
wait_for "BEATEN"
key f
wait_for "1 unit 0.1, the coarsest that passes"
key 1
wait_for "took the proposal"
wait_for "menu re-check passed"
key BTab
key Down
key Enter
wait_for "Checks · full text"
wait_for "what it measures"
key Escape
key Tab; key Tab
wait_for "┏ Design"

# The harvest demo draws a ternary picture; the edits above are unsaved,
# so ctrl+n asks first and d switches without saving.
key C-n
wait_for "would drop unsaved changes"
key d
wait_for "harvest outlook"
wait_for "gap by belief"

# Export a CSV of the table.
key C-e
wait_for "Export the payment table"
key Enter
wait_for "exported:"
ls "$work"/*.csv >/dev/null

# Resize: the layout follows, then the small-terminal message.
if t resize-window -t "$session" -x 80 -y 24 2>/dev/null; then
  wait_for "Picture"
  key C-r
  wait_for "toward"
  wait_for "Largest distortion"
  key Escape
  wait_for "Picture"
  t resize-window -t "$session" -x 60 -y 20
  wait_for "at least 80×24"
  t resize-window -t "$session" -x 100 -y 30
  wait_for "Picture"
else
  echo "e2e-tui: WARNING: this tmux cannot resize a window (needs tmux >= 2.9); resize checks skipped"
fi

# Unsaved changes (one more outcome) are kept in a recovery file; q asks.
key +
wait_for "outcome 4  (4)"
for _ in $(seq 1 50); do
  ls "$work"/state/scorewright/recovery/*.recover.toml >/dev/null 2>&1 && break
  sleep 0.1
done
ls "$work"/state/scorewright/recovery/*.recover.toml >/dev/null
key q
wait_for "would drop unsaved changes"

# ctrl+c twice leaves at once; the next start offers the edits and r
# restores them.
key C-c
wait_for "EXITED-0"
t kill-session -t "$session"
t new-session -d -s "$session" -x 100 -y 30 "TERM=xterm-256color XDG_STATE_HOME=$work/state ./scorewright; echo EXITED-\$?; sleep 30"
wait_for "Unsaved edits were kept"
key r
wait_for "outcome 4  (4)"
wait_for "restored the unsaved edits"
key q
wait_for "would drop unsaved changes"
key d
wait_for "EXITED-0"
if ls "$work"/state/scorewright/recovery/*.recover.toml >/dev/null 2>&1; then
  echo "e2e-tui: the dropped edits' recovery file stayed"; exit 1
fi
echo "e2e-tui: passed"
