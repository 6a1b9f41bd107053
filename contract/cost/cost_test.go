package cost

import (
	"math"
	"strings"
	"testing"

	"scorewright/contract/table"
)

// quadraticTable is the quadratic rule paying 150 − 75·(1 − p)² on the
// menu 0, 0.1, ..., 1 for "exceeds" (amounts derived by hand).
func quadraticTable() *table.Table {
	t := &table.Table{Kind: table.KindMoney, ValueName: "pay", Decimals: 2, Labels: []string{"exceeds", "holds"}}
	for i := 0; i <= 10; i++ {
		p := float64(i) / 10
		t.Reports = append(t.Reports, []float64{p, 1 - p})
		t.Values = append(t.Values, []float64{150 - 75*(1-p)*(1-p), 150 - 75*p*p})
	}
	return t
}

// At a base rate of 0.1 the base-rate forecaster reports row 0.1 and
// expects 0.1·89.25 + 0.9·149.25 = 143.25; a perfect one gets 150 every
// time; the worst case is 150 (derived by hand).
func TestQuadraticSeason(t *testing.T) {
	c, err := Of(quadraticTable(), Season{Forecasts: 365, BaseRate: []float64{0.1, 0.9}, Currency: "EUR"})
	if err != nil {
		t.Fatal(err)
	}
	if c.BaseRateRow != 1 {
		t.Fatalf("base-rate row %d, want 1 (0-based)", c.BaseRateRow)
	}
	for _, x := range []struct {
		name      string
		got, want float64
	}{{"base rate only", c.BaseRateOnly, 143.25}, {"perfect", c.Perfect, 150}, {"worst", c.WorstCase, 150}, {"least", c.Least, 75}} {
		if math.Abs(x.got-x.want) > 1e-9 {
			t.Errorf("%s: %v, want %v", x.name, x.got, x.want)
		}
	}
	lines := c.Lines()
	if lines[0].Season != "52286.25 EUR" || lines[1].Season != "54750.00 EUR" {
		t.Fatalf("season totals %q, %q", lines[0].Season, lines[1].Season)
	}
	if s := c.Sentence("(0.1, 0.9)"); !strings.Contains(s, "52286.25 EUR") || !strings.Contains(s, "row 2") {
		t.Fatalf("sentence %q", s)
	}
}

// Brute force: the base-rate forecaster's pick is the row with the
// largest expected pay, checked against every row for random base rates.
func TestBaseRateRowIsBest(t *testing.T) {
	tb := quadraticTable()
	for _, q := range []float64{0, 0.03, 0.26, 0.5, 0.77, 1} {
		c, err := Of(tb, Season{BaseRate: []float64{q, 1 - q}})
		if err != nil {
			t.Fatal(err)
		}
		for i, row := range tb.Values {
			if e := q*row[0] + (1-q)*row[1]; e > c.BaseRateOnly+1e-12 {
				t.Fatalf("q %v: row %d expects %v above the pick %v", q, i, e, c.BaseRateOnly)
			}
		}
		if c.Perfect < c.BaseRateOnly-1e-12 {
			t.Fatalf("q %v: perfect %v below base-rate %v", q, c.Perfect, c.BaseRateOnly)
		}
	}
}

func TestRefusals(t *testing.T) {
	tb := quadraticTable()
	if _, err := Of(tb, Season{BaseRate: []float64{1}}); err == nil {
		t.Error("short base rate accepted")
	}
	tb.Kind = "chance of the prize"
	if _, err := Of(tb, Season{BaseRate: []float64{0.5, 0.5}}); err == nil {
		t.Error("chance table accepted")
	}
}
