package verify

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sort"

	"scorewright/generator/payout"
	"scorewright/internal/num"
	"scorewright/internal/pool"
	"scorewright/internal/simplex"
)

// Gap is the largest honesty gap of an audit: the most a forecaster can
// gain in expected pay over the honest report, at the belief where it is
// largest and with the report that achieves it.
type Gap struct {
	Max                float64
	Belief, BestReport []float64
	// Sharpened is true when local optimisation improved on the grid's
	// gap, which was GridMax.
	Sharpened bool
	GridMax   float64
	Status    string
	// Precision says in words how far sharpening settled the gap: to 9
	// significant digits (two successive restarts agreeing), or why not.
	Precision string
}

// BeliefGap is the audit's finding at one grid belief.
type BeliefGap struct {
	Belief, BestReport []float64
	// Gap is the best expected pay minus the honest report's.
	Gap float64
	// Honest is the expected pay of the honest report, sum_k q_k pay(q, k):
	// for a proper payout, its implied expected-pay function.
	Honest float64
}

// Direction of the best misreport (for yes/no events: away from 1/2,
// toward it, or to its other side).
const (
	Exaggerates = "exaggerates" // further from the uniform forecast
	Hedges      = "hedges"      // no further from it
	Flips       = "flips"       // another outcome ranked first
	Mixed       = "mixed"       // different at different beliefs
)

// AuditReport is the result of Audit. Its embedded Report has the checks
// properness and boundedness.
type AuditReport struct {
	Report
	Gap Gap
	// Direction is where the best misreport goes (one of the constants
	// above, classify), "" when there is no misreport to gain from.
	Direction string
	// Exaggerate, Hedge and Flip count the beliefs of each kind.
	Exaggerate, Hedge, Flip int
	// Identified is the best accepted fit, nil when none fits.
	Identified *Identification
	// Fits lists the fit to every candidate, best first.
	Fits []Identification
	// Beliefs holds the finding at every grid belief, in grid order.
	Beliefs []BeliefGap
	// Undefined counts the grid beliefs where the payout is NaN at the
	// honest report (their Gap is NaN); Gap is the largest over the rest,
	// NaN when there is no rest.
	Undefined int
}

// auditRefine caps how many improper beliefs get their best report
// refined by optimisation; the largest gaps go first.
const auditRefine = 300

// Audit examines a payout formula for honesty: for every grid belief the
// best report (over the grid, then by optimisation) and the honesty gap,
// the verdict, the direction of misreports for n = 2, the implied
// expected-pay function, and whether the payout is shift + scale × one of
// the candidate rules. It returns ctx.Err() promptly when ctx is
// cancelled.
func Audit(ctx context.Context, p *payout.Payout, cands []Candidate, s Settings) (*AuditReport, error) {
	if p == nil {
		return nil, fmt.Errorf("verify: no payout to audit")
	}
	s, g, err := prepare(p.Outcomes(), s)
	if err != nil {
		return nil, err
	}
	G := int64(g.Len())
	pr := pool.NewMeter(s.Progress, G*G+G*int64(offGridCount(int(G)))+gradCost*G+identifyCost(int(G), cands)+int64(auditRefine)*gradCost)
	rep, err := audit(ctx, p, cands, s, g, pr)
	pr.Finish(err == nil)
	return rep, err
}

func audit(ctx context.Context, p *payout.Payout, cands []Candidate, s Settings, g *simplex.Grid, pr *pool.Meter) (*AuditReport, error) {
	n, G := p.Outcomes(), g.Len()
	rep := &AuditReport{Report: Report{Grid: gridInfo(g, s)}}
	rep.Notes = gridNotes(rep.Grid, n)
	if g.Sampled {
		rep.Notes = append(rep.Notes, sampledNote(s, n, g.Len()))
	}
	pays, err := auditPays(ctx, p, g, s, pr)
	if err != nil {
		return nil, err
	}
	// Identification reads only the pays, so it runs beside the stream
	// and the off-grid passes, filling the cores their serial steps leave
	// — but only when the caller gave the audit every core: a caller that
	// keeps cores free (the workbench keeps one for the screen) gets
	// identification after the stream, so no more than s.Workers
	// goroutines work at once.
	waitFits, stopFits := identifyAsync(ctx, g, pays, cands, s.Workers, s.Workers >= runtime.GOMAXPROCS(0), pr)
	defer stopFits()
	label := func(k int) string {
		if len(s.Labels) == n {
			return s.Labels[k]
		}
		return fmt.Sprint(k + 1)
	}
	bounded := boundedness(g, pays, s.Limit, label, "payment", -1)
	rep.Grid.Scale, rep.Grid.Rounding = scaleOf(pays)
	s.Tolerance = rep.Grid.Slack()

	// The stream minimises effort, so it runs on -pay.
	m := newMenu(n, G)
	for i, v := range pays.rows {
		m.rows[i] = -v
	}
	m.seal()
	// The pruned stream's tree over the grid also blocks the beliefs for
	// the off-grid pass.
	var tree *reportTree
	var bs []best
	if s.everyPair {
		bs, err = streamFull(ctx, g, m, s.Workers, pr)
	} else {
		tree = newReportTree(g, m)
		bs, err = streamTree(ctx, tree, g, m, s.Workers, pr, nil)
	}
	if err != nil {
		return nil, err
	}
	honest := make([]float64, G)
	for i := range honest {
		honest[i] = m.phi(g.Point(i), i)
	}
	prop, _, ties := properness(g, m, honest, bs, globalSlack(s.Tolerance), rep.Grid.Scale, rep.Grid.Rounding, 0)
	rep.Beliefs = beliefTable(g, m, honest, bs, s.Tolerance)
	offGain, err := offGridReports(ctx, p, g, tree, rep.Beliefs, s, pr)
	if err != nil {
		return nil, err
	}
	if offGain > 0 {
		rep.Notes = append(rep.Notes, fmt.Sprintf("%d beliefs gain more from reports between the grid points (found among %d random reports) than from any grid report: the payout rewards reports the grid does not contain", offGain, offGridCount(G)))
	}
	if err := refineBeliefs(ctx, p, g, rep.Beliefs, s, pr); err != nil {
		return nil, err
	}
	if err := searchReports(ctx, g, &prop, s, func(int) func(q, r []float64) float64 {
		ev := p.NewEvaluator()
		return func(q, r []float64) float64 { return -ev.Expected(q, r) }
	}); err != nil {
		return nil, err
	}
	largestGap(rep, &prop, p, g, s.Tolerance)
	auditVerdict(rep, prop, bounded, ties, p, s.Tolerance)
	fr := waitFits()
	if fr.err != nil {
		return nil, fr.err
	}
	auditFits(rep, fr.fits)
	return rep, nil
}

// fitsResult is identify's answer, passed back from its goroutine.
type fitsResult struct {
	fits []Identification
	err  error
}

// identifyAsync starts identify on its own goroutine when beside is
// true; otherwise identify runs when wait is called. wait gives its one
// result; stop cancels it and waits for it to end, so an audit that
// returns early (an error, a cancelled context) leaves nothing running.
func identifyAsync(ctx context.Context, g *simplex.Grid, pays *menu, cands []Candidate, w int, beside bool, pr *pool.Meter) (wait func() fitsResult, stop func()) {
	ctx, cancel := context.WithCancel(ctx)
	run := func() fitsResult {
		fits, err := identify(ctx, g, pays, cands, w, pr)
		return fitsResult{fits, err}
	}
	if !beside {
		return run, cancel
	}
	out := make(chan fitsResult, 1)
	done := make(chan struct{})
	go func() {
		defer close(done)
		out <- run()
	}()
	return func() fitsResult { return <-out }, func() { cancel(); <-done }
}

// auditPays evaluates the payout at every grid report: the menu of pays.
func auditPays(ctx context.Context, p *payout.Payout, g *simplex.Grid, s Settings, pr *pool.Meter) (*menu, error) {
	n, G := g.N, g.Len()
	pays := newMenu(n, G)
	evs := make([]*payout.Evaluator, s.Workers)
	for i := range evs {
		evs[i] = p.NewEvaluator()
	}
	err := pool.Run(ctx, s.Workers, G, 256, func(w, lo, hi int) {
		for j := lo; j < hi; j++ {
			evs[w].Pays(pays.rows[j*n:(j+1)*n], g.Point(j))
		}
		pr.Add(int64(hi-lo) * gradCost)
	})
	return pays, err
}

// beliefTable is the audit's finding at every grid belief from the stream
// on efforts m = -pay: the honest pay, and the best grid report with its
// gap where that is more than the tolerance T (within it is rounding: the
// honest report stands).
func beliefTable(g *simplex.Grid, m *menu, honest []float64, bs []best, T float64) []BeliefGap {
	out := make([]BeliefGap, len(bs))
	for i, b := range bs {
		q := g.Point(i)
		bg := BeliefGap{Belief: q, BestReport: q, Honest: -honest[i]}
		if m.bad[i] {
			// The payout is undefined (NaN) at the honest report: there is
			// no gap to speak of, and properness reports the belief.
			bg.Gap, bg.Honest = math.NaN(), math.NaN()
		} else if gap := honest[i] - b.m1; b.arg >= 0 && gap > T && !math.IsInf(honest[i], 1) {
			bg.Gap, bg.BestReport = gap, g.Point(int(b.arg))
		} else if math.IsInf(honest[i], 1) && b.arg >= 0 && !math.IsInf(b.m1, 1) {
			bg.Gap, bg.BestReport = math.Inf(1), g.Point(int(b.arg))
		}
		out[i] = bg
	}
	return out
}

// largestGap takes the largest gap from the per-belief table (which by now
// includes the off-grid reports and the refinement) or from the search
// over reports, sharpens it jointly over belief and report, and makes it
// properness's witness when it is more than the tolerance T.
func largestGap(rep *AuditReport, prop *CheckResult, p *payout.Payout, g *simplex.Grid, T float64) {
	for _, bg := range rep.Beliefs {
		if bg.Gap != bg.Gap {
			rep.Undefined++ // no gap where the payout is undefined
			continue
		}
		if bg.Gap > rep.Gap.Max || rep.Gap.Belief == nil {
			rep.Gap = Gap{Max: bg.Gap, Belief: bg.Belief, BestReport: bg.BestReport}
		}
	}
	if rep.Gap.Belief == nil {
		rep.Gap.Max = math.NaN()
	}
	if prop.Worst > rep.Gap.Max && prop.Sharpened {
		rep.Gap = Gap{Max: prop.Worst, Belief: prop.Belief, BestReport: prop.Report}
	}
	if rep.Gap.Max > T && !math.IsInf(rep.Gap.Max, 0) {
		ev := p.NewEvaluator()
		sharpenGap(&rep.Gap, g.N, cellOf(g), func(q, r []float64) float64 { return ev.Expected(q, r) - ev.Expected(q, q) })
		roundingDigits(&rep.Gap, rep.Grid.Rounding)
	}
	rep.Gap.Belief, rep.Gap.BestReport = clone(rep.Gap.Belief), clone(rep.Gap.BestReport)
	if rep.Gap.Max > T && prop.Worst == prop.Worst {
		prop.Passed, prop.Strict = false, false
		prop.Worst, prop.Belief, prop.Report = rep.Gap.Max, rep.Gap.Belief, rep.Gap.BestReport
		prop.Sharpened, prop.GridWorst, prop.Status = rep.Gap.Sharpened, rep.Gap.GridMax, rep.Gap.Status
		markPart(prop)
	}
}

// auditVerdict settles strictness (ties confirmed or dismissed), words
// properness, and sets the checks, the verdict, the direction (n = 2) and
// the implied expected pay.
func auditVerdict(rep *AuditReport, prop, bounded CheckResult, ties []tiePair, p *payout.Payout, T float64) {
	roundingOnly := !prop.Strict && prop.Passed
	confirmPayoutTie(p, &prop, ties)
	prop.Note = propernessNote(prop, "pay", "more")
	if roundingOnly && prop.Strict {
		prop.Note = fmt.Sprintf("at every grid belief the honest report is the unique best grid report: the closest other report, %s at belief %s, agrees to within rounding (difference %.3g), but the payout is strictly curved along the segment between them (exact second derivative), so that is rounding, not a tie", num.Format(prop.MarginReport), num.Format(prop.MarginBelief), prop.Margin)
	}
	rep.Checks = []CheckResult{prop, bounded}
	switch {
	case !prop.Passed:
		rep.Verdict = Improper
	case prop.Strict:
		rep.Verdict = StrictlyProper
	default:
		rep.Verdict = Proper
	}
	direction(rep, T)
	if rep.Verdict != Improper {
		rep.Notes = append(rep.Notes, expectedPayNote(rep))
	}
}

// auditFits records the fits to the candidate rules: the best accepted
// one is the identification, others that fit as well are noted.
func auditFits(rep *AuditReport, fits []Identification) {
	if rep.Verdict == Improper {
		// An affine image of a proper rule is proper: a fit on the grid
		// points of an improper payout says only that the two agree there.
		for i := range fits {
			if fits[i].Note == "" {
				fits[i].Note = "fits on the grid points, but the payout is improper, so it is not this rule everywhere (it differs between the grid points or where it is undefined)"
			}
		}
	}
	rep.Fits = fits
	if len(fits) > 0 && fits[0].Note == "" {
		id := fits[0]
		rep.Identified = &id
		for _, f := range fits[1:] {
			if f.Note == "" {
				rep.Notes = append(rep.Notes, fmt.Sprintf("the payout also fits %q%s exactly (scale %.6g, shift %.6g): the two rules coincide up to scale and shift here", f.Preset, f.WithParam(), f.Scale, f.Shift))
			}
		}
	}
}

// refineBeliefs improves the best report of the improper beliefs (largest
// gaps first, up to auditRefine) by Nelder–Mead over reports.
func refineBeliefs(ctx context.Context, p *payout.Payout, g *simplex.Grid, bgs []BeliefGap, s Settings, pr *pool.Meter) error {
	var idx []int
	for i, bg := range bgs {
		if bg.Gap > s.Tolerance && !math.IsInf(bg.Gap, 0) {
			idx = append(idx, i)
		}
	}
	sort.Slice(idx, func(a, b int) bool { return bgs[idx[a]].Gap > bgs[idx[b]].Gap })
	if len(idx) > auditRefine {
		idx = idx[:auditRefine]
	}
	evs := make([]*payout.Evaluator, s.Workers)
	for i := range evs {
		evs[i] = p.NewEvaluator()
	}
	return pool.Run(ctx, s.Workers, len(idx), 4, func(w, lo, hi int) {
		ev := evs[w]
		ps := newPairSearch(g.N)
		ps.fixBelief, ps.evals, ps.cell = true, searchEvals, cellOf(g)
		for _, i := range idx[lo:hi] {
			bg := &bgs[i]
			_, r, v, _, ok := ps.run(func(q, r []float64) float64 { return -ev.Expected(q, r) }, bg.Belief, bg.BestReport)
			if sr, moved := snapped(r); ok && moved {
				// A face read as 1e-17 is noise: keep the exact face
				// when it pays no less (snapWitness).
				if e := ev.Expected(bg.Belief, sr); e >= -v-1e-13*math.Abs(v) {
					r, v = sr, -e
				}
			}
			if gap := -v - bg.Honest; ok && gap > bg.Gap {
				bg.Gap, bg.BestReport = gap, r
			}
		}
		pr.Add(int64(hi-lo) * gradCost)
	})
}

// direction classifies where the best misreport goes at every
// improper belief, and summarises.
func direction(rep *AuditReport, T float64) {
	for _, bg := range rep.Beliefs {
		if !(bg.Gap > T) {
			continue
		}
		switch classify(bg.Belief, bg.BestReport) {
		case Exaggerates:
			rep.Exaggerate++
		case Hedges:
			rep.Hedge++
		case Flips:
			rep.Flip++
		}
	}
	kinds := 0
	for _, c := range []int{rep.Exaggerate, rep.Hedge, rep.Flip} {
		if c > 0 {
			kinds++
		}
	}
	switch {
	case kinds > 1:
		rep.Direction = Mixed
	case rep.Exaggerate > 0:
		rep.Direction = Exaggerates
	case rep.Hedge > 0:
		rep.Direction = Hedges
	case rep.Flip > 0:
		rep.Direction = Flips
	}
}

// classify compares a belief q with its best report r. The report flips
// when it ranks first only outcomes the belief does not rank first;
// otherwise it exaggerates when it lies further from the uniform forecast
// than the belief (more confident), and hedges when it lies no further.
// For two outcomes these are the sides of 1/2 and the distance from it.
func classify(q, r []float64) string {
	n := float64(len(q))
	var dq, dr float64
	for k := range q {
		dq += (q[k] - 1/n) * (q[k] - 1/n)
		dr += (r[k] - 1/n) * (r[k] - 1/n)
	}
	switch {
	case !sharesFirst(q, r):
		return Flips
	case dr > dq:
		return Exaggerates
	default:
		return Hedges
	}
}

// sharesFirst reports whether some outcome is ranked first (a largest
// probability, ties included) by both q and r.
func sharesFirst(q, r []float64) bool {
	mq, mr := slices.Max(q), slices.Max(r)
	for k := range q {
		if q[k] == mq && r[k] == mr {
			return true
		}
	}
	return false
}

// expectedPayNote describes the implied expected-pay function of a proper
// payout, V(q) = sum_k q_k pay(q, k): its range and where it is reached.
func expectedPayNote(rep *AuditReport) string {
	lo, hi := math.Inf(1), math.Inf(-1)
	var at, atHi []float64
	for _, bg := range rep.Beliefs {
		if bg.Honest < lo {
			lo, at = bg.Honest, bg.Belief
		}
		if bg.Honest > hi {
			hi, atHi = bg.Honest, bg.Belief
		}
	}
	return fmt.Sprintf("implied expected pay of an honest forecaster, V(q) = sum_k q_k pay(q, k): from %.6g at %s to %.6g at %s (V is convex for a proper payout; -V is its generator in effort orientation)",
		lo+0, num.Format(at), hi+0, num.Format(atHi))
}
