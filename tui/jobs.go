package tui

import (
	"context"

	tea "github.com/charmbracelet/bubbletea"

	"scorewright"
	"scorewright/generator/design"
	"scorewright/internal/pool"
	"scorewright/verify"
	"scorewright/verify/certify"
)

// Checker runs the checks of a design in the background. It must return
// soon after ctx is cancelled and may call progress from any goroutine.
type Checker func(ctx context.Context, d *design.Design, s Settings, progress pool.Progress) (*CheckReport, error)

// CheckReport is what the checks pane shows: a verdict with its grid and
// tolerance, and one row per check.
type CheckReport struct {
	Verdict    string
	Resolution int
	Points     int64
	// Sampled is true when the points are a random sample of the lattice,
	// not the full grid; the pane says which.
	Sampled   bool
	Tolerance float64
	Rows      []CheckRow
	Notes     []string
	// Certificate is what the interval certificate proved; nil when none
	// was run.
	Certificate *CertificateView
}

// Standing is the verdict that stands over the grid's and the
// certificate's, with its kind: scorewright.StandingVerdict, the one place
// the command and the workbench combine the two.
func (r *CheckReport) Standing() scorewright.Standing {
	var cert verify.Verdict
	if r.Certificate != nil {
		cert = verify.Verdict(r.Certificate.Verdict)
	}
	return scorewright.StandingVerdict(verify.Verdict(r.Verdict), cert, 0)
}

// Final is the verdict that stands (Standing).
func (r *CheckReport) Final() string { return string(r.Standing().Verdict) }

// Kind is the verdict's kind in words: "certified" or "grid evidence".
func (r *CheckReport) Kind() string { return string(r.Standing().Kind) }

// Certified reports whether the verdict rests on the certificate.
func (r *CheckReport) Certified() bool { return r.Standing().Kind == certify.Certified }

// CheckRow is one check: pass or fail and its worst witness.
type CheckRow struct {
	Name   string
	Passed bool
	// Worst is the worst value found and Belief/Report where it was found.
	Worst          float64
	Belief, Report []float64
	Note           string
}

// Fitter fits a design to its budget: the payment table preview and the
// re-check of the report menu. It must return soon after ctx is cancelled
// and may call progress (beliefs re-checked of the total) from any
// goroutine.
type Fitter func(ctx context.Context, d *design.Design, progress pool.Progress) (*TableView, error)

// TableView is the budget pane's content.
type TableView struct {
	// Header and Rows are the payment table preview, as text cells.
	Header []string
	Rows   [][]string
	// Margins[i] is row i's re-check margin and Marks[i] says "TIE" or
	// "BEATEN" when the row fails it ("" otherwise); nil when unknown.
	Margins, Marks []string
	// Passed and MinMargin are the menu re-check: whether every menu item
	// is the strict best report for a forecaster who believes it, and the
	// smallest incentive margin in currency.
	Passed    bool
	MinMargin float64
	// NoRecheck, when set, says why there is no menu re-check.
	NoRecheck string
	Notes     []string
	// Pay turns an effort into a payment; nil when not known.
	Pay func(effort float64) float64

	lines []string // the rows laid out as text, by layoutTable
}

// Exporter writes payment tables.
type Exporter interface {
	// Formats lists the formats Export takes for d, the first being the
	// default.
	Formats(d *design.Design) []string
	// Export writes the table of d as req asks and returns the files
	// written.
	Export(ctx context.Context, d *design.Design, req ExportRequest) ([]string, error)
}

// ExportRequest is what the export dialog asks for.
type ExportRequest struct {
	// Format is one of Exporter.Formats; Path the file to write.
	Format, Path string
	// Overwrite allows replacing an existing file.
	Overwrite bool
	// Lottery pays a chance of winning one prize instead of money
	// (contract/lottery, as `scorewright table --lottery`).
	Lottery bool
	// Certificate is the statement of the interval certificate the
	// checks ran on this very design ("" when none ran or the design
	// changed since); VerdictKind is the record's verdict kind it makes
	// (scorewright.RecordedKind: "certified strictly proper", "certified
	// proper", ...), as `scorewright table --certify` writes it.
	Certificate string
	VerdictKind string
}

// Messages answering the workbench's background work. Each carries the
// generation number of the design it was computed for.
type (
	compiledMsg struct {
		gen uint64
		c   *compiled
	}
	debounceMsg      struct{ gen uint64 }
	checkProgressMsg struct {
		gen         uint64
		done, total float64
	}
	checkDoneMsg struct {
		gen    uint64
		report *CheckReport
		err    error
	}
	fitMsg struct {
		gen   uint64
		table *TableView
		err   error
	}
	fitProgressMsg struct {
		gen         uint64
		done, total float64
	}
)

// streamMsg is one message of a background job that sends several; next
// listens for the one after it. The receiver drops next when the job is
// stale, which lets the job's goroutine finish unheard.
type streamMsg struct {
	msg  tea.Msg
	next tea.Cmd
}

// runStream runs work in its own goroutine and returns a command that
// answers with the first message work sends, wrapped in a streamMsg.
// Progress sends (mustArrive false) are dropped while the previous one is
// unread; the final send gives up once ctx is cancelled, so an abandoned
// job never blocks.
func runStream(ctx context.Context, work func(send func(m tea.Msg, mustArrive bool))) tea.Cmd {
	return func() tea.Msg {
		ch := make(chan tea.Msg, 1)
		send := func(m tea.Msg, mustArrive bool) {
			if !mustArrive {
				select {
				case ch <- m:
				default:
				}
				return
			}
			select {
			case ch <- m:
			case <-ctx.Done():
			}
		}
		go func() {
			defer close(ch)
			work(send)
		}()
		return listen(ch)()
	}
}

// listen waits for the next message of a stream.
func listen(ch <-chan tea.Msg) tea.Cmd {
	return func() tea.Msg {
		m, ok := <-ch
		if !ok {
			return nil
		}
		return streamMsg{msg: m, next: listen(ch)}
	}
}

// checkCmd runs checker on d under ctx, reporting progress.
func checkCmd(ctx context.Context, gen uint64, d *design.Design, s Settings, checker Checker) tea.Cmd {
	return runStream(ctx, func(send func(tea.Msg, bool)) {
		rep, err := checker(ctx, d, s, func(p pool.Step) {
			send(checkProgressMsg{gen: gen, done: p.Done, total: p.Total}, false)
		})
		send(checkDoneMsg{gen: gen, report: rep, err: err}, true)
	})
}

// fitCmd fits d to its budget, reporting the re-check's progress.
func fitCmd(ctx context.Context, gen uint64, d *design.Design, fitter Fitter) tea.Cmd {
	return runStream(ctx, func(send func(tea.Msg, bool)) {
		t, err := fitter(ctx, d, func(p pool.Step) {
			send(fitProgressMsg{gen: gen, done: p.Done, total: p.Total}, false)
		})
		if t != nil {
			layoutTable(t)
		}
		send(fitMsg{gen: gen, table: t, err: err}, true)
	})
}

// compileCmd compiles d (a private copy) for generation gen.
func compileCmd(gen uint64, d *design.Design) tea.Cmd {
	return func() tea.Msg { return compiledMsg{gen: gen, c: compileDesign(d)} }
}
