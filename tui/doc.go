// Package tui is scorewright's workbench: the terminal screen where a
// contract designer states a scoring rule, sees it drawn, has it checked
// and fits it to a budget.
//
// The root Model owns the layout, the design being edited and the global
// keys; each pane (design, picture, checks, budget) owns its chrome and
// exposes SetSize, Focus/Blur and its key help. Update only routes
// messages: every computation — compiling the formula, sampling the
// picture, running the checks, fitting the budget, writing files — runs in
// a tea.Cmd that answers with a typed message stamped with the generation
// number of the design it was computed for, so that answers for an
// outdated design are dropped. Running checks are cancelled through their
// context as soon as the design changes.
//
// Every kind of background work (checks, certificate, fit, picture, backtest, risk) is
// kept as one job (tui/job.go): the id of its latest run, the generation it
// is for, and its cancel function; start replaces a run, drop makes its
// answers stale. The backtest and risk views lay themselves out when a
// run's message, a key, the size or the design changes, and View only
// returns what was laid out.
//
// Settings, styles and the key map are passed to the panes explicitly;
// the package keeps no mutable state of its own.
//
// # Internals: how the workbench is built
//
// `scorewright` opens `tui.New(design, path, tui.Settings{...}, tui.NewStyles(renderer))` on the
// frost-night demo (`tui.DemoFrost`; `ctrl+n` cycles to `tui.DemoHarvest`, the ordered three-way
// harvest outlook); `scorewright open FILE` loads and validates a design first
// (`design.Load`, then `tui.PrepareDesign` fills a preset's formula).
//
// Shape (style.md 8–10): the root `Model` owns the design, the layout and the global keys; the
// panes (`DesignPane`, `PicturePane`, `ChecksPane`, `BudgetPane`) own their frames and expose
// `SetSize`, `Focus`/`Blur`, `KeyHelp`; their `Update` returns their own type (and whether the
// design changed). Settings, styles and key map are passed in; nothing global. `Update` only
// routes: compiling (`compileCmd`), drawing (`renderPicture`), checking (`checkCmd`, a stream
// of progress messages), fitting (`fitCmd`) and file work run in commands. Every answer carries
// the design's generation number; check answers also carry a run id, and the run's context is
// cancelled the moment the design changes. Checks and fit start after a debounce
// (`Settings.Debounce`, 400 ms). Engine parts plug in through `Settings.Checker`, `Fitter` and
// `Exporter` (defaults: `verify.CheckRule` / `verify.Audit`, `budget.FitRule` + `Recheck`,
// `contract/table` writers; `Exporter.Export(ctx, d, ExportRequest{Format, Path, Overwrite})`); tests substitute their own.
//
// Modes (←/→ on the Mode row): generator (H over p1..pn), payout audit (`verify.Audit`, the
// payout compared with the generator presets to name it), emphasis (n = 2, a weight w(c) through
// `generator/emphasis`; its warnings show under the formula) and point forecast of a mean (an
// interval row replaces the outcomes; `generator/point` and `verify/pointcheck`; the table is the point
// table: the budget pane shows its re-check verdict and margin (`budget.PointTable.Recheck`, exact on the
// rounded table, the verdict's wording in the notes), and it exports through contract/table in
// every format; a table that fails the re-check is refused, with nothing written, exactly as for
// tables over outcomes and as `scorewright table` without `--force`) and, after it on the mode row,
// point payout audit: a payout pay(x, y) in the report x and the outcome y on the interval, audited
// with `verify/pointcheck.AuditPayout` and the point presets as candidates, as `scorewright audit
// --interval` does (`auditPointPayout` in `tui/engine.go`; the checks pane shows its checks, the
// identification as Shift − Scale·D of a preset, and the honesty gap with the distribution, mean
// and best report where it is largest; the picture draws pay(x, y) against x for three outcomes).
// It is stored as payout mode with an interval (`onInterval(d)`; the outcome labels stay in the
// file, unused), so a saved audit opens again as one; a payout over outcomes has no interval
// (the design pane keeps it aside). Each mode remembers its last formula, and the menu step is
// kept apart for point and outcome designs.
//
// File dialogs (`tui/dialog.go`, `tui/complete.go`): tab completes the path (in the background, as
// far as every match agrees; the names still open show under it; the open dialog offers designs and
// folders, the history dialog histories), ↑/↓ change the export format and a typed extension chooses
// it at once; the export dialog starts with the format and pay chosen last. The save and export
// dialogs' suggested name stands whole, as a value does (`tui/valueinput.go`): the first typed key
// replaces it, a cursor key keeps it to edit; the open and history dialogs suggest a folder, which
// typing extends. A failure is one line in the dialog naming the file ("no file …; check the name").
//
// Unsaved changes (`tui/leave.go`, `tui/recover.go`, `tui/recovery`): every key that leaves or
// replaces the design — q, ctrl+c, the next demo, F3 (a new, blank design: `NewDesign`), opening a
// file, a preset over a formula written by hand — asks first when there are unsaved edits: s saves and then goes on, d goes on without
// saving, esc keeps editing (ctrl+c twice leaves at once). While edits are unsaved they are written,
// once they settle, atomically to a recovery file in the user's state directory
// (`Settings.RecoveryDir`); saving or dropping them removes it, and the next start offers what a run
// that ended without saving left: r restores the edits (still unsaved), d drops them, esc keeps
// them as a design file to open later.
//
// Backtest (`tui/backtest.go`): the backtest key (ctrl+d) asks for a forecast-history CSV (columns forecaster,
// question, outcome, then the design's outcome labels; the frost demo's labels are those of
// `testdata/histories/orchard-frost.csv`) and opens the backtest view, which replaces the
// four panes until esc or the backtest key. `backtestCmd` opens the file and reads its header (a header
// that does not fit, or a missing file, stays in the dialog with the reason), then fits the design
// to its budget on its step menu with `budget.TableTerms` and `backtest.TermsScheme` — the terms `scorewright
// backtest` uses, shared — and streams the rows through `backtest.Run` with progress by bytes
// read. The view shows the reliability picture for n = 2 (`tui/reliability`, bins of tenths,
// `backtest.ReliabilityCurves`), count, total and mean pay, rank, and the decomposition per
// forecaster, the skipped-row count with the first three reasons, and the command's notes (off-menu
// forecasts, a failing re-check, thin bins); for n ≠ 2 it says there is no picture and shows the
// rest. Runs carry a run id and the generation; an edit cancels the running backtest, marks the
// result "previous design", and the loaded history is replayed again after the debounce. `x` stops
// a run (its late answers are dropped) and nothing reruns until the next edit.
//
// Risk attitude (`tui/risk.go`, `tui/riskchart.go`): `ctrl+r` opens the risk view, which replaces
// the panes as the backtest view does (the two are never open together). Its inputs (`RiskInputs`,
// ↑/↓ choose, ←/→ step, shift a tenth): utility family CRRA or CARA, its coefficient (CRRA in
// halves; CARA in steps of 1/(2·range) rounded to 1, 2 or 5, range = cap (or mean pay) − floor,
// because absolute risk aversion is per unit of money; 0 is the linear utility), initial wealth
// (default one range, so CRRA's final wealth stays positive; steps of a tenth of the range; it
// follows the budget until the user steps it) and the belief shown in detail (n = 2 the event
// probability by 0.05; n > 2 the uniform belief and the curve's beliefs in turn). `riskCmd` fits
// the design with `budget.StepTerms` and `contract/risk` (`TermsContract`, `DefaultBelief`,
// `CurveBeliefs`) — the fit, contract, default belief and curve beliefs of `scorewright distort` — then solves `Best` for the belief, the
// menu pick (`BestOf` on the rounded table) and `Distortion` over the curve with progress. Runs
// carry a run id; a changed input or an edit cancels the running one and its late answers are
// dropped; the edit reruns after the debounce. n = 2 draws best report against belief beside the
// dotted diagonal (ntcharts, ticks every 0.2, axis names, legend, the chosen belief ◆); n > 2 a
// table of the distortion at each tenth of the way toward each outcome. Under both: the largest
// distortion and where, the chosen belief's best report against the truthful one, expected pay,
// and the lottery note (the lottery key of the export dialog). Payout and point designs are refused with
// the reason; an unbounded rule asks for a report floor (the budget pane's R.floor).
//
// Parameters: ←/→ (or a typed value) rewrite the parameter's line of the formula and the editor
// shows the new text (`setParam`, `rewriteParam`: indentation and a trailing comment kept, the text
// parsed back to be sure), and an override of the same name from the file gives way to the line, so
// the formula seen is the one checked and saved; a design opened with overrides gets them
// written into their lines the same way (`foldParams`), with a note. The preset picker marks presets that change what
// the design forecasts ([point] over outcomes, [outcomes] on an interval) and asks before taking
// one: the first enter puts the question (what is dropped), the second takes it, esc keeps the
// design; an unsaved hand-written formula is asked about after that.
//
// Budget pane fields (`tui/budget_fields.go`, one list): Floor, Cap, Mean, Ref. (the mean pay's
// reference belief), Step, Menu (a CSV file of reports that replaces the step's grid; a relative
// path is relative to the design file's folder, `Design.MenuPath`, and saving elsewhere rewrites
// it so it names the same file), R.floor (the
// report floor), Clamp, Unit, Rounding, Weights, Currency and Forecasts (the last two are terms of
// the annex too). The pane shows a window of the fields around the selected one; ←/→ step a field
// (a list, a mode cycle, ±1 or ±10), enter types a value (`tui/valueinput.go`, as for parameters,
// outcomes and terms: the value opened stands whole, so the first typed key or a paste replaces it
// and backspace clears it, while a cursor key keeps it to edit), and a value that would make the design
// invalid is refused with the design file's message. Mean is a mean-pay budget (`Budget.MeanPay`:
// the expected pay of a truthful forecaster at the reference belief, uniform unless Ref. names one;
// it replaces the cap, whose row then says it is not used): → from "none" starts at three quarters
// of the way from floor to cap, ← below the floor or typing 0 clears it. Point designs refuse the
// fields of rules over outcomes. Every edit cancels the running fit; the next one shows its
// progress (the re-check's beliefs) in the pane. The table shows each row's re-check margin and
// marks the rows whose report ties with another (TIE) or is beaten (BEATEN) for its own belief; the
// mark and the margin come first so a narrow pane keeps them, and the pays scroll sideways with
// < and >. The pane's height goes first to the selected field, a refusal or the typing hint, the
// verdict and proposals, then the table's head and four rows, then the other fields, so at 80×24 the
// table stays readable. The propose key (f, `tui/propose.go`) runs
// `Rule.Propose` in the background (progress, cancelled by any edit): the coarsest currency unit
// the re-check passes with, and for a failing table the smallest cap (every whole step of
// `budget.CapGrain` is tried up to five times the range; point-forecast tables too, on their own
// re-check), each line saying which it is, and a line saying when no cap searched passes
// (`Proposal.NoLarger`); the digit keys take one.
//
// Look (`tui/header.go`, `tui/chrome.go`, `NewStyles`): the header names the design (and its file,
// or "not saved yet", and whether it is edited), the view shown, and the verdict with its kind —
// "certified" when the interval certificate decided it, "grid evidence" otherwise — or that a check
// runs. The grid's verdict shows when the grid check ends; the certificate then runs as its own
// job (`tui/certjob.go`, `Settings.Certifier`, "proof running" in the header, a "proving" bar in
// the checks pane, dropped by an edit), and once it decides and the grid does not contradict it,
// the verdict that stands is the certificate's (`CheckReport.Final`) for every mode: rules, payout
// audits, point forecasts. Panes are brackets, not boxes: a rule down the left and along the bottom, heavy for the
// focused pane and light and dashed for the others, the title on the first line. Dialogs have a
// half-block edge. The palette is ochre (focus, keys), slate (frames, secondary text), sage and brick
// (pass, fail); nothing depends on colour alone. The footer is our own key line: each key and what it
// does with wide gaps, "? all keys" first, cut with … where it does not fit.
//
// Checks pane (`tui/checks_detail.go`): one line per check and a last entry for the verdict and
// notes; ↑/↓ choose (the list scrolls to keep the choice in view and says how much is hidden),
// enter opens the entry's full text wrapped to the pane (witnesses to ten digits, the check's note,
// the certificate's whole statement, every note), scrolled with ↑/↓ pgup/pgdn, ←/→ the other
// entries, esc back; r runs the checks again from the list.
//
// Layout: below 120×40 the design pane fills the left half, the picture sits top right (half the
// height, whichever pane has the focus, so it stays readable at 80×24) over whichever of checks
// and budget was focused last; from 120×40 all four panes show. Below 80×24
// the screen says how big it must be. Pictures: n = 2 effort (or fitted pay) per outcome,
// generator, emphasis weight −H″, honesty gap (ntcharts line chart, one marker rune per series
// so it reads without colour); n = 3 a ternary shading (our own drawing — no library draws a
// simplex) of the honesty gap by belief or the loss by report for a chosen belief; n > 3 slices
// along a pair of outcomes. The picture's gap is searched on a 1/40 report grid: it is a drawing,
// the verdict is the checks pane's.
//
// Key map: DefaultKeyMap in keys.go is the one list of keys (printable keys are text while an
// input has focus); the help overlay and the footer are generated from it, so they cannot
// drift. Run the workbench and press ? to read it; esc or ? closes it, and q there does nothing
// (it is listed as quit, and must not mean close as well).
//
// Tests: `go test ./tui` — golden views in `tui/testdata` at 80×24 and 120×40 (colour profile
// pinned to ASCII; regenerate with `go test ./tui -update`), key-routing tests, random key
// sequences that must keep every frame whole, a stale-run test, a test that Update keeps
// answering while a check is held open, and a teatest session with the real engine (edit, error,
// fix, checks pass, budget, CSV export, save, quit). `tui/backtest_test.go`: the frost sample
// paid as the command pays it (totals checked against `scorewright backtest`), the harvest sample
// without a picture, a header that does not fit, an edit rerunning and a stale answer dropped, `x`
// stopping a run, golden backtest views, and a teatest flow (load the frost history, wait for the
// picture, quit). `tui/risk_test.go`: the frost demo under CRRA 2 against `scorewright distort`
// with the same inputs (largest 9.52 points at belief 0.14), coefficient 0 showing none, shading
// toward 1/2 at every belief, a CARA best report against the first-order condition derived by
// hand, the harvest table, an edit and a replaced run, golden risk views, and a teatest flow
// (open, CRRA 2, wait for the curve, coefficient 0, quit). `tui/leave_test.go`: every leave path (q, ctrl+c, the next demo, F3, opening a file, a
// preset over a hand-written formula) asks and esc keeps the design, s saves first, the recovery
// file follows the edits, is offered after ctrl+c twice (restore, drop, keep aside) and for a
// design file, and a teatest flow saves first with a tab-completed path and quits.
// `tui/header_test.go`: the header's verdict and kind, and the key line. `.ci/e2e-tui.sh` drives the real binary in tmux, including loading the frost
// history and waiting for the reliability picture. `go test ./tui -run '^$' -bench 'Update|View'` measures Update while a check runs, Update
// for a typed key, and drawing the screen.
package tui
