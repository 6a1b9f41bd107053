package main

import (
	"errors"
	"fmt"
	"sort"
	"strings"

	"scorewright"
	"scorewright/generator/design"
	"scorewright/generator/point"
	"scorewright/presets"
	"scorewright/verify"
)

// presetNeeds is what a design's preset says it needs of the interval
// ("; preset qlike: ... (needs lo > 0)"), or "" for a formula.
func presetNeeds(d *design.Design) string {
	if d.Preset == "" {
		return ""
	}
	p, err := presets.Lookup(d.Preset)
	if err != nil {
		return ""
	}
	return fmt.Sprintf("; preset %s is a %s", p.Name, p.Title)
}

func runCheck(e *env, args []string) error {
	fs := newFlags("check")
	rf := addRuleFlags(fs)
	vf := addVerifyFlags(fs)
	if err := parseFlags(e, fs, ruleUsage+" "+verifyUsage, args, false); err != nil {
		return err
	}
	d, err := rf.design(e.stderr)
	if err != nil {
		return err
	}
	return checkDesign(e, d, vf)
}

// checkDesign checks a design and prints the report; errFailed after
// printing when the rule is improper or a check failed.
func checkDesign(e *env, d *design.Design, vf *verifyFlags) error {
	v, err := startVerify(e, d, vf)
	if err != nil {
		return err
	}
	defer v.stop()
	r, s, ctx := v.r, v.s, v.ctx
	// The certificate goes first: what it proves, the grid need not
	// stream again (verify.Settings.Proof).
	cert, proved, err := certificate(ctx, e, r, vf.cert)
	if err != nil {
		return err
	}
	// Only a proof of strict properness is handed in: a certificate that
	// proved concavity but strictness on part of the simplex only (an
	// isolated zero of curvature, as -(p1 - p2)^4 has at (1/2, 1/2)) has
	// not shown two reports that tie, so "proper" would claim more than it
	// proved; the full grid then judges strictness, with a witness when
	// it is not strict.
	if cert != nil && cert.Verdict == verify.StrictlyProper {
		s.Proof = &verify.Proof{Verdict: cert.Verdict, Statement: cert.Statement}
	}
	found, err := r.Check(ctx, s)
	var needs *scorewright.NeedsOutcomesError
	var domain *point.DomainError
	switch {
	case errors.As(err, &needs):
		return usagef("%v", err)
	case errors.As(err, &domain):
		return usagef("%v%s", err, presetNeeds(d))
	case err != nil && ctx.Err() != nil:
		return usagef("check interrupted")
	case err != nil:
		return usagef("check: %v", err)
	case found.Point != nil:
		return printPointReport(e, found.Point, vf.asJSON, cert, proved)
	}
	st := standing(found.Rule.Verdict, cert)
	out := toReportJSON(found.Rule, st)
	return v.finish(e, vf, &out, func() {
		fmt.Fprintf(e.stdout, "rule:    %s\n", describeRule(r.Kind(), d))
		printReport(e.stdout, found.Rule, st)
	}, cert, found.Failed(), proved)
}

// describeRule is the one-line statement of what was checked: the kind of
// formula, the formula (its lines joined), overridden parameters, outcomes.
func describeRule(mode string, d *design.Design) string {
	var b strings.Builder
	if d.Preset != "" {
		mode += " (preset " + d.Preset + ")"
	}
	fmt.Fprintf(&b, "%s %q", mode, strings.Join(strings.Split(strings.TrimSpace(d.Formula), "\n"), "; "))
	if len(d.Params) > 0 {
		names := make([]string, 0, len(d.Params))
		for k := range d.Params {
			names = append(names, k)
		}
		sort.Strings(names)
		var ps []string
		for _, k := range names {
			ps = append(ps, fmt.Sprintf("%s = %g", k, d.Params[k]))
		}
		fmt.Fprintf(&b, " with %s", strings.Join(ps, ", "))
	}
	fmt.Fprintf(&b, " over %d outcomes (%s)", d.N(), strings.Join(d.Labels, ", "))
	if d.Ordered {
		b.WriteString(", ordered")
	}
	return b.String()
}
