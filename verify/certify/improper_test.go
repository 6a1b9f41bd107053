package certify

import (
	"context"
	"math"
	"testing"
	"time"

	"scorewright/generator/bregman"
	"scorewright/generator/payout"
	"scorewright/verify"
)

// Generators that are concave except on a patch far narrower than any
// grid step: 1 - sum(p^2) has curvature -2 along every direction, the
// bump a·exp(-|p - c|²/s) adds up to 2a/s (derived by hand), here
// 1e-10/1e-12 = 100, so H is convex across the bump's flanks and the rule
// improper; its width, 1e-6, is a thousandth of the finest default grid
// step.
var bumps = []struct {
	n   int
	src string
}{
	{2, "1 - sum(p^2) + 1e-10*exp(-(p1 - 0.3141)^2/1e-12)"},
	{3, "1 - sum(p^2) + 1e-10*exp(-((p1 - 0.3141)^2 + (p2 - 0.2718)^2)/1e-12)"},
	{4, "1 - sum(p^2) + 1e-10*exp(-((p1 - 0.3141)^2 + (p2 - 0.2718)^2 + (p3 - 0.1414)^2)/1e-12)"},
}

func TestNarrowBumpProvedImproper(t *testing.T) {
	for _, c := range bumps {
		res := certifyFormula(t, c.src, c.n, Settings{Deadline: 20 * time.Second})
		if res.Verdict != verify.Improper || res.Witness == nil {
			t.Fatalf("n=%d: %s", c.n, res.Statement())
		}
		t.Logf("n=%d: %s", c.n, res.Statement())
	}
}

// TestGridMissesNarrowBump shows why the certificate matters: the grid
// check at its default resolution does not see the bump, and the
// certificate proves the rule improper. The grid cannot be expected to:
// its step at n = 3 is 1/100, ten thousand times the bump's width, and
// its 10,000 random interior points (a fixed seed, so the run is
// reproducible) land within 1e-6 of the bump's centre with probability
// about 1e4 · π·1e-12 / (1/2) ≈ 6e-8 (derived by hand). So this is no
// coin toss: with the default seed the grid's verdict is the same every
// run, and it must not say improper.
func TestGridMissesNarrowBump(t *testing.T) {
	for _, c := range bumps[:2] {
		f, err := bregman.NewFormula(c.src, bregman.Options{Outcomes: c.n})
		if err != nil {
			t.Fatal(err)
		}
		rep, err := verify.CheckRule(context.Background(), &bregman.Rule{Gen: f}, verify.Settings{})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict == verify.Improper {
			t.Fatalf("n=%d: the grid found a bump a ten-thousandth of its step wide: %v", c.n, rep.Verdict)
		}
		res := certifyFormula(t, c.src, c.n, Settings{Deadline: time.Minute})
		if res.Verdict != verify.Improper {
			t.Fatalf("n=%d: certificate %s", c.n, res.Statement())
		}
		t.Logf("n=%d: grid verdict %s (grid evidence), certificate improper", c.n, rep.Verdict)
	}
}

// A convex kink: max(p1 - 0.5, 0) adds slope 1 past 0.5, so H lies
// below its chords across p1 = 0.5 (derived by hand) and no Hessian sees
// it; the chord test proves it.
func TestConvexKinkProvedImproper(t *testing.T) {
	res := certifyFormula(t, "1 - sum(p^2) + 0.3*max(p1 - 0.5123, 0)", 3, Settings{Deadline: 10 * time.Second})
	if res.Verdict != verify.Improper || res.Witness == nil {
		t.Fatalf("%s", res.Statement())
	}
	t.Log(res.Statement())
}

// H = sum(p^2) is convex, the textbook improper generator.
func TestConvexGeneratorImproper(t *testing.T) {
	for n := 2; n <= 4; n++ {
		res := certifyFormula(t, "sum(p^2)", n, Settings{})
		if res.Verdict != verify.Improper || res.Witness == nil || !(res.Witness.Gain > 0) {
			t.Fatalf("n=%d: %s", n, res.Statement())
		}
	}
}

func certifyPayout(t *testing.T, src string, n int, s Settings) *Result {
	t.Helper()
	pay, err := payout.New(src, payout.Options{Outcomes: n})
	if err != nil {
		t.Fatal(err)
	}
	if s.Deadline == 0 {
		s.Deadline = 20 * time.Second
	}
	res, err := Payout(context.Background(), pay, s)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// The linear payout p[y] rewards reporting the likeliest outcome for
// sure: for belief (3/4, 1/4) the gain is 3/4 - (9/16 + 1/16) = 1/8
// (derived by hand), far above any tolerance.
func TestLinearPayoutImproper(t *testing.T) {
	res := certifyPayout(t, "p[y]", 2, Settings{})
	if res.Verdict != verify.Improper || res.Witness == nil {
		t.Fatalf("%s", res.Statement())
	}
	t.Log(res.Statement())
}

// A jackpot of 5 for reports within 1e-7 of p1 = 0.3141 on top of the
// quadratic rule: reporting there gains up to 5 minus a quadratic
// penalty, for every belief near it.
func TestJackpotProvedImproper(t *testing.T) {
	for _, c := range []struct {
		n   int
		src string
	}{
		{2, "1 - sum((p - hit)^2) + if(abs(p1 - 0.3141) < 1e-7, 5, 0)"},
		{3, "1 - sum((p - hit)^2) + if(abs(p1 - 0.3141) + abs(p2 - 0.2718) < 1e-7, 5, 0)"},
	} {
		res := certifyPayout(t, c.src, c.n, Settings{})
		if res.Verdict != verify.Improper || res.Witness == nil {
			t.Fatalf("n=%d: %s", c.n, res.Statement())
		}
		t.Logf("n=%d: %s", c.n, res.Statement())
	}
}

// The quadratic payout is strictly proper (Brier 1950), so no report
// gains more than the tolerance anywhere; the generator argument proves
// it at every n at once, and brute force over a lattice of beliefs and
// reports with the closed form agrees.
func TestQuadraticPayoutCertified(t *testing.T) {
	quad := func(r []float64, y int) float64 {
		s := 10.0
		for i, v := range r {
			d := v
			if i == y {
				d--
			}
			s -= 5 * d * d
		}
		return s
	}
	for n := 2; n <= 4; n++ {
		res := certifyPayout(t, "10 - 5*sum((p - hit)^2)", n, Settings{Deadline: time.Minute})
		t.Logf("n=%d: %s share %g", n, res.Statement(), res.Share)
		if res.Verdict != EpsilonProper {
			t.Errorf("n=%d: %s", n, res.Statement())
		}
		if g := bruteGain(t, quad, n, 12); g > res.Epsilon {
			t.Errorf("n=%d: brute force finds a gain %g above the tolerance %g", n, g, res.Epsilon)
		}
	}
}

// bruteGain is the largest gain E_q[pay(r)] - E_q[pay(q)] over a lattice
// of beliefs q and reports r (steps 1/m), from a closed-form payout.
func bruteGain(t *testing.T, pay func(r []float64, y int) float64, n, m int) float64 {
	t.Helper()
	pts := lattice(t, n, m)
	expect := func(q, r []float64) float64 {
		var s float64
		for y, qy := range q {
			s += qy * pay(r, y)
		}
		return s
	}
	worst := math.Inf(-1)
	for _, q := range pts {
		honest := expect(q, q)
		for _, r := range pts {
			worst = math.Max(worst, expect(q, r)-honest)
		}
	}
	return worst
}

// A small linear tilt of the quadratic payout, + 0.01 p1, lets a report
// gain at most 0.01²(1 - 1/n)/20 (derived by hand: maximise 0.01 δ1 -
// 5|δ|² over moves δ along the simplex), 5e-6·(1 - 1/n). Within a
// tolerance of 1e-3 the payout is honest; within 1e-6 it is not, and the
// certificate must never say otherwise.
func TestTiltedPayoutTolerance(t *testing.T) {
	const src = "10 - 5*sum((p - hit)^2) + 0.01*p1"
	for n := 2; n <= 3; n++ {
		res := certifyPayout(t, src, n, Settings{Deadline: time.Minute, Epsilon: 1e-3})
		if res.Verdict != EpsilonProper {
			t.Errorf("n=%d eps 1e-3: %s", n, res.Statement())
		}
		res = certifyPayout(t, src, n, Settings{Deadline: 5 * time.Second, Epsilon: 1e-6})
		if res.Verdict == EpsilonProper {
			t.Errorf("n=%d eps 1e-6: %s, but a report gains 5e-6·(1 - 1/n)", n, res.Statement())
		}
		if w := res.Witness; w != nil {
			tilted := func(r []float64, y int) float64 {
				s := 10 + 0.01*r[0]
				for i, v := range r {
					if i == y {
						v--
					}
					s -= 5 * v * v
				}
				return s
			}
			var gain float64
			for y, q := range w.Belief {
				gain += q * (tilted(w.Report, y) - tilted(w.Belief, y))
			}
			if !(gain >= w.Gain*(1-1e-6)) || gain > 5e-6 {
				t.Errorf("n=%d: witness gain %g claimed, closed form %g", n, w.Gain, gain)
			}
		}
	}
}

// A hole instead of a jackpot: reports near p1 = 0.3141 lose up to 5,
// so a forecaster who believes p1 = 0.3141 gains almost 5 by reporting
// outside it (derived by hand: the quadratic penalty for a move of 0.05
// is 5·2·0.0025 = 0.025). The honest expected pay dips there, so it is
// not convex, and the one-pass argument over reports must not be used
// for any report — not even those far from the hole, which are the ones
// that gain: the certificate must find the dishonesty, with a witness
// whose gain the closed form confirms. Both a sharp hole (an if) and a
// smooth one (a Gaussian dip, which no kink flags).
func TestHolePayoutImproper(t *testing.T) {
	for _, c := range []struct {
		src  string
		hole func(p1 float64) float64
	}{
		{"10 - 5*sum((p - hit)^2) - if(abs(p1 - 0.3141) < 1e-3, 5, 0)", func(p1 float64) float64 {
			if math.Abs(p1-0.3141) < 1e-3 {
				return 5
			}
			return 0
		}},
		{"10 - 5*sum((p - hit)^2) - 5*exp(-(p1 - 0.3141)^2/1e-4)", func(p1 float64) float64 {
			return 5 * math.Exp(-(p1-0.3141)*(p1-0.3141)/1e-4)
		}},
	} {
		holePayoutImproper(t, c.src, c.hole)
	}
}

func holePayoutImproper(t *testing.T, src string, dip func(float64) float64) {
	t.Helper()
	hole := func(r []float64, y int) float64 {
		s := 10.0
		for i, v := range r {
			if i == y {
				v--
			}
			s -= 5 * v * v
		}
		return s - dip(r[0])
	}
	for n := 2; n <= 3; n++ {
		res := certifyPayout(t, src, n, Settings{Deadline: time.Minute})
		if res.Verdict != verify.Improper || res.Witness == nil {
			t.Fatalf("%s n=%d: %s", src, n, res.Statement())
		}
		w := res.Witness
		var gain float64
		for y, q := range w.Belief {
			gain += q * (hole(w.Report, y) - hole(w.Belief, y))
		}
		if !(gain >= w.Gain*(1-1e-9)) {
			t.Errorf("n=%d: witness gain %g claimed, closed form %g", n, w.Gain, gain)
		}
	}
}
