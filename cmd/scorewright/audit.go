package main

import (
	"fmt"
	"math"
	"scorewright"
	"strings"

	"scorewright/generator/design"
	"scorewright/internal/num"
	"scorewright/verify"
)

type gapJSON struct {
	Max        num.Float   `json:"max"`
	Belief     []num.Float `json:"belief"`
	BestReport []num.Float `json:"best_report"`
	Sharpened  bool        `json:"sharpened,omitempty"`
}

type identJSON struct {
	Preset string    `json:"preset"`
	Scale  num.Float `json:"scale"`
	Shift  num.Float `json:"shift"`
	// Params holds the fitted parameter of a preset family ({"g": 1.5}).
	Params   map[string]num.Float `json:"params,omitempty"`
	Residual num.Float            `json:"residual"`
	Note     string               `json:"note,omitempty"`
}

func toIdentJSON(id verify.Identification) identJSON {
	out := identJSON{Preset: id.Preset, Scale: num.Float(id.Scale), Shift: num.Float(id.Shift), Residual: num.Float(id.Residual), Note: id.Note}
	if id.Param != "" {
		out.Params = map[string]num.Float{id.Param: num.Float(id.Value)}
	}
	return out
}

type auditJSON struct {
	reportJSON
	Payout     string      `json:"payout"`
	Outcomes   []string    `json:"outcomes"`
	Gap        gapJSON     `json:"gap"`
	Direction  string      `json:"direction,omitempty"`
	Undefined  int         `json:"undefined_beliefs,omitempty"`
	Identified *identJSON  `json:"identified,omitempty"`
	Fits       []identJSON `json:"fits,omitempty"`
	Caution    string      `json:"caution"`
}

const auditCaution = "scorewright checks the mathematics, not the law: payment schemes (lottery-style payments especially) can be regulated; have the contract reviewed by qualified counsel"

func runAudit(e *env, args []string) error {
	fs := newFlags("audit")
	outcomes := fs.String("outcomes", "", "outcome count or comma-separated labels")
	src := fs.String("payout", "", "payout formula pay(p, y) in p, p1..pn, y, hit, hitc, p[y] (reward: more is better)")
	ordered := fs.Bool("ordered", false, "outcomes are ordered (allows csum and hitc)")
	weights := fs.String("weights", "", "outcome weights w1,w2,... (w inside sum)")
	params := paramFlag{}
	fs.Var(params, "param", "override a formula parameter, name=value (repeatable)")
	vf := addVerifyFlags(fs)
	interval := addPointAuditFlag(fs)
	if err := parseFlags(e, fs, "(--outcomes N|label1,label2,... | --interval LO,HI) --payout EXPR [--ordered] [--weights w1,...] [--param name=value] "+verifyUsage, args, false); err != nil {
		return err
	}
	var ps map[string]float64
	if len(params) > 0 {
		ps = params
	}
	var d *design.Design
	var err error
	if *interval != "" {
		d, err = pointPayoutDesign(*src, *interval, ps)
	} else {
		d, err = payoutDesign(*outcomes, *src, *weights, *ordered, ps)
	}
	if err != nil {
		return err
	}
	return auditDesign(e, d, vf)
}

// auditDesign audits the payout of a design and prints the report;
// errFailed after printing when the payout is improper or a check failed.
func auditDesign(e *env, d *design.Design, vf *verifyFlags) error {
	v, err := startVerify(e, d, vf)
	if err != nil {
		return err
	}
	defer v.stop()
	r, s, ctx := v.r, v.s, v.ctx
	s.Labels = d.Labels
	found, err := r.Audit(ctx, s)
	switch {
	case err != nil && ctx.Err() != nil:
		return usagef("audit interrupted")
	case err != nil:
		return usagef("audit: %v", err)
	case found.Point != nil:
		return printPointReport(e, found.Point, vf.asJSON, nil, false)
	}
	rep := found.Audit
	cert, proved, err := certificate(ctx, e, r, vf.cert)
	if err != nil {
		return err
	}
	st := standing(rep.Verdict, cert)
	out := newAuditJSON(d.Formula, d.Labels, rep, st)
	return v.finish(e, vf, &out, func() { printAudit(e, d.Formula, d.Labels, found, st) }, cert, found.Failed(), proved)
}

// payoutDesign is the design audit builds from --outcomes, --payout,
// --weights and --ordered.
func payoutDesign(outcomes, src, weights string, ordered bool, params map[string]float64) (*design.Design, error) {
	if outcomes == "" {
		return nil, usagef("--outcomes is required (a count such as 2, or labels such as frost,clear)")
	}
	labels, err := design.ParseOutcomes(outcomes)
	if err != nil {
		return nil, usagef("--outcomes: %v", err)
	}
	if src == "" {
		return nil, usagef("--payout is required, e.g. --payout '10 - 5*sum((p - hit)^2)'")
	}
	d := &design.Design{Version: design.SchemaVersion, Mode: design.ModePayout, Labels: labels, Formula: src, Ordered: ordered, Params: params}
	if weights != "" {
		if d.Weights, err = num.ParseVector(weights); err != nil {
			return nil, usagef("--weights: %v", err)
		}
		if len(d.Weights) != len(labels) {
			return nil, usagef("--weights has %d values for %d outcomes", len(d.Weights), len(labels))
		}
		// The same rule as a design's weights: a zero, negative or NaN
		// weight is an input error, not a rule to audit.
		if err := d.Validate(); err != nil {
			return nil, usagef("--%v", err)
		}
	}
	return d, nil
}

// newAuditJSON is what audit --json prints for a payout over outcomes.
func newAuditJSON(src string, labels []string, rep *verify.AuditReport, st scorewright.Standing) auditJSON {
	out := auditJSON{reportJSON: toReportJSON(&rep.Report, st), Payout: src, Outcomes: labels, Direction: rep.Direction, Caution: auditCaution, Undefined: rep.Undefined,
		Gap: gapJSON{Max: num.Float(rep.Gap.Max), Belief: vector(rep.Gap.Belief), BestReport: vector(rep.Gap.BestReport), Sharpened: rep.Gap.Sharpened}}
	if id := rep.Identified; id != nil {
		j := toIdentJSON(*id)
		out.Identified = &j
	}
	for _, f := range rep.Fits {
		out.Fits = append(out.Fits, toIdentJSON(f))
	}
	return out
}

func printAudit(e *env, src string, labels []string, found *scorewright.Findings, st scorewright.Standing) {
	w, rep := e.stdout, found.Audit
	fmt.Fprintf(w, "payout:  %q over %d outcomes (%s) (reward: more is better)\n", src, len(labels), strings.Join(labels, ", "))
	printReport(w, &rep.Report, st)
	fmt.Fprintln(w)
	if line := found.GapLine(); line != "" {
		fmt.Fprintln(w, line)
	}
	switch {
	case rep.Undefined == len(rep.Beliefs) && rep.Undefined > 0:
		fmt.Fprintf(w, "the payout is undefined (NaN) at the honest report for every grid belief: no honesty gap can be computed\n")
	case rep.Undefined > 0:
		fmt.Fprintf(w, "the payout is undefined (NaN) at the honest report for %d of %d grid beliefs: no gap can be computed there, and the gap above covers only the others\n", rep.Undefined, len(rep.Beliefs))
	}
	switch {
	case rep.Direction == "":
	case len(labels) == 2:
		fmt.Fprintf(w, "best misreport %s: %d beliefs exaggerate (away from 1/2), %d hedge (toward 1/2), %d flip to the other side\n",
			rep.Direction, rep.Exaggerate, rep.Hedge, rep.Flip)
	default:
		fmt.Fprintf(w, "best misreport %s: %d beliefs exaggerate (a report further from the uniform forecast), %d hedge (one no further from it), %d flip (another outcome ranked first)\n",
			rep.Direction, rep.Exaggerate, rep.Hedge, rep.Flip)
	}
	if rep.Verdict != verify.Improper && len(labels) == 2 {
		fmt.Fprintln(w, "implied expected pay V(q) of an honest forecaster, by probability of", labels[0]+":")
		for t := 0; t <= 10; t++ {
			q := float64(t) / 10
			if i := nearestBinary(rep.Beliefs, q); i >= 0 {
				fmt.Fprintf(w, "  %-5.2g %.6g\n", rep.Beliefs[i].Belief[0], rep.Beliefs[i].Honest)
			}
		}
	}
	if line := found.IdentifiedLine(); line != "" {
		fmt.Fprintln(w, line)
	} else if len(rep.Fits) > 0 {
		f := rep.Fits[0]
		fmt.Fprintf(w, "not identified as a preset; closest %q%s: %s\n", f.Preset, f.WithParam(), f.Note)
	}
	fmt.Fprintln(w, "caution:", auditCaution)
}

func nearestBinary(bs []verify.BeliefGap, q float64) int {
	best, bd := -1, math.Inf(1)
	for i, b := range bs {
		if d := math.Abs(b.Belief[0] - q); d < bd {
			best, bd = i, d
		}
	}
	return best
}

// vector is a JSON array even when v is empty (the contract promises
// arrays, and null is not one).
func vector(v []float64) []num.Float {
	if v == nil {
		return []num.Float{}
	}
	return num.Floats(v)
}
