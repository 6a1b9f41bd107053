package main

import (
	"fmt"
	"sort"
	"strings"

	"scorewright/generator/design"
	"scorewright/verify"
	"scorewright/verify/certify"
)

func runCheck(e *env, args []string) error {
	fs := newFlags("check")
	rf := addRuleFlags(fs)
	vf := addVerifyFlags(fs)
	cf := addCertifyFlags(fs)
	if err := parseFlags(e, fs, ruleUsage+" "+verifyUsage+" "+certifyUsage, args, false); err != nil {
		return err
	}
	d, err := rf.design()
	if err != nil {
		return err
	}
	if d.Mode == design.ModePoint {
		if cf.on {
			return usagef("--certify covers rules over outcomes; point forecasts on an interval are checked on the grid only")
		}
		return runCheckPoint(e, d, vf)
	}
	rule, err := categoricalRule(d)
	if err != nil {
		return err
	}
	s, err := vf.settings(e)
	if err != nil {
		return err
	}
	ctx, stop := interruptible()
	defer stop()
	rep, err := verify.CheckRule(ctx, rule, s)
	if err != nil {
		if ctx.Err() != nil {
			return usagef("check interrupted")
		}
		return usagef("check: %v", err)
	}
	var cert *certificateJSON
	var proof *certify.Result
	if cf.on {
		if cert, proof, err = ruleCertificate(ctx, e, rule, cf); err != nil {
			return err
		}
	}
	if vf.asJSON {
		out := toReportJSON(rep)
		out.Certificate = cert
		if err := writeJSON(e.stdout, out); err != nil {
			return err
		}
	} else {
		fmt.Fprintf(e.stdout, "rule:    %s\n", describeRule(d))
		printReport(e.stdout, rep)
		if cert != nil {
			printCertificate(e.stdout, cert)
		}
	}
	if rep.Verdict == verify.Improper || rep.Failed() || proof != nil && proof.Verdict == verify.Improper {
		return errFailed
	}
	return nil
}

// describeRule is the one-line statement of what was checked: mode,
// formula (its lines joined), overridden parameters, outcomes.
func describeRule(d *design.Design) string {
	var b strings.Builder
	mode := string(d.Mode)
	if mode == "" {
		mode = string(design.ModeGenerator)
	}
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
