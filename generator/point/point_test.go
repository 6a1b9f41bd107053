package point

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"strings"
	"testing"
)

func TestDivergenceClosedForms(t *testing.T) {
	cases := []struct {
		name, src string
		lo, hi    float64
		want      func(y, x float64) float64
		tol       float64
	}{
		// Squared error (Gneiting 2011, JASA 106:746-762).
		{"squared", "-x^2", -5, 5, func(y, x float64) float64 { return (y - x) * (y - x) }, 1e-12},
		// QLIKE, Patton (2011) J. Econometrics 160:246-256, b = -2: y/x - ln(y/x) - 1.
		{"qlike", "ln(x)", 0.1, 10, func(y, x float64) float64 { return y/x - math.Log(y/x) - 1 }, 1e-12},
		// Patton (2011) family with b = 1: (y^3 - x^3)/6 - x^2/2 (y - x).
		{"patton", "b = 1\n-x^(b+2) / ((b+1)*(b+2))", 0, 4, func(y, x float64) float64 { return (y*y*y-x*x*x)/6 - x*x/2*(y-x) }, 1e-12},
		// Exponential Bregman family, Patton (2020) JBES 38:796-809, a = 0.5:
		// (2/a^2)(e^{ay} - e^{ax}) - (2/a) e^{ax} (y - x).
		{"exponential", "a = 0.5\n-2*exp(a*x) / a^2", -3, 3, func(y, x float64) float64 {
			a := 0.5
			return 2/(a*a)*(math.Exp(a*y)-math.Exp(a*x)) - 2/a*math.Exp(a*x)*(y-x)
		}, 1e-12},
	}
	for _, tc := range cases {
		g, err := New(tc.src, tc.lo, tc.hi, Options{})
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		ev := g.NewEvaluator()
		for i := 0; i <= 8; i++ {
			for j := 0; j <= 8; j++ {
				x := tc.lo + (tc.hi-tc.lo)*float64(i)/8
				y := tc.lo + (tc.hi-tc.lo)*float64(j)/8
				got, want := ev.Divergence(y, x), tc.want(y, x)
				if math.Abs(got-want) > tc.tol*math.Max(1, math.Abs(want)) {
					t.Errorf("%s: D(%g, %g) = %.15g, want %.15g", tc.name, y, x, got, want)
				}
			}
		}
	}
}

func TestDerivativesAgainstFiniteDifferences(t *testing.T) {
	// Central differences are an independent check of the exact derivatives.
	g, err := New("ln(x) - x^3/7 + exp(-x)", 0.5, 3, Options{})
	if err != nil {
		t.Fatal(err)
	}
	ev := g.NewEvaluator()
	for _, x := range []float64{0.6, 1, 1.7, 2.9} {
		_, d1, d2 := ev.Derivatives(x)
		const h = 1e-4
		f := ev.Phi
		fd1 := (f(x+h) - f(x-h)) / (2 * h)
		fd2 := (f(x+h) - 2*f(x) + f(x-h)) / (h * h)
		if math.Abs(d1-fd1) > 1e-7 || math.Abs(d2-fd2) > 1e-4 {
			t.Errorf("x = %g: phi' %v (fd %v), phi'' %v (fd %v)", x, d1, fd1, d2, fd2)
		}
	}
}

func TestMeanIsBest(t *testing.T) {
	// E D(Y, x) = D(m, x) + phi(m) - E phi(Y) (derived by hand from the
	// definition), so with squared error the expected effort at report x
	// is (x - m)^2 + Var(Y).
	g, _ := New("-x^2", 0, 10, Options{})
	ev := g.NewEvaluator()
	ys, ws := []float64{1, 4, 9}, []float64{0.5, 0.3, 0.2}
	m := Mean(ys, ws)
	if math.Abs(m-3.5) > 1e-15 {
		t.Fatalf("mean %v", m)
	}
	vr := 0.5*2.5*2.5 + 0.3*0.5*0.5 + 0.2*5.5*5.5
	for _, x := range []float64{0, 2, 3.5, 5, 10} {
		if got, want := ev.Expected(x, ys, ws), (x-m)*(x-m)+vr; math.Abs(got-want) > 1e-12 {
			t.Errorf("E D(Y, %g) = %v, want %v", x, got, want)
		}
	}
}

func TestTable(t *testing.T) {
	g, _ := New("-x^2", 0, 10, Options{})
	tb, err := g.BuildTable(context.Background(), TableSpec{Floor: 0, Cap: 100, Step: 1, Columns: 11})
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
	if err := tb.Export(rc, Info{Version: "test", Date: "2026-01-01"}).Write(&b, "csv"); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, want := range []string{"qualified counsel", "# A: 100", "# re-check: passed", "# tool: scorewright test", "\nreport x,pay if y = 0,", "\n3,91,96,99,100,99,96,91,84,75,64,51\n"} {
		if !strings.Contains(out, want) {
			t.Errorf("CSV lacks %q:\n%s", want, out)
		}
	}
	// Rounding to 5 units, down.
	tb, _ = g.BuildTable(context.Background(), TableSpec{Floor: 0, Cap: 100, Step: 2.5, Columns: 5, Unit: 5, Rounding: "down"})
	if tb.Pay[1][0] != 90 { // 100 - 2.5^2 = 93.75 -> 90
		t.Errorf("rounded pay %v", tb.Pay[1][0])
	}
	if _, err := g.BuildTable(context.Background(), TableSpec{Floor: 5, Cap: 1}); err == nil {
		t.Error("cap below floor accepted")
	}
	q, _ := New("ln(x)", 0, 10, Options{})
	if _, err := q.BuildTable(context.Background(), TableSpec{Floor: 0, Cap: 1}); err == nil {
		t.Error("infinite effort at x = 0 accepted")
	}
}

// TestRecheckCatchesCoarseRounding: on [0, 10] with squared error, cap 100
// and floor 0, pay(x, y) = 100 - (y - x)^2. Rounded to 25 units (nearest)
// with reports 0, 1, ..., 10, a forecaster sure that y = 5 gets 100 from
// x = 5 and 100 - 1 = 99 -> 100 from x = 4: a tie (derived by hand), so
// the margin at x = 5 is at most 0 and the table fails the re-check.
func TestRecheckCatchesCoarseRounding(t *testing.T) {
	g, _ := New("-x^2", 0, 10, Options{})
	f, err := g.BuildTable(context.Background(), TableSpec{Floor: 0, Cap: 100, Step: 1, Columns: 11, Unit: 25})
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
	if err := f.Export(rc, Info{}).Write(&b, "md"); err != nil {
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
	g, _ := New("-x^2", 10, 20, Options{})
	tb, err := g.BuildTable(context.Background(), TableSpec{Floor: 0, Cap: 40, Step: 0.5, Columns: 11, Unit: 0.1})
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

// TestRoundingUpPastTheCap: cap 40 rounded up to units of 3 pays 42 for a
// perfect forecast (40/3 = 13.33 -> 14 units; derived by hand), and the
// record says the budget was left.
func TestRoundingUpPastTheCap(t *testing.T) {
	g, _ := New("-x^2", 0, 10, Options{})
	tb, err := g.BuildTable(context.Background(), TableSpec{Floor: 0, Cap: 40, Step: 5, Columns: 3, Unit: 3, Rounding: "up"})
	if err != nil {
		t.Fatal(err)
	}
	if tb.MaxPay != 42 {
		t.Errorf("largest payment %v, want 42", tb.MaxPay)
	}
	notes := strings.Join(tb.Export(nil, Info{}).Meta.Notes, " ")
	if !strings.Contains(notes, "outside the budget: from 0 to 42") {
		t.Errorf("notes %q", notes)
	}
}
