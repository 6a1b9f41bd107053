// Package scorewright turns a design into the engine's objects. Open is
// the one place the design's mode is switched on: the command line and
// the workbench open a design here and ask the Rule it returns for
// engine work, so that adding a mode touches this package and
// generator/design only (the mode's traits: on an interval or over
// outcomes, payout or rule, its title and sample formula).
//
// The packages below it each hold one job: generator/ turns what the
// user writes into a rule, verify/ checks and audits it, contract/ turns
// it into money, presets/ names known rules. See DEVELOPERS.md for the map.
//
// # What Open builds
//
// By the design's mode, exactly one of:
//
//	generator, emphasis   a rule over outcomes (generator/bregman; the emphasis weight
//	                      integrated twice by generator/emphasis)
//	point                 a point-forecast generator phi(x) on the interval (generator/point)
//	payout                a payout pay(p, y) over outcomes under audit (generator/payout)
//	point-payout          a payout pay(x, y) on the interval under audit (verify/pointcheck)
//
// Errors name the formula at fault (*FormulaError, with the line and
// column) or the field; Open never panics.
//
// # What the Rule does
//
// Check, Audit and Examine examine the rule on a grid (verify, and
// verify/pointcheck on an interval; both report in verify's types) and
// return Findings, one report set. Certify proves a verdict by interval
// arithmetic (verify/certify) where a method applies, else
// ErrNoCertificate. Table fits the design's budget on its menu, rounds
// and re-checks (contract/budget; a point design's table by
// budget.FitPoint), Export gives the contract/table record every format
// writes, Table.Lottery the table as chances of a fixed prize
// (contract/lottery), Propose the budgets the re-check would pass with.
//
// The money side of a rule over outcomes (money.go): FitFormula,
// FitMenu and FitSteps fit the rule to a budget as budget.Terms, the one
// shape of a fitted table that backtest, risk, the command and the
// workbench share; Backtest replays a history under them
// (contract/backtest) and ReliabilityCurves draw its PAV curves; Distort
// sets up the report a risk-averse forecaster gives (contract/risk), and
// its Curve is the distortion over the beliefs both front ends show. A
// design not over outcomes gets a *NeedsOutcomesError.
//
// Where the command and the workbench say the same thing about a finding
// (the identified preset, the honesty gap, a check's worst value), the
// sentence is written once, in words.go.
package scorewright
