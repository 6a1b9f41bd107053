package main

import (
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// A witness names two different reports. The payout pays the quadratic
// score except 0 at the honest report 1/2 (within 1e-7): the belief
// (1/2, 1/2) gains 1 - (1/2)^2 = 0.75 by reporting anything just off 1/2
// (derived by hand), and a six-digit print once showed that report as
// (0.5, 0.5), the belief itself. The point audit's equivalent names a
// mean and a report that read differently too.
func TestWitnessNamesTwoReports(t *testing.T) {
	code, out, errs := runCmd(t, "audit", "--outcomes", "2", "--payout", "if(abs(p[1]-0.5) < 1e-7, 0, 1 - (1-p[y])^2)")
	if code != 1 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	re := regexp.MustCompile(`belief (\([^)]*\)) expects ([0-9.e-]+) more pay by reporting (\([^)]*\))`)
	m := re.FindStringSubmatch(out)
	if m == nil {
		t.Fatalf("no witness line:\n%s", out)
	}
	if m[1] == m[3] {
		t.Errorf("witness names the belief %s as the better report", m[1])
	}
	if g, _ := strconv.ParseFloat(m[2], 64); math.Abs(g-0.75) > 1e-6 {
		t.Errorf("gain %v, want 0.75", g)
	}
	if strings.Contains(out, "report (0.5, 0.5)") {
		t.Errorf("a report printed as the belief:\n%s", out)
	}

	code, out, errs = runCmd(t, "audit", "--interval", "0,1", "--payout", "if(abs(x-0.5) < 1e-7, -1, -(x-y)^2)")
	if code != 1 {
		t.Fatalf("point: exit %d: %s", code, errs)
	}
	pm := regexp.MustCompile(`\(mean ([^)]*)\) the report ([^ ]*) earns`).FindStringSubmatch(out)
	if pm == nil || pm[1] == pm[2] {
		t.Errorf("point witness %v:\n%s", pm, out)
	}
}
