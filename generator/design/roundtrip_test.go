package design

import (
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"reflect"
	"testing"
)

// randomDesign draws a valid design of mode m: random labels, formula
// text, parameters, weights, interval, budget and contract terms, with
// every optional field sometimes left out.
func randomDesign(rng *rand.Rand, m Mode) *Design {
	d := &Design{Version: SchemaVersion, Mode: m, Formula: fmt.Sprintf("# drawn\na = %d\n1 - sum(p^2) * a", rng.IntN(9)+1)}
	if rng.IntN(2) == 0 {
		d.Title = fmt.Sprintf("Design %d of a test", rng.IntN(1000))
	}
	if rng.IntN(3) == 0 {
		d.Params = map[string]float64{"a": rng.Float64() * 10}
	}
	step := 0.05
	if m.OnInterval() {
		lo := rng.Float64()*100 - 50
		d.Interval = []float64{lo, lo + 1 + rng.Float64()*100}
		step = (d.Interval[1] - d.Interval[0]) / 10
	} else {
		n := 2
		if m != ModeEmphasis {
			n += rng.IntN(5)
		}
		for i := range n {
			d.Labels = append(d.Labels, fmt.Sprintf("outcome %c", 'A'+i))
		}
		d.Ordered = rng.IntN(2) == 0
		if rng.IntN(3) == 0 {
			for range n {
				d.Weights = append(d.Weights, 0.5+rng.Float64())
			}
		}
	}
	d.Budget = Budget{Floor: rng.Float64() * 5, Cap: 10 + rng.Float64()*90, Step: step, Unit: []float64{0, 0.01, 0.5}[rng.IntN(3)],
		Rounding: []string{"", "nearest", "down", "up"}[rng.IntN(4)]}
	if !m.OnInterval() && rng.IntN(3) == 0 {
		mp := 5 + rng.Float64()*5
		d.Budget.MeanPay = &mp
		d.Budget.Reference = make([]float64, d.N())
		for i := range d.Budget.Reference {
			d.Budget.Reference[i] = 1 / float64(d.N())
		}
		d.Budget.ReportFloor = 0.01
	}
	if !m.OnInterval() && !m.Payout() && rng.IntN(3) == 0 {
		d.Budget.Clamp = 0.01
		if rng.IntN(2) == 0 {
			d.Budget.Menu, d.Budget.Step = "menus/frost menu.csv", 0
		}
	}
	if rng.IntN(2) == 0 {
		d.Contract = Contract{Buyer: "A water works", Forecaster: "A forecasting bureau", Currency: "EUR",
			Start: "2031-04-01", End: "2031-09-30", Forecasts: rng.IntN(400)}
	}
	return d
}

// TestSaveOpenRoundTrip saves random designs of every mode and opens them
// again: what comes back is what was saved, field for field.
func TestSaveOpenRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 7))
	dir := t.TempDir()
	for i := range 200 {
		m := Modes[i%len(Modes)]
		d := randomDesign(rng, m)
		if err := d.Validate(); err != nil {
			t.Fatalf("drew an invalid %s design: %v\n%+v", m, err, d)
		}
		path := filepath.Join(dir, fmt.Sprintf("d%d.toml", i))
		if err := d.Save(path, false); err != nil {
			t.Fatalf("save %s design: %v", m, err)
		}
		back, err := Load(path)
		if err != nil {
			t.Fatalf("open %s design: %v", m, err)
		}
		if !reflect.DeepEqual(back, d) {
			t.Fatalf("%s design changed in a round trip:\nsaved  %+v\nopened %+v", m, d, back)
		}
		if err := d.Save(path, false); err == nil {
			t.Fatalf("saving over %s without being asked succeeded", path)
		}
	}
}

// TestOlderPointPayoutOpens opens a file written before the point payout
// had a mode of its own (a payout with an interval) as mode point-payout.
func TestOlderPointPayoutOpens(t *testing.T) {
	d, err := Decode([]byte("version = 1\nmode = \"payout\"\nformula = \"50 - abs(x - y)\"\ninterval = [0, 100]\noutcomes = []\n[budget]\nfloor = 0\ncap = 0\nstep = 0\nunit = 0\n"))
	if err != nil {
		t.Fatal(err)
	}
	if d.Mode != ModePointPayout {
		t.Errorf("mode %q, want %q", d.Mode, ModePointPayout)
	}
}

// Every mode the workbench cycles through is described, and the
// descriptions say what the modes are (derived from their definitions).
func TestEveryModeDescribed(t *testing.T) {
	want := map[Mode][2]bool{ // on an interval, a payout
		ModeGenerator: {false, false}, ModePayout: {false, true}, ModeEmphasis: {false, false},
		ModePoint: {true, false}, ModePointPayout: {true, true},
	}
	if len(Modes) != len(want) {
		t.Fatalf("Modes has %d entries, the test knows %d", len(Modes), len(want))
	}
	for _, m := range Modes {
		if _, ok := traits(m); !ok {
			t.Fatalf("mode %q has no traits", m)
		}
		if got := [2]bool{m.OnInterval(), m.Payout()}; got != want[m] {
			t.Errorf("mode %q: on interval, payout = %v, want %v", m, got, want[m])
		}
		if title, _ := m.Title(); title == "" {
			t.Errorf("mode %q has no title for the mode row", m)
		}
	}
	if _, ok := traits("lottery"); ok {
		t.Fatal("an unknown mode has traits")
	}
	d := &Design{Version: SchemaVersion, Mode: ModeEmphasis, Labels: []string{"a", "b", "c"}, Formula: "1"}
	if err := d.Validate(); err == nil || err.Error() != "mode: emphasis designs are for 2 outcomes, the design has 3" {
		t.Fatalf("emphasis with 3 outcomes: %v", err)
	}
}

// Only an emphasis weight asks for a number of outcomes (2, by its
// definition in Schervish 1989: a weight on the probability of one event).
func TestModeOutcomes(t *testing.T) {
	for _, m := range Modes {
		want := 0
		if m == ModeEmphasis {
			want = 2
		}
		if got := m.Outcomes(); got != want {
			t.Errorf("mode %q asks for %d outcomes, want %d", m, got, want)
		}
	}
}
