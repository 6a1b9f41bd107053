package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"scorewright"
	"strings"

	"scorewright/generator/design"
	"scorewright/internal/num"
	"scorewright/internal/textsafe"
	"scorewright/verify"
	"scorewright/verify/certify"
)

// verifyFlags are the grid options check and audit share.
type verifyFlags struct {
	resolution int
	tolerance  float64
	limit      float64
	workers    int
	samples    int
	maxPoints  int
	asJSON     bool
	// cert asks for a certificate besides the grid (nil: not offered).
	cert *certifyFlags
}

const verifyUsage = "[--resolution K] [--tolerance T] [--limit L] [--workers W] [--samples S] [--max-points M] [--json] " + certifyUsage

func addVerifyFlags(fs *flag.FlagSet) *verifyFlags {
	v := &verifyFlags{}
	intVar(fs, &v.resolution, "resolution", 0, "grid resolution K: coordinates in steps of 1/K (default depends on the number of outcomes)")
	floatVar(fs, &v.tolerance, "tolerance", verify.DefaultTolerance, "slack allowed for rounding in every comparison, times the size of the rule's values")
	floatVar(fs, &v.limit, "limit", 0, "largest effort (payment) in absolute value the boundedness check accepts (0: no limit)")
	intVar(fs, &v.workers, "workers", 0, "goroutines to use (0: all cores)")
	intVar(fs, &v.samples, "samples", 0, "random lattice points when the full grid is above --max-points (0: default)")
	intVar(fs, &v.maxPoints, "max-points", 0, "largest full grid in points; above it the check samples and says so (0: as many as memory holds)")
	fs.BoolVar(&v.asJSON, "json", false, "print JSON")
	v.cert = addCertifyFlags(fs)
	return v
}

// settings are the grid settings the flags ask for, for a rule over n
// outcomes (0 for point forecasts), refused beyond what the machine holds.
func (v *verifyFlags) settings(e *env, n int) (verify.Settings, error) {
	switch {
	case v.resolution < 0:
		return verify.Settings{}, usagef("--resolution must be positive, got %d", v.resolution)
	case !(v.tolerance > 0):
		return verify.Settings{}, usagef("--tolerance must be positive, got %g", v.tolerance)
	case v.limit < 0:
		return verify.Settings{}, usagef("--limit must be positive, got %g", v.limit)
	case v.workers < 0 || v.samples < 0 || v.maxPoints < 0:
		return verify.Settings{}, usagef("--workers, --samples and --max-points must not be negative")
	}
	s := verify.Settings{Resolution: v.resolution, Tolerance: v.tolerance, Limit: v.limit, Workers: v.workers, Samples: v.samples, MaxPoints: v.maxPoints}
	if err := verify.CheckCapacity(s, max(n, 1)); err != nil {
		return verify.Settings{}, usagef("--%v", err)
	}
	if isTerminal(e.stderr) {
		s.Progress = gridProgress(e.progressOut(), "grid")
	}
	return s, nil
}

// isTerminal reports whether w is a character device, so that progress
// goes to a person watching and never into a pipe or a log.
func isTerminal(w io.Writer) bool {
	if t, ok := w.(*textsafe.Writer); ok {
		w = t.Unwrap()
	}
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}

// interruptible returns a context cancelled by Ctrl-C, so a long grid run
// stops cleanly.
func interruptible() (context.Context, context.CancelFunc) {
	return signal.NotifyContext(context.Background(), os.Interrupt)
}

// verifyRun is what check and audit share around their own work: the
// design's rule, the settings the flags give, and a context that ^C
// cancels (stop releases it).
type verifyRun struct {
	r    *scorewright.Rule
	s    verify.Settings
	ctx  context.Context
	stop context.CancelFunc
}

// startVerify opens the design's rule and the flags' settings for it.
func startVerify(e *env, d *design.Design, vf *verifyFlags) (*verifyRun, error) {
	r, err := openRule(d)
	if err != nil {
		return nil, err
	}
	if err := refuseCertifyOnInterval(r, vf.cert); err != nil {
		return nil, err
	}
	s, err := vf.settings(e, d.N())
	if err != nil {
		return nil, err
	}
	ctx, stop := interruptible()
	return &verifyRun{r: r, s: s, ctx: ctx, stop: stop}, nil
}

// finish writes a finished check or audit: with --json out, which is
// given the certificate, otherwise the text report and then the
// certificate's lines. It is errFailed when a check failed or the
// certificate proved the rule improper.
func (v *verifyRun) finish(e *env, vf *verifyFlags, out interface{ setCertificate(*certificateJSON) }, text func(), cert *certificateJSON, failed, proved bool) error {
	if vf.asJSON {
		out.setCertificate(cert)
		if err := writeJSON(e.stdout, out); err != nil {
			return err
		}
	} else {
		text()
		printCertificate(e.stdout, cert)
	}
	if failed || proved {
		return errFailed
	}
	return nil
}

type gridJSON struct {
	Resolution int       `json:"resolution"`
	Points     int       `json:"points"`
	Tolerance  num.Float `json:"tolerance"`
	Scale      num.Float `json:"scale"`
	Slack      num.Float `json:"slack"`
	Sampled    bool      `json:"sampled"`
	Interior   int       `json:"interior"`
	Boundary   int       `json:"boundary"`
	Pairs      int64     `json:"pairs"`
	Statement  string    `json:"statement"`
}

type atJSON struct {
	Belief []num.Float `json:"belief,omitempty"`
	Report []num.Float `json:"report,omitempty"`
}

type partJSON struct {
	Count  int64     `json:"count"`
	Passed bool      `json:"passed"`
	Worst  num.Float `json:"worst"`
	At     atJSON    `json:"at"`
}

type checkJSON struct {
	Name      string     `json:"name"`
	Passed    bool       `json:"passed"`
	Worst     num.Float  `json:"worst"`
	At        atJSON     `json:"at"`
	Strict    *bool      `json:"strict,omitempty"`
	Margin    *num.Float `json:"margin,omitempty"`
	Interior  partJSON   `json:"interior"`
	Boundary  partJSON   `json:"boundary"`
	Sharpened bool       `json:"sharpened,omitempty"`
	GridWorst *num.Float `json:"grid_worst,omitempty"`
	Status    string     `json:"optimiser_status,omitempty"`
	Note      string     `json:"note"`
}

type reportJSON struct {
	Verdict verify.Verdict `json:"verdict"`
	// Kind is "grid evidence" (the grid samples, it never proves), or
	// "certified" when the verdict rests on the certificate, under
	// "certificate", and the grid checked only what it leaves.
	Kind certify.Kind `json:"kind"`
	// Basis says which of the grid and the certificate the verdict rests
	// on when they disagree (scorewright.Standing).
	Basis       string           `json:"basis,omitempty"`
	Certificate *certificateJSON `json:"certificate,omitempty"`
	Grid        gridJSON         `json:"grid"`
	Checks      []checkJSON      `json:"checks"`
	Notes       []string         `json:"notes,omitempty"`
}

func (r *reportJSON) setCertificate(c *certificateJSON) { r.Certificate = c }

func toReportJSON(r *verify.Report, st scorewright.Standing) reportJSON {
	out := reportJSON{Verdict: st.Verdict, Kind: st.Kind, Basis: st.Basis, Notes: r.Notes, Grid: gridJSON{
		Resolution: r.Grid.Resolution, Points: r.Grid.Points, Tolerance: num.Float(r.Grid.Tolerance), Scale: num.Float(r.Grid.Scale), Slack: num.Float(r.Grid.Slack()), Sampled: r.Grid.Sampled,
		Interior: r.Grid.Interior, Boundary: r.Grid.Boundary, Pairs: r.Grid.Pairs, Statement: r.Grid.String(),
	}}
	for _, c := range r.Checks {
		cj := checkJSON{Name: c.Name, Passed: c.Passed, Worst: num.Float(c.Worst), At: atJSON{num.Floats(c.Belief), num.Floats(c.Report)},
			Interior: toPartJSON(c.Interior), Boundary: toPartJSON(c.Boundary), Sharpened: c.Sharpened, Status: c.Status, Note: c.Note}
		if c.Name == verify.NameConcavity || c.Name == verify.NameProperness {
			st := c.Strict
			cj.Strict = &st
		}
		if c.Name == verify.NameProperness {
			m := num.Float(c.Margin)
			cj.Margin = &m
		}
		if c.Sharpened {
			gw := num.Float(c.GridWorst)
			cj.GridWorst = &gw
		}
		out.Checks = append(out.Checks, cj)
	}
	return out
}

func toPartJSON(p verify.Part) partJSON {
	return partJSON{Count: p.Count, Passed: p.Passed, Worst: num.Float(p.Worst), At: atJSON{num.Floats(p.Belief), num.Floats(p.Report)}}
}

// printReport writes the human form of a verification: the verdict that
// stands (st, the grid's combined with the certificate's), grid
// statement, one block per check, notes.
func printReport(w io.Writer, r *verify.Report, st scorewright.Standing) {
	fmt.Fprintf(w, "verdict: %s\n", st.Words())
	fmt.Fprintf(w, "grid:    %s\n\n", r.Grid)
	for _, c := range r.Checks {
		status := "passed"
		if !c.Passed {
			status = "FAILED"
		}
		if (c.Name == verify.NameConcavity || c.Name == verify.NameProperness) && c.Passed {
			if c.Strict {
				status += ", strict"
			} else {
				status += ", not strict"
			}
		}
		at := ""
		switch {
		case c.Belief != nil && c.Report != nil:
			b, r, ok := num.Witness(c.Belief, c.Report, !c.Passed)
			at = " at belief " + b
			if ok {
				at += " report " + r
			}
		case c.Belief != nil:
			at = " at belief " + num.Format(c.Belief)
		case c.Report != nil:
			at = " report " + num.Format(c.Report)
		}
		fmt.Fprintf(w, "%-14s %s; worst %s%s\n", c.Name, status, scorewright.WorstText(c.Worst, r.Grid), at)
		fmt.Fprintf(w, "               interior: %s; boundary: %s\n", partLine(c.Interior, r.Grid), partLine(c.Boundary, r.Grid))
		for _, line := range strings.Split(c.Note, "; ") {
			fmt.Fprintf(w, "               %s\n", line)
		}
	}
	for _, n := range r.Notes {
		fmt.Fprintf(w, "note: %s\n", n)
	}
}

// standing is the verdict that stands over a grid verdict and the
// certificate c (nil when none ran): scorewright.StandingVerdict, the one
// place the two are combined for the text, the JSON and the workbench.
func standing(grid verify.Verdict, c *certificateJSON) scorewright.Standing {
	if c == nil {
		return scorewright.StandingVerdict(grid, "", 0)
	}
	var eps float64
	if c.Epsilon != nil {
		eps = float64(*c.Epsilon)
	}
	return scorewright.StandingVerdict(grid, c.Verdict, eps)
}

func partLine(p verify.Part, g verify.Grid) string {
	if p.Count == 0 {
		return "nothing examined"
	}
	s := "passed"
	if !p.Passed {
		s = "FAILED"
	}
	return fmt.Sprintf("%s (worst %s over %d)", s, scorewright.WorstText(p.Worst, g), p.Count)
}
