package certify

import (
	"context"
	"testing"
	"time"

	"scorewright/generator/bregman"
	"scorewright/presets"
	"scorewright/verify"
)

func certifyFormula(t *testing.T, src string, n int, s Settings) *Result {
	t.Helper()
	f, err := bregman.NewFormula(src, bregman.Options{Outcomes: n, Ordered: true, Weights: []float64{1, 2, 3, 4}[:n]})
	if err != nil {
		t.Fatal(err)
	}
	if s.Deadline == 0 {
		s.Deadline = 20 * time.Second
	}
	res, err := Generator(context.Background(), f.Program(), n, s)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// TestPresetsCertified: every generator preset is strictly proper for
// every n (Gneiting & Raftery 2007, Sec. 3 for the log, quadratic,
// spherical, pseudospherical and power rules; Epstein 1969 for the ranked
// rule; Brier 1950 with weights), so the certificate must prove them
// proper for n = 2..4.
func TestPresetsCertified(t *testing.T) {
	for _, p := range presets.All() {
		if p.Kind != presets.KindGenerator {
			continue
		}
		for n := 2; n <= 4; n++ {
			res := certifyFormula(t, p.Formula, n, Settings{})
			t.Logf("%s n=%d: %s (share %.6f strict %.6f boxes %d)", p.Name, n, res.Statement(), res.Share, res.StrictShare, res.Boxes)
			if res.Verdict != verify.Proper && res.Verdict != verify.StrictlyProper {
				t.Errorf("%s n=%d: %s", p.Name, n, res.Statement())
			}
		}
	}
}
