package budget

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"scorewright/generator/point"
)

func TestTable(t *testing.T) {
	g, _ := point.New("-x^2", 0, 10, point.Options{})
	tb, err := FitPoint(context.Background(), g, PointSpec{Floor: 0, Cap: 100, Step: 1, Columns: 11})
	if err != nil {
		t.Fatal(err)
	}
	// Worst cell is (x, y) = (0, 10) or (10, 0), D = 100: B = 1, A = 100;
	// pay(x, y) = 100 - (y - x)^2 (derived by hand).
	if len(tb.Reports) != 11 || len(tb.Outcomes) != 11 || tb.A != 100 || tb.B != 1 {
		t.Fatalf("table %d×%d A %v B %v", len(tb.Reports), len(tb.Outcomes), tb.A, tb.B)
	}
	if tb.Pay[3][7] != 84 || tb.Pay[5][5] != 100 || tb.Pay[0][10] != 0 {
		t.Errorf("pay(3,7) %v pay(5,5) %v pay(0,10) %v", tb.Pay[3][7], tb.Pay[5][5], tb.Pay[0][10])
	}
	rc, err := tb.Recheck(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	// Exact squared error: for a mean m = x_i, E pay(x_k) - E pay(x_i) =
	// -(m - x_k)^2 whatever the weights on the columns (the report part
	// is affine in y), so the margin is B·step^2 = 1 at every item
	// (derived by hand).
	if !rc.Passed || math.Abs(rc.MinMargin-1) > 1e-9 {
		t.Errorf("re-check passed %v, smallest margin %v; want passed, 1", rc.Passed, rc.MinMargin)
	}
	var b bytes.Buffer
	if err := tb.Export(rc, PointInfo{Version: "test", Date: "2026-01-01"}).Write(&b, "csv"); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, want := range []string{"qualified counsel", "# A: 100", "# re-check: passed", "# tool: scorewright test", "\nreport x,pay if y = 0,", "\n3,91,96,99,100,99,96,91,84,75,64,51\n"} {
		if !strings.Contains(out, want) {
			t.Errorf("CSV lacks %q:\n%s", want, out)
		}
	}
	// Rounding to 5 units, down.
	tb, _ = FitPoint(context.Background(), g, PointSpec{Floor: 0, Cap: 100, Step: 2.5, Columns: 5, Unit: 5, Rounding: "down"})
	if tb.Pay[1][0] != 90 { // 100 - 2.5^2 = 93.75 -> 90
		t.Errorf("rounded pay %v", tb.Pay[1][0])
	}
	if _, err := FitPoint(context.Background(), g, PointSpec{Floor: 5, Cap: 1}); err == nil {
		t.Error("cap below floor accepted")
	}
	q, _ := point.New("ln(x)", 0, 10, point.Options{})
	if _, err := FitPoint(context.Background(), q, PointSpec{Floor: 0, Cap: 1}); err == nil {
		t.Error("infinite effort at x = 0 accepted")
	}
}

// TestRecheckCatchesCoarseRounding: on [0, 10] with squared error, cap 100
// and floor 0, pay(x, y) = 100 - (y - x)^2. Rounded to 25 units (nearest)
// with reports 0, 1, ..., 10, a forecaster sure that y = 5 gets 100 from
// x = 5 and 100 - 1 = 99 -> 100 from x = 4: a tie (derived by hand), so
// the margin at x = 5 is at most 0 and the table fails the re-check.
func TestRecheckCatchesCoarseRounding(t *testing.T) {
	g, _ := point.New("-x^2", 0, 10, point.Options{})
	f, err := FitPoint(context.Background(), g, PointSpec{Floor: 0, Cap: 100, Step: 1, Columns: 11, Unit: 25})
	if err != nil {
		t.Fatal(err)
	}
	rc, err := f.Recheck(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	if rc.Passed || rc.MinMargin > 0 || len(rc.Ties)+len(rc.Beaten) == 0 {
		t.Fatalf("coarse rounding passed: margin %v, ties %v, beaten %v", rc.MinMargin, rc.Ties, rc.Beaten)
	}
	if rc.Margins[5] > 0 {
		t.Errorf("margin at x = 5 is %v, want <= 0 (the point mass at 5 ties x = 5 with x = 4)", rc.Margins[5])
	}
	var b bytes.Buffer
	if err := f.Export(rc, PointInfo{}).Write(&b, "md"); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "> **WARNING:** this table FAILED") {
		t.Errorf("failed table carries no warning:\n%s", b.String())
	}
}

// TestWorstMixture: the worst weights with a given mean sit on at most two
// columns. diff = (3, -1, 5) on columns 0, 1, 2 at mean 1: the point mass
// at 1 gives -1, the mixture of 0 and 2 gives (3 + 5)/2 = 4, so -1; at
// mean 0.5: mixing 0 and 1 gives 1, 0 and 2 gives 0.75·3 + 0.25·5 = 3.5,
// so 1 (derived by hand).
func TestWorstMixture(t *testing.T) {
	ys := []float64{0, 1, 2}
	diff := []float64{3, -1, 5}
	for _, c := range []struct{ m, want float64 }{{1, -1}, {0.5, 1}, {0, 3}, {2, 5}, {1.5, 2}} {
		if got, _ := worstMixture(diff, ys, c.m); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("mean %g: %v, want %v", c.m, got, c.want)
		}
	}
	// Mean 1: the point mass at 1 and the mixture of 0 and 2; mean 0.5:
	// the mixtures of 0 with 1 and with 2.
	if _, n := worstMixture(diff, ys, 1); n != 2 {
		t.Errorf("mean 1: %d weightings tried, want 2", n)
	}
	if _, n := worstMixture(diff, ys, 0.5); n != 2 {
		t.Errorf("mean 0.5: %d weightings tried, want 2", n)
	}
}

// TestTableWritersCarryTheRecord: the writers a caller without version or
// date uses (WriteCSV, WriteMarkdown, encoding/json) re-check the table
// and carry the record and the caution, like every export.
func TestTableWritersCarryTheRecord(t *testing.T) {
	g, _ := point.New("-x^2", 10, 20, point.Options{})
	tb, err := FitPoint(context.Background(), g, PointSpec{Floor: 0, Cap: 40, Step: 0.5, Columns: 11, Unit: 0.1})
	if err != nil {
		t.Fatal(err)
	}
	var csv, md bytes.Buffer
	if err := tb.WriteCSV(&csv); err != nil {
		t.Fatal(err)
	}
	if err := tb.WriteMarkdown(&md); err != nil {
		t.Fatal(err)
	}
	js, err := json.Marshal(tb)
	if err != nil {
		t.Fatal(err)
	}
	for name, out := range map[string]string{"csv": csv.String(), "md": md.String(), "json": string(js)} {
		for _, want := range []string{"re-check", "qualified counsel", "mathematics, not law"} {
			if name == "json" && want == "re-check" {
				want = "recheck_verdict"
			}
			if !strings.Contains(out, want) {
				t.Errorf("%s lacks %q", name, want)
			}
		}
	}
}

// TestRoundingUpStopsAtTheCap: cap 40 rounded up to units of 3 would pay
// 42 for a perfect forecast (40/3 = 13.33 -> 14 units); rounding never
// takes a payment above the cap, so it pays the largest multiple of 3 at
// or below 40, 39 (derived by hand), and no note says the budget was
// left.
func TestRoundingUpStopsAtTheCap(t *testing.T) {
	g, _ := point.New("-x^2", 0, 10, point.Options{})
	tb, err := FitPoint(context.Background(), g, PointSpec{Floor: 0, Cap: 40, Step: 5, Columns: 3, Unit: 3, Rounding: "up"})
	if err != nil {
		t.Fatal(err)
	}
	if tb.MaxPay != 39 || tb.MinPay != 0 {
		t.Errorf("payments from %v to %v, want 0 to 39", tb.MinPay, tb.MaxPay)
	}
	if notes := strings.Join(tb.Export(nil, PointInfo{}).Meta.Notes, " "); strings.Contains(notes, "outside the budget") {
		t.Errorf("notes %q", notes)
	}
}

// A shift of the interval cannot change a cent. Squared error on
// [s, s + 1] with a menu of tenths pays, derived by hand,
// 50 - 50·(x - y)^2 = 50 - (i - j)^2/2 for report s + i/10 and outcome
// s + j/10 (the largest effort, 1, at the corners): whole and half
// units, never near a rounding boundary of cents.
func TestShiftCannotChangeACent(t *testing.T) {
	for _, s := range []float64{0, 1e6, -1e6, 1e9, 123456.789} {
		g, err := point.New("-x^2", s, s+1, point.Options{})
		if err != nil {
			t.Fatal(err)
		}
		tb, err := FitPoint(context.Background(), g, PointSpec{Floor: 0, Cap: 50, Step: 0.1, Unit: 0.01})
		if err != nil {
			t.Fatal(err)
		}
		for i := range tb.Reports {
			for j := range tb.Outcomes {
				want := 50 - float64((i-j)*(i-j))/2
				if got := tb.Pay[i][j]; math.Abs(got-want) > 1e-9 {
					t.Fatalf("shift %g: report %d outcome %d pays %.2f, want %.2f", s, i, j, got, want)
				}
			}
		}
	}
}

// Column labels have as many digits as make them distinct.
func TestLabelsDistinct(t *testing.T) {
	cases := []struct {
		vals []float64
		want []string
	}{
		{[]float64{1e6, 1e6 + 0.1, 1e6 + 0.2}, []string{"1000000", "1000000.1", "1000000.2"}},
		{[]float64{0, 0.1, 0.2, 0.30000000000000004}, []string{"0", "0.1", "0.2", "0.3"}},
		{[]float64{10, 12.5, 15}, []string{"10", "12.5", "15"}},
		{[]float64{0, 1.0 / 3, 2.0 / 3, 1}, []string{"0", "0.333333", "0.666667", "1"}},
		{[]float64{1e20, 1e20 + 1e5}, []string{"1e+20", "1.000000000000001e+20"}},
	}
	for _, c := range cases {
		got := distinct(c.vals)
		for i := range got {
			if got[i] != c.want[i] {
				t.Errorf("distinct(%v) = %q, want %q", c.vals, got, c.want)
				break
			}
		}
	}
}
