package verify

import (
	"fmt"
	"math"

	"scorewright/internal/pool"
)

// Settings tune a check. The zero value means the defaults.
type Settings struct {
	// Resolution K: grid coordinates are multiples of 1/K. 0 means
	// DefaultResolution(n).
	Resolution int
	// Tolerance is the slack every comparison allows for rounding, relative
	// to the size of the rule's values: a violation smaller than
	// Tolerance × Grid.Scale is not a violation (affinity, already a
	// relative test, uses Tolerance as it is). 0 means DefaultTolerance.
	Tolerance float64
	// Workers is the number of goroutines; 0 means GOMAXPROCS.
	Workers int
	// Progress, when set, is called from a single goroutine about ten
	// times a second with the work done so far, and once at the end.
	Progress pool.Progress
	// Limit, when positive, is the largest effort (or, in an audit, the
	// largest payment in absolute value) the boundedness check accepts.
	Limit float64
	// MaxPoints is the largest full grid, in points; above it the grid is
	// sampled and the report says so and why. 0 means MaxFullPoints(n):
	// as many points as this machine can hold.
	MaxPoints int
	// Samples is the number of random lattice points of a sampled grid;
	// 0 means DefaultSamples.
	Samples int
	// Seed fixes the random sample and the affinity test pairs.
	Seed uint64
	// Labels name the outcomes in findings ("frost: [0, 1]"); nil means
	// 1..n. Only an audit reads them: a generator's rule names its own.
	Labels []string

	// Proof, when set, is a proof (a certificate) that the rule is proper
	// or strictly proper over the whole simplex. CheckRule then leaves
	// out the pairs the proof settles, interior beliefs against interior
	// reports, and streams only what it still serves: every boundary
	// belief against every report, and every interior belief against the
	// boundary reports (whose efforts are limits the proof of H's
	// concavity does not see computed). An audit ignores it. A proof of
	// impropriety is no Proof: the full stream then finds the worst
	// misreport.
	Proof *Proof

	// maxPointsAsked records that MaxPoints came from the caller, not from
	// the machine's memory, so that a sampled grid can say why.
	maxPointsAsked bool
	// everyPair makes the check and the audit visit every pair (the full
	// stream, the plain off-grid scan) instead of pruning: the reference
	// the tests hold the pruned runs to, report for report.
	everyPair bool
}

// Defaults.
const (
	DefaultTolerance = 1e-9
	DefaultSamples   = 3000
)

// DefaultResolution is the grid resolution used when Settings.Resolution
// is 0: fine for few outcomes, coarser as the grid grows as K^(n-1), and
// for n >= 7 a fine lattice that is sampled, not enumerated.
func DefaultResolution(n int) int {
	switch n {
	case 2:
		return 1000
	case 3:
		return 100
	case 4:
		return 30
	case 5:
		return 16
	case 6:
		return 12
	}
	// Sampled: the lattice only fixes the rounding of the sample.
	return 10 * n
}

func (s Settings) withDefaults(n int) Settings {
	if s.Resolution <= 0 {
		s.Resolution = DefaultResolution(n)
	}
	if !(s.Tolerance > 0) {
		s.Tolerance = DefaultTolerance
	}
	if s.MaxPoints <= 0 {
		s.MaxPoints = MaxFullPoints(n)
	} else {
		s.maxPointsAsked = true
	}
	if s.Samples <= 0 {
		s.Samples = DefaultSamples
	}
	s.Workers = pool.Workers(s.Workers)
	return s
}

// Proof is what a certificate proved, handed to a check.
type Proof struct {
	// Verdict is Proper or StrictlyProper.
	Verdict Verdict
	// Statement says what proved it, in a sentence (the certificate's).
	Statement string
}

// proves reports whether p is a proof the check can rest on.
func (p *Proof) proves() bool {
	return p != nil && (p.Verdict == Proper || p.Verdict == StrictlyProper)
}

// Verdict is the summary of a check.
type Verdict string

// Verdicts.
const (
	StrictlyProper Verdict = "strictly-proper"
	Proper         Verdict = "proper"
	Improper       Verdict = "improper"
)

// Grid says what a result was computed on.
type Grid struct {
	// Resolution K, number of grid points, and the tolerance asked for.
	Resolution, Points int
	Tolerance          float64
	// Scale is the spread of the rule's values on the grid, outcome by
	// outcome (the largest over outcomes of the largest finite effort or
	// payment for it minus the smallest; a term that depends on the
	// outcome alone changes no comparison, see scaleOf): a rule and its
	// affine image pay - A = B × rule get the same verdict whatever A and
	// B > 0 are. Comparisons allow Tolerance × Scale, but never less than
	// Rounding.
	Scale float64
	// Rounding is the floor of the allowed slack: what rounding can do to
	// a sum of n values as large as the largest finite |value| (2·n·ε
	// times it). It matters when the values are far from 0 compared with
	// their spread (1e12 + 1e-3·L). In a check it is also at least twice
	// the largest bound on the rounding of an effort at a grid point,
	// from the size of the terms its gradient sums (bregman
	// Scorer.Rounding): a constant written as p·(1/p - 1) has efforts
	// that are sums of ±1/p.
	Rounding float64
	// Floor, in a check, is the rounding floor of the values alone (2·n·ε
	// times the largest |value|), below Rounding where the efforts' own
	// bounds raised it: each comparison allows the bounds of its own two
	// rows (verify's pairSlack), so an amount above Floor but within
	// Rounding can fail. 0 where Rounding is one number for all.
	Floor float64
	// Extrapolation is the largest error estimate of the efforts at
	// boundary reports, which are limits extrapolated from the interior
	// (they converge like sqrt(h) for sqrt(c(1-c))); a comparison that
	// rests on one allows it on top of the slack.
	Extrapolation float64
	// Sampled is true when the points are a random sample of the lattice.
	Sampled bool
	// Lattice is the number of points of the full lattice at this
	// resolution (-1 when beyond 2^53), and MaxPoints the largest full
	// grid the check allowed: Sampled exactly when Lattice exceeds it.
	Lattice   int64
	MaxPoints int
	// Interior and Boundary count the points with every coordinate
	// positive and with some coordinate 0.
	Interior, Boundary int
	// Pairs is the number of belief–report pairs the check settled: G²,
	// or fewer when a proof settled the rest (Report.Proof).
	Pairs int64
	// Lo and Hi are the interval of a point check (verify/pointcheck),
	// whose grid has Resolution+1 outcomes and Points reports on it; both
	// are 0 over the simplex.
	Lo, Hi float64
}

// String states the grid the way every verdict must: resolution, points,
// tolerance, and what a grid check is worth.
func (g Grid) String() string {
	kind := "full grid"
	if g.Sampled {
		kind = fmt.Sprintf("sampled grid (the full lattice is %s points, above the limit of %d)", latticeSize(g.Lattice), g.MaxPoints)
	}
	tol := fmt.Sprintf("tolerance %g", g.Tolerance)
	if g.Scale != 1 {
		tol += fmt.Sprintf(" × scale %.4g (the largest spread of one outcome's values) = %.3g", g.Scale, g.Tolerance*g.Scale)
	}
	if g.Rounding > g.Tolerance*g.Scale {
		tol += fmt.Sprintf(", raised to %.3g for rounding", g.Rounding)
	}
	if g.Extrapolation > 0 {
		tol += fmt.Sprintf(", plus %.3g where a boundary report's effort is an extrapolated limit", g.Extrapolation)
	}
	return fmt.Sprintf("%s at resolution %d (coordinates in steps of 1/%d): %d points (%d interior, %d on the boundary), %d pairs, %s; a grid check is evidence, not a proof",
		kind, g.Resolution, g.Resolution, g.Points, g.Interior, g.Boundary, g.Pairs, tol)
}

// latticeSize is a lattice's point count in words.
func latticeSize(c int64) string {
	if c < 0 {
		return "more than 2^53"
	}
	return fmt.Sprint(c)
}

// Slack is the amount below which a violation counts as rounding:
// Tolerance × Scale, or Rounding when that is larger.
func (g Grid) Slack() float64 { return math.Max(g.Tolerance*g.Scale, g.Rounding) }

// Part is a check's finding on one region of the simplex.
type Part struct {
	// Count is how many points (or pairs) of the region were examined.
	Count int64
	// Passed is false when the region shows a violation.
	Passed bool
	// Worst is the check's amount at the worst place of the region, in
	// the check's own units (see CheckResult); NaN when nothing was
	// examined.
	Worst float64
	// Belief and Report locate it (Report nil for checks on one point).
	Belief, Report []float64
}

// CheckResult is one named check.
//
// Worst is, per check: concavity — the largest eigenvalue of the Hessian
// projected onto the simplex (passes at or below the tolerance);
// properness — the largest honesty gap, expected effort of the honest
// report minus the best report's (passes at or below the tolerance);
// nonnegativity — the smallest divergence D(q, p) (passes at or above
// minus the tolerance); affinity — the largest midpoint deviation of
// Phi(q, p) in q (passes at or below the tolerance times the size of
// Phi); boundedness — the largest absolute effort (payment, in an audit)
// over interior reports.
type CheckResult struct {
	Name   string
	Passed bool
	Worst  float64
	// Belief and Report are the worst witness (Report nil when the check
	// is about one point).
	Belief, Report []float64
	// Note explains the finding in a sentence or two.
	Note string
	// Strict reports strictness where the check has it: concavity with a
	// negative eigenvalue at every interior point; properness with every
	// other report worse than the honest one by more than the tolerance.
	Strict bool
	// Margin is, for properness, the smallest amount by which the best
	// other report falls short of the honest one, at MarginBelief and
	// MarginReport.
	Margin                     float64
	MarginBelief, MarginReport []float64
	// Interior and Boundary split the finding by where the belief lies
	// (for boundedness, where the report lies).
	Interior, Boundary Part
	// Sharpened is true when local optimisation improved on the grid
	// witness; GridWorst is then the grid's own worst amount.
	Sharpened bool
	GridWorst float64
	// Status is the optimiser's status when it was run.
	Status string
	// Outcomes, in a point check (verify/pointcheck), are the outcome
	// values of the worst place: the support of the forecaster's
	// distribution, whose weights are then Belief.
	Outcomes []float64
	// Slack, in a point check, is the allowance of the comparison at the
	// worst place: the tolerance plus the rounding of the terms that
	// cancel there (over the simplex it is the grid's, Grid.Slack).
	Slack float64
}

// Report is the result of CheckRule.
type Report struct {
	Verdict Verdict
	// Proof is set when the verdict rests on Settings.Proof (its kind is
	// then "certified"; the grid checked what the proof does not cover),
	// nil when the verdict is grid evidence.
	Proof  *Proof
	Grid   Grid
	Checks []CheckResult
	// Notes are findings worth a sentence that are not failures, such as
	// infinite effort on the boundary.
	Notes []string
}

// Check returns the check called name, or nil.
func (r *Report) Check(name string) *CheckResult {
	for i := range r.Checks {
		if r.Checks[i].Name == name {
			return &r.Checks[i]
		}
	}
	return nil
}

// Failed reports whether any check failed.
func (r *Report) Failed() bool {
	for _, c := range r.Checks {
		if !c.Passed {
			return true
		}
	}
	return false
}

// part accumulates the worst place of a region; larger amounts are worse.
type part struct {
	Part
	seen bool
}

func (p *part) offer(amount float64, belief, report []float64) {
	p.Count++
	worse := !p.seen || amount > p.Worst || amount != amount && p.Worst == p.Worst
	if !worse {
		return
	}
	p.seen = true
	p.Worst = amount
	if belief == nil {
		p.Belief = nil
	} else {
		p.Belief = append(p.Belief[:0], belief...)
	}
	if report == nil {
		p.Report = nil
	} else {
		p.Report = append(p.Report[:0], report...)
	}
}

func (p *part) result(passed bool) Part {
	out := p.Part
	if !p.seen {
		out.Worst = math.NaN()
	}
	out.Passed = passed
	return out
}

func clone(v []float64) []float64 { return append([]float64(nil), v...) }
