package main

import (
	"fmt"
	"math"

	"scorewright/internal/num"
	"scorewright/internal/textcol"
)

type evalJSON struct {
	Outcomes   []string    `json:"outcomes"`
	Report     []num.Float `json:"report"`
	Belief     []num.Float `json:"belief,omitempty"`
	Entropy    num.Float   `json:"entropy"`
	Effort     []num.Float `json:"effort"`
	Expected   *num.Float  `json:"expected_effort,omitempty"`
	Divergence *num.Float  `json:"divergence,omitempty"`
	// Binary extras (n = 2): H'(p) and the emphasis weight -H''(p).
	Derivative *num.Float `json:"derivative,omitempty"`
	Emphasis   *num.Float `json:"emphasis,omitempty"`
	Notes      []string   `json:"notes,omitempty"`
}

func runEval(e *env, args []string) error {
	fs := newFlags("eval")
	rf := addRuleFlags(fs)
	report := fs.String("report", "", "the report r1,r2,... (n = 2: one number is the event's probability)")
	belief := fs.String("belief", "", "a belief q1,q2,...; adds expected effort and divergence")
	asJSON := fs.Bool("json", false, "print JSON")
	usage := ruleUsage + " --report r1,r2,... [--belief q1,q2,...] [--json]"
	if err := parseFlags(e, fs, usage, args, false); err != nil {
		return err
	}
	d, err := rf.design(e.stderr)
	if err != nil {
		return err
	}
	r, err := openRule(d)
	if err != nil {
		return err
	}
	if g := r.Point(); g != nil {
		return runEvalPoint(e, g, *report, *belief, *asJSON)
	}
	rule, err := r.OverOutcomes()
	if err != nil {
		return usagef("%v", err)
	}
	n := rule.Outcomes()
	if *report == "" {
		return usagef("--report is required")
	}
	p, err := num.ParseDistribution(*report, n)
	if err != nil {
		return usagef("--report: %v", err)
	}
	var q []float64
	if *belief != "" {
		if q, err = num.ParseDistribution(*belief, n); err != nil {
			return usagef("--belief: %v", err)
		}
	}
	s := rule.NewScorer()
	eff := make([]float64, n)
	h := s.Efforts(eff, p)
	out := evalJSON{Outcomes: d.Labels, Report: num.Floats(p), Belief: num.Floats(q), Entropy: num.Float(h), Effort: num.Floats(eff)}
	if q != nil {
		ex := num.Float(s.Expected(q, p))
		div := num.Float(float64(ex) - s.Entropy(q))
		out.Expected, out.Divergence = &ex, &div
	}
	if n == 2 {
		_, dh, w := s.Binary(p[0])
		d1, w1 := num.Float(dh), num.Float(w)
		out.Derivative, out.Emphasis = &d1, &w1
	}
	out.Notes = append(nonFiniteNotes(d.Labels, p, h, eff), r.Warnings()...)
	if *asJSON {
		return writeJSON(e.stdout, out)
	}
	tw := textcol.NewWriter(e.stdout, 0)
	fmt.Fprintf(tw, "report\t%s\n", num.Format(p))
	fmt.Fprintf(tw, "entropy H(report)\t%.10g\n", h)
	for k, l := range eff {
		fmt.Fprintf(tw, "effort if %q\t%.10g\n", rule.Label(k), l)
	}
	if q != nil {
		fmt.Fprintf(tw, "belief\t%s\n", num.Format(q))
		fmt.Fprintf(tw, "expected effort Phi(belief, report)\t%.10g\n", float64(*out.Expected))
		fmt.Fprintf(tw, "divergence D(belief, report)\t%.10g\n", float64(*out.Divergence))
	}
	if n == 2 {
		fmt.Fprintf(tw, "H'(p)\t%.10g\n", float64(*out.Derivative))
		fmt.Fprintf(tw, "emphasis weight -H''(p)\t%.10g\n", float64(*out.Emphasis))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	for _, note := range out.Notes {
		fmt.Fprintln(e.stdout, "note:", note)
	}
	return nil
}

// nonFiniteNotes explains every non-finite value, naming the outcome and
// the report, so that an infinite effort reads as a finding, not a glitch.
func nonFiniteNotes(labels []string, p []float64, h float64, eff []float64) []string {
	var notes []string
	if math.IsNaN(h) || math.IsInf(h, 0) {
		notes = append(notes, fmt.Sprintf("the generator is %v at report %s", h, num.Format(p)))
	}
	for k, l := range eff {
		if math.IsNaN(l) || math.IsInf(l, 0) {
			why := ""
			if p[k] == 0 {
				why = " (the report gives it probability 0)"
			}
			notes = append(notes, fmt.Sprintf("effort for outcome %q is %v at report %s%s", labels[k], l, num.Format(p), why))
		}
	}
	return notes
}
