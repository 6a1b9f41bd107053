package main

import (
	"fmt"

	"scorewright/generator/design"

	"scorewright/verify"
)

func runCheck(e *env, args []string) error {
	fs := newFlags("check", "")
	rf := addRuleFlags(fs)
	vf := addVerifyFlags(fs)
	if err := parseFlags(e, fs, ruleUsage+" "+verifyUsage, args, false); err != nil {
		return err
	}
	d, err := rf.design()
	if err != nil {
		return err
	}
	if d.Mode == design.ModePoint {
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
	if vf.asJSON {
		if err := writeJSON(e.stdout, toReportJSON(rep)); err != nil {
			return err
		}
	} else {
		fmt.Fprintf(e.stdout, "rule:    generator %q over %d outcomes\n", d.Formula, rule.Outcomes())
		printReport(e.stdout, rep)
	}
	if rep.Verdict == verify.Improper || rep.Failed() {
		return errFailed
	}
	return nil
}
