package scorewright

import (
	"fmt"
	"math"

	"scorewright/internal/num"
	"scorewright/internal/numfmt"
	"scorewright/verify"
	"scorewright/verify/certify"
)

// CertificateHeadline is a certificate's verdict as both front ends head
// it: the verdict, and for a payout proved honest to within epsilon its
// epsilon and what that means, "epsilon-proper to 0.001 (no report gains
// more than 0.001 anywhere)", so it never reads as plainly proper and the
// number comes first where a pane cuts the line.
func CertificateHeadline(verdict verify.Verdict, epsilon float64) string {
	if verdict == certify.EpsilonProper {
		return certify.EpsilonVerdict(epsilon) + " (" + certify.EpsilonClaim(epsilon) + ")"
	}
	return string(verdict)
}

// WorstText writes a check's worst value as the command and the workbench
// print it: six significant digits, and 0 for a value within the slack
// the check's comparisons allow (grid.Tolerance × grid.Scale, never less
// than grid.Rounding). What rounding leaves of a cancellation, such as
// -3.05e-16 from the quadratic rule's effort summed to its generator, is
// not a finding and must not read as one.
func WorstText(v float64, g verify.Grid) string {
	return numfmt.Effort(CleanWorst(v, g))
}

// PayText writes an expected pay, a mean of amounts and so finer than the
// table's currency, as the command and the workbench print it: six
// significant digits, without binary noise.
func PayText(v float64) string { return numfmt.Pay(v) }

// PointsText writes a distortion of a report in probability points as both
// front ends print it: three significant digits.
func PointsText(v float64) string { return numfmt.Points(v) }

// LotteryRemedy is the sentence under every distortion both front ends
// show: paid in chances of one fixed prize instead of money, expected
// utility is affine in the chance, so the report that maximises expected
// pay is best whatever the utility (contract/lottery says why). how names
// the way to ask for it ("table --lottery"). It is said of the best report
// over all reports, as the distortion is; the menu pick then is the row a
// risk-neutral forecaster picks. Short enough for two lines of the
// workbench at 80 columns.
func LotteryRemedy(how string) string {
	return "Paid as a chance (pay - floor)/(cap - floor) of one fixed prize (" + how + "), any expected-utility maximiser reports the truth."
}

// CleanWorst is v, or 0 when v is within the slack every comparison of g
// allows (noise, not a finding).
func CleanWorst(v float64, g verify.Grid) float64 {
	round := g.Rounding
	if g.Floor > 0 {
		// Comparisons allow their own rows' rounding, which can be far
		// below the worst: only the values' floor is noise everywhere.
		round = g.Floor
	}
	if math.Abs(v) <= math.Max(g.Tolerance*g.Scale, round) {
		return 0
	}
	return v
}

// The sentences below are the command line's wording of what an audit
// found; the workbench shows the same sentences, so the two never say a
// finding two ways.

// IdentifiedLine names the preset an audited payout was identified as
// an affine image of, or "" when it was not identified.
func (f *Findings) IdentifiedLine() string {
	switch {
	case f.Audit != nil && f.Audit.Identified != nil:
		id := f.Audit.Identified
		return fmt.Sprintf("identified: pay = %.6g + %.6g × score of preset %q%s, its score being -effort (relative residual %.2g)",
			shown(id.Shift, id.Scale, id.Residual), id.Scale, id.Preset, id.WithParam(), id.Residual)
	case f.Point != nil && f.Point.Identified != nil && f.Point.Identified.OutcomeTerm:
		id := f.Point.Identified
		return fmt.Sprintf("identified: g(y) - %.6g * (effort of preset %s), with a term g in the outcome alone that changes no incentive", id.Scale, id.Preset)
	case f.Point != nil && f.Point.Identified != nil && f.Point.Identified.Shift == 0:
		id := f.Point.Identified
		return fmt.Sprintf("identified: -%.6g * (effort of preset %s)", id.Scale, id.Preset)
	case f.Point != nil && f.Point.Identified != nil:
		id := f.Point.Identified
		return fmt.Sprintf("identified: %.6g - %.6g * (effort of preset %s)", id.Shift, id.Scale, id.Preset)
	}
	return ""
}

// GapLine states the largest honesty gap of an audit over outcomes and
// where it is, or that no grid belief gains from misreporting; "" for
// other findings and for a gap that could not be computed (NaN).
func (f *Findings) GapLine() string {
	if f.Audit == nil {
		return ""
	}
	rep := f.Audit
	g := rep.Gap
	switch {
	case g.Max > rep.Grid.Slack():
		how := ""
		if g.Sharpened {
			how = fmt.Sprintf(" (sharpened beyond the grid from %.6g)", g.GridMax)
		}
		// Belief and report with the digits that tell them apart; a
		// report equal to the belief is no witness and is not named.
		line := fmt.Sprintf("largest honesty gap: %.9g%s", g.Max, how)
		if b, r, ok := num.FormatApart(g.Belief, g.BestReport); ok {
			line += fmt.Sprintf(" at belief %s, best report %s", b, r)
		} else {
			line += fmt.Sprintf(" at belief %s, at a report that cannot be told apart from it (no misreport is named)", b)
		}
		if g.Precision != "" {
			line += "; " + g.Precision
		}
		return line
	case g.Max == g.Max:
		return fmt.Sprintf("largest honesty gap: %.3g (no grid belief gains from misreporting)", g.Max)
	}
	return ""
}

// shown is a fitted shift as a person should read it: a value that is zero
// within the fit's own residual, relative to the scale, prints as 0 rather
// than as rounding noise such as -8.6e-14. JSON keeps the fitted value.
func shown(shift, scale, residual float64) float64 {
	if math.Abs(shift) <= 10*math.Max(residual, 1e-12)*math.Max(1, math.Abs(scale)) {
		return 0
	}
	return shift
}
