package budget

import (
	"context"
	"errors"
	"strings"
	"testing"

	"scorewright/generator/design"
)

// quarter is one 1/4000 of the currency: every pay of the tables below
// and every unit of the ladder down to 0.001 is a whole number of them.
const quarter = 4000

// brierPay is the pay of report p = i/20 when outcome k happens, in
// 1/4000ths, on the quadratic rule's frost table with floor 0 and cap
// c10/10, computed without this package: the effort is L(p, frost) =
// 2(1-p)² and L(p, clear) = 2p² (Brier 1950, the two-outcome score), the
// largest effort 2 pays 0 and effort 0 pays the cap, so pay = cap·(1 -
// L/2); at p = i/20 that is cap·(1 - j²/400) with j = 20 - i for frost, i
// for clear, which is 400·c10 - c10·j² in 1/4000ths (derived by hand).
func brierPay(c10, i, k int) int {
	j := 20 - i
	if k == 1 {
		j = i
	}
	return 400*c10 - c10*j*j
}

// roundTo rounds v to a multiple of u (both in 1/4000ths), halves up (all
// pays are ≥ 0, so up is away from zero), in whole numbers so that no
// float decides a half.
func roundTo(v, u int) int { return (2*v + u) / (2 * u) * u }

// bruteMenuPasses decides by brute force over the menu whether every item
// is the strict best report for the belief that is that item, on the
// table of cap c10/10 rounded to u/4000: expected pay ×20 is i·pay(frost)
// + (20-i)·pay(clear), a whole number, so the comparison is exact.
func bruteMenuPasses(c10, u int) bool {
	var pay [21][2]int
	for i := 0; i <= 20; i++ {
		for k := 0; k < 2; k++ {
			pay[i][k] = roundTo(brierPay(c10, i, k), u)
		}
	}
	for i := 0; i <= 20; i++ {
		own := i*pay[i][0] + (20-i)*pay[i][1]
		for j := 0; j <= 20; j++ {
			if j != i && i*pay[j][0]+(20-i)*pay[j][1] >= own {
				return false
			}
		}
	}
	return true
}

// tenths is a cap in tenths of the currency.
func tenths(x float64) int { return int(x*10 + 0.5) }

// in4000 is an amount in 1/4000ths.
func in4000(x float64) int { return int(x*quarter + 0.5) }

// The proposal is the coarsest unit of the ladder that passes, checked by
// brute force over the menu: it passes, and every coarser unit tried
// fails. When the cap must move instead, the proposed cap passes and
// every cap between the budget's and it, in whole steps of the search's
// grain, fails by brute force: it is the smallest cap of that grain.
func TestProposeAgainstBruteForce(t *testing.T) {
	r := rule(t, "1 - sum(p^2)", 2)
	m := stepMenu(t, 2, 0.05, 0)
	capProposals, noneCases := 0, 0
	for _, c := range []float64{10, 40, 100} {
		for _, unit := range []float64{5, 1, 0.5, 0.1} {
			b := design.Budget{Floor: 0, Cap: c, Step: 0.05, Unit: unit}
			props, err := Propose(context.Background(), r, m, b, nil)
			if err != nil {
				t.Fatalf("cap %g unit %g: %v", c, unit, err)
			}
			p := props[0]
			if p.Field != "unit" || p.Budget.Cap != c {
				t.Fatalf("cap %g unit %g: first proposal %+v", c, unit, p)
			}
			c10 := tenths(c)
			if !bruteMenuPasses(c10, in4000(p.Budget.Unit)) {
				t.Errorf("cap %g: proposed unit %g does not pass by brute force", c, p.Budget.Unit)
			}
			for _, u := range ProposalUnits() {
				if u > p.Budget.Unit && u <= c/2 && bruteMenuPasses(c10, in4000(u)) {
					t.Errorf("cap %g: unit %g passes by brute force and is coarser than the proposed %g", c, u, p.Budget.Unit)
				}
			}
			failing := !bruteMenuPasses(c10, in4000(unit))
			if len(props) == 2 && !failing {
				t.Errorf("cap %g unit %g: a cap proposal for a passing budget", c, unit)
			}
			if !failing {
				continue
			}
			// The brute force walks every cap of the grain above c, up to
			// five times the range: the first that passes is the answer.
			grain := tenths(CapGrain(c, unit))
			want := 0
			for ck := (c10/grain + 1) * grain; ck <= 5*c10; ck += grain {
				if bruteMenuPasses(ck, in4000(unit)) {
					want = ck
					break
				}
			}
			got := 0
			if len(props) == 2 {
				q := props[1]
				if q.Field != "cap" || q.Budget.Unit != unit {
					t.Fatalf("cap proposal %+v", q)
				}
				got = tenths(q.Budget.Cap)
				capProposals++
			}
			if got != want {
				t.Errorf("cap %g unit %g: proposed cap %g, the smallest passing by brute force is %g (0: none)", c, unit, float64(got)/10, float64(want)/10)
			}
			// With none passing the proposal says so, naming the caps the
			// brute force walked: the first grain above c to the last at
			// most five times the range.
			nl := props[0].NoLarger
			if want != 0 {
				if nl != nil {
					t.Errorf("cap %g unit %g: a cap passes, yet the proposal says none does: %+v", c, unit, nl)
				}
				continue
			}
			noneCases++
			last := (5 * c10 / grain) * grain
			if nl == nil || nl.Field != "cap" || nl.Unit != unit || tenths(nl.From) != (c10/grain+1)*grain || tenths(nl.To) != last ||
				!strings.Contains(props[0].Describe(), "no larger cap passes at unit") {
				t.Errorf("cap %g unit %g: no cap passes by brute force up to %g; the proposal says %+v: %s", c, unit, float64(last)/10, nl, props[0].Describe())
			}
		}
	}
	if noneCases == 0 {
		t.Error("no case found no cap passing; the note went untested")
	}
	if capProposals == 0 {
		t.Error("no case needed a cap proposal; the cap search went untested")
	}
}

// A rule that is not strictly proper fails at every unit and cap: H =
// 1 - max(p1, p2) is linear on each half of the line, so the menu's reports
// on one side tie for every belief there (derived by hand), and the answer
// says the search found nothing — and, without a unit, that larger caps
// were not tried, since they only rescale the unrounded table.
func TestProposeNothingPasses(t *testing.T) {
	r := rule(t, "1 - max(p1, p2)", 2)
	m := stepMenu(t, 2, 0.25, 0)
	for _, unit := range []float64{1, 0} {
		_, err := Propose(context.Background(), r, m, design.Budget{Floor: 0, Cap: 10, Step: 0.25, Unit: unit}, nil)
		if err == nil {
			t.Fatalf("unit %g: a constant rule got a proposal", unit)
		}
		if !errors.Is(err, ErrNoProposal) {
			t.Errorf("unit %g: error %v is not ErrNoProposal", unit, err)
		}
		// Only a search with a unit tries larger caps, and only its
		// message may say so.
		if says := strings.Contains(err.Error(), "no larger cap"); says != (unit > 0) {
			t.Errorf("unit %g: %v", unit, err)
		}
	}
}
