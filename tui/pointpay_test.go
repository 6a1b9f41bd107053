package tui

import (
	"path/filepath"
	"strings"
	"testing"

	"github.com/charmbracelet/x/exp/golden"

	"scorewright/generator/design"
)

// Point payout audit: the mode after point forecasts audits pay(x, y) on
// the interval with verify/pointcheck.AuditPayout, as `scorewright audit
// --interval` does.
func TestPointPayoutAudit(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	// generator -> payout -> emphasis -> point -> point payout.
	press(t, m, keyDown, keyDown, keyRight, keyRight, keyRight, keyRight)
	d := m.Design()
	if d.Mode != design.ModePointPayout || len(d.Interval) != 2 || d.Formula != design.ModePointPayout.Sample() {
		t.Fatalf("mode %s interval %v formula %q", d.Mode, d.Interval, d.Formula)
	}
	// 50 - (x - y)^2/200 is 50 - 0.005·D for squared error, D = (y - x)^2
	// (phi = -x^2; derived by hand), so it is strictly proper and
	// identified.
	r := m.CheckReport()
	if r == nil || r.Verdict != "strictly-proper" {
		t.Fatalf("report %+v:\n%s", r, m.View())
	}
	v := m.View()
	for _, want := range []string{"point payout audit", "[0, 100]", "identified: 50 - 0.005 * (effort of preset squared-error)", "pay(x, y)"} {
		if !strings.Contains(v, want) {
			t.Errorf("view lacks %q:\n%s", want, v)
		}
	}
	golden.RequireEqual(t, []byte(v))
	// Absolute error pays the median, not the mean. For outcomes 0 and
	// 100 with weights 1/4 and 3/4 (mean 75) the expected pay of report x
	// is 50 - (x/4 + 3(100 - x)/4) = -25 + x/2: 25 at x = 100 against 12.5
	// at the mean, a gap of 12.5 (derived by hand; the audit's worst
	// case, as `scorewright audit --interval 0,100 --payout '50 - abs(x -
	// y)'` reports it).
	press(t, m, keyDown, keyEnter)
	for range 120 {
		press(t, m, keyBack)
	}
	press(t, m, runes("50 - abs(x - y)"), keyEsc)
	if got := m.Design().Formula; got != "50 - abs(x - y)" {
		t.Fatalf("formula %q", got)
	}
	r = m.CheckReport()
	if r == nil || r.Verdict != "improper" {
		t.Fatalf("report %+v", r)
	}
	notes := strings.Join(r.Notes, "\n")
	// The mirror image (weights 3/4 and 1/4, mean 25, best report 0) gains
	// the same; either is the worst case.
	if !strings.Contains(notes, "honesty gap 12.5: best report 100, not the mean 75,\n  for outcomes (0, 100) weighted (0.25, 0.75)") &&
		!strings.Contains(notes, "honesty gap 12.5: best report 0, not the mean 25,\n  for outcomes (0, 100) weighted (0.75, 0.25)") {
		t.Errorf("notes lack the gap:\n%s", notes)
	}
	// Saved and opened again it is still a point payout audit.
	path := filepath.Join(t.TempDir(), "audit.toml")
	if err := m.Design().Save(path, false); err != nil {
		t.Fatal(err)
	}
	back, err := design.Load(path)
	if err != nil || !onInterval(back) || back.Mode != design.ModePointPayout || back.Formula != "50 - abs(x - y)" {
		t.Fatalf("reopened: %+v %v", back, err)
	}
	// The risk view refuses.
	press(t, m, keyCtrlR)
	if v := m.View(); !strings.Contains(v, "payout audit design") {
		t.Errorf("risk view on a point payout:\n%s", v)
	}
}
