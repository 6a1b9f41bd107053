package scorewright_test

import (
	"context"
	"fmt"
	"strings"
	"testing"
	"time"

	"scorewright"
	"scorewright/contract/backtest"
	"scorewright/contract/backtest/history"
	"scorewright/contract/risk"
	"scorewright/generator/design"
	"scorewright/internal/pool"
	"scorewright/internal/pool/pooltest"
	"scorewright/verify"
	"scorewright/verify/certify"
)

// openFor opens d or fails the test.
func openFor(t *testing.T, d *design.Design) *scorewright.Rule {
	t.Helper()
	d.Version = design.SchemaVersion
	r, err := scorewright.Open(d)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// Every long job the engine runs for the commands and the workbench
// reports through pool.Progress: Done never falls and ends at its Total
// on a Last step, in the job's unit. (The quadratic rule and payout are
// proper, Brier 1950, so their certificates prove the whole simplex.)
func TestEveryJobReportsMonotoneProgress(t *testing.T) {
	ctx := context.Background()
	two := []string{"frost", "clear"}
	budget := design.Budget{Floor: 0, Cap: 100, Step: 0.1, Unit: 1}
	quad := openFor(t, &design.Design{Mode: design.ModeGenerator, Labels: two, Formula: "1 - sum(p^2)", Budget: budget})
	sph := openFor(t, &design.Design{Mode: design.ModeGenerator, Labels: []string{"a", "b", "c"}, Formula: "-sqrt(sum(p^2))"})
	payQuad := openFor(t, &design.Design{Mode: design.ModePayout, Labels: two, Formula: "2*p[y] - sum(p^2)"})
	pt := openFor(t, &design.Design{Mode: design.ModePoint, Formula: "-x^2", Interval: []float64{0, 40}})
	ptPay := openFor(t, &design.Design{Mode: design.ModePointPayout, Formula: "50 - (x - y)^2", Interval: []float64{0, 10}})
	grid := verify.Settings{Resolution: 60}
	cert := func(r *scorewright.Rule) func(pool.Progress) error {
		return func(p pool.Progress) error {
			res, err := r.Certify(ctx, certify.Settings{Deadline: time.Minute, Progress: p})
			if err == nil && res.Share != 1 {
				t.Errorf("the certificate proved only %g of the simplex", res.Share)
			}
			return err
		}
	}
	jobs := []struct {
		name string
		unit pool.Unit
		run  func(pool.Progress) error
	}{
		{"grid check", pool.UnitWork, func(p pool.Progress) error { g := grid; g.Progress = p; _, err := quad.Check(ctx, g); return err }},
		{"audit", pool.UnitWork, func(p pool.Progress) error { g := grid; g.Progress = p; _, err := payQuad.Audit(ctx, g); return err }},
		{"point check", pool.UnitWork, func(p pool.Progress) error { g := grid; g.Progress = p; _, err := pt.Check(ctx, g); return err }},
		{"point audit", pool.UnitWork, func(p pool.Progress) error { g := grid; g.Progress = p; _, err := ptPay.Audit(ctx, g); return err }},
		{"certificate, separable", pool.UnitShare, cert(quad)},
		{"certificate, box search", pool.UnitShare, cert(sph)},
		{"certificate, payout", pool.UnitShare, cert(payQuad)},
		{"table re-check", pool.UnitWork, func(p pool.Progress) error {
			_, err := quad.TableWith(ctx, nil, scorewright.TableSettings{Progress: p})
			return err
		}},
		{"budget proposals", pool.UnitWork, func(p pool.Progress) error { _, err := quad.Propose(ctx, p); return err }},
		{"distortion curve", pool.UnitWork, func(p pool.Progress) error {
			terms, err := quad.FitSteps(budget)
			if err != nil {
				return err
			}
			u, err := risk.ParseUtility("crra:2")
			if err != nil {
				return err
			}
			d, err := quad.Distort(terms, u, 50)
			if err != nil {
				return err
			}
			_, _, _, err = d.Curve(ctx, p)
			return err
		}},
		{"backtest of a file", pool.UnitBytes, func(p pool.Progress) error { return replay(quad, budget, p, int64(len(frostNights))) }},
		{"backtest of a pipe", pool.UnitBytes, func(p pool.Progress) error { return replay(quad, budget, p, 0) }},
	}
	// A payout certificate that runs out of time turns from argument to
	// argument (the spherical payout at n = 3 takes longer than a second):
	// its boxes count on across them.
	sphPay := openFor(t, &design.Design{Mode: design.ModePayout, Labels: []string{"a", "b", "c"}, Formula: "10*p[y]/sqrt(sum(p^2))"})
	var rec pooltest.Recorder
	if _, err := sphPay.Certify(ctx, certify.Settings{Deadline: time.Second, Progress: rec.Progress}); err != nil {
		t.Error(err)
	} else if err := rec.Monotone(pool.UnitShare); err != nil {
		t.Errorf("payout certificate out of time: %v", err)
	}
	for _, j := range jobs {
		var rec pooltest.Recorder
		if err := j.run(rec.Progress); err != nil {
			t.Errorf("%s: %v", j.name, err)
			continue
		}
		if err := rec.Check(j.unit); err != nil {
			t.Errorf("%s: %v", j.name, err)
		}
	}
}

// frostNights is a history of four forecasts, one of them bad (a
// probability above 1), so that the backtest skips a row.
const frostNights = "forecaster,question,outcome,frost,clear\n" +
	"Alder,night 1,frost,0.7,0.3\n" +
	"Birch,night 1,frost,1.5,-0.5\n" +
	"Alder,night 2,clear,0.7,0.3\n" +
	"Birch,night 2,clear,0.5,0.5\n"

// replay backtests frostNights under r's fitted formula, telling the
// backtest the input's size (0: unknown).
func replay(r *scorewright.Rule, b design.Budget, p pool.Progress, size int64) error {
	terms, err := r.FitFormula(b, 0)
	if err != nil {
		return err
	}
	h, err := history.NewReader(strings.NewReader(frostNights), r.Design().Labels, history.Options{})
	if err != nil {
		return err
	}
	var last pool.Step
	res, err := scorewright.Backtest(context.Background(), h, []backtest.Scheme{scorewright.Scheme("quadratic", terms)},
		backtest.Options{Progress: func(s pool.Step) { last = s; p(s) }, Size: size})
	if err != nil {
		return err
	}
	defer res.Close()
	if last.Items != 4 || last.Skipped != 1 || last.Done != float64(len(frostNights)) {
		return fmt.Errorf("last step %+v, want 4 rows, 1 skipped, %d bytes", last, len(frostNights))
	}
	return nil
}
