package tui

import (
	"fmt"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/bubbles/progress"

	"scorewright"
	"scorewright/verify"
)

// ChecksPane shows the checks of the current design and their progress.
type ChecksPane struct {
	st          Styles
	keys        KeyMap
	w, h        int
	focused     bool
	available   bool
	bar         progress.Model
	running     bool
	waiting     bool // an edit is waiting out the debounce
	done, total float64
	report      *CheckReport
	err         error
	stale       bool // the report is for an earlier design
	blocked     string
	// proving is the certificate running after the grid, certDone of
	// certTotal its share proved.
	proving             bool
	certDone, certTotal float64
	// sel is the selected entry: a check row, or len(Rows) for the
	// verdict and notes; detail shows its full text, scrolled by scroll.
	sel    int
	detail bool
	scroll int
}

// NewChecksPane returns a checks pane; available says whether the build
// has a checker.
func NewChecksPane(st Styles, keys KeyMap, available bool) ChecksPane {
	return ChecksPane{st: st, keys: keys, available: available, bar: newBar()}
}

// newBar is the progress bar of background work in a pane.
func newBar() progress.Model {
	return progress.New(progress.WithFillCharacters('█', '░'), progress.WithoutPercentage(), progress.WithSolidFill("#6FD3B5"))
}

// SetSize sets the outer size of the pane.
func (p *ChecksPane) SetSize(w, h int) {
	p.w, p.h = w, h
	p.bar.Width = max(10, w-16)
}

// Focus marks the pane as the one keys go to.
func (p *ChecksPane) Focus() { p.focused = true }

// Blur is Focus undone.
func (p *ChecksPane) Blur() { p.focused = false }

// KeyHelp lists the pane's keys.
func (p ChecksPane) KeyHelp() []key.Binding {
	k := p.keys
	as := func(b key.Binding, desc string) key.Binding {
		return key.NewBinding(key.WithKeys(b.Keys()...), key.WithHelp(b.Help().Key, desc))
	}
	if p.detail {
		scroll := key.NewBinding(key.WithKeys(append(k.Up.Keys(), k.Down.Keys()...)...), key.WithHelp(k.Up.Help().Key+"/"+k.Down.Help().Key, "scroll"))
		return []key.Binding{scroll, as(k.Less, "previous check"), as(k.More, "next check"), as(k.Leave, "back to the list")}
	}
	return []key.Binding{k.Up, k.Down, as(k.Edit, "full text"), k.Rerun}
}

// edited marks the shown report as stale and waits for the debounce.
func (p *ChecksPane) edited() {
	p.stale = p.report != nil || p.err != nil
	p.waiting, p.running, p.blocked, p.proving = true, false, "", false
}

// certifying marks the certificate as begun for the shown report.
func (p *ChecksPane) certifying() { p.proving, p.certDone, p.certTotal = true, 0, 0 }

// certified puts the certificate into the shown report, and with it the
// verdict that stands and its kind (CheckReport.Standing).
func (p *ChecksPane) certified(c *CertificateView) {
	p.proving = false
	if r := p.report; r != nil {
		r.Certificate = c
	}
}

// block says the checks cannot run for the current design, and why.
func (p *ChecksPane) block(why string) {
	p.waiting, p.running, p.blocked = false, false, why
}

// started marks a run as begun.
func (p *ChecksPane) started() {
	p.waiting, p.running, p.done, p.total, p.blocked = false, true, 0, 0, ""
}

func (p *ChecksPane) progressed(done, total float64) { p.done, p.total = done, total }

func (p *ChecksPane) finished(r *CheckReport, err error) {
	p.running, p.report, p.err, p.stale, p.proving = false, r, err, false, false
	if r != nil {
		p.sel = min(p.sel, len(r.Rows))
	}
}

// proof is what an export records of the certificate: its statement when
// the report is for the design as it stands (no edit since, no run in
// progress), and the verdict kind it makes (scorewright.RecordedKind,
// as `scorewright table --certify` records it).
func (p ChecksPane) proof() (statement, kind string) {
	if p.report == nil || p.stale || p.waiting || p.running || p.blocked != "" {
		return "", ""
	}
	c := p.report.Certificate
	if c == nil {
		return "", ""
	}
	return c.Statement, scorewright.RecordedKind(verify.Verdict(p.report.Verdict), verify.Verdict(c.Verdict), c.Epsilon)
}

// Running reports whether a check is in progress.
func (p ChecksPane) Running() bool { return p.running }

// Report is the last finished report (nil if none).
func (p ChecksPane) Report() *CheckReport { return p.report }

// View draws the pane.
func (p ChecksPane) View() string {
	st := p.st
	var lines []string
	if !p.available {
		lines = append(lines,
			"The checks (package verify) are not part",
			"of this build yet. The picture is a",
			"drawing, not a verdict.")
		return paneFrame(st, "Checks", p.focused, p.w, p.h, strings.Join(lines, "\n"))
	}
	switch {
	case p.blocked != "":
		lines = append(lines, st.Dim.Render("not run: "+p.blocked))
	case p.running:
		pct := 0.0
		if p.total > 0 {
			pct = p.done / p.total
		}
		lines = append(lines, p.bar.ViewAs(pct)+fmt.Sprintf(" %3.0f%% checking", pct*100))
	case p.waiting:
		lines = append(lines, st.Dim.Render("design changed; checking shortly…"))
	}
	if p.err != nil {
		lines = append(lines, strings.Split(st.Error.Width(max(10, p.w-2)).Render("✗ "+p.err.Error()), "\n")...)
	}
	if r := p.report; r != nil {
		verdict := r.Final()
		vs := st.Pass
		if strings.Contains(verdict, "improper") || !allPassed(r) {
			vs = st.Fail
		}
		head := "Verdict " + vs.Render(verdict) + st.Dim.Render(" ("+r.Kind()+")")
		if p.stale {
			head = st.Dim.Render("previous design's verdict: " + verdict)
		}
		lines = append(lines, head)
		if p.proving && !p.stale {
			pct := 0.0
			if p.certTotal > 0 {
				pct = p.certDone / p.certTotal
			}
			lines = append(lines, p.bar.ViewAs(pct)+fmt.Sprintf(" %3.0f%% proving", pct*100))
		}
		// The certificate right under the grid verdict, so that a small
		// terminal shows both kinds of verdict before any detail.
		lines = append(lines, certificateLines(st, r.Certificate)...)
		lines = append(lines, st.Dim.Render(gridLine(r)))
		if p.detail {
			return paneFrame(st, "Checks · full text", p.focused, p.w, p.h, strings.Join(p.detailView(), "\n"))
		}
		lines = append(lines, p.rowLines(r, p.h-2-len(lines))...)
	} else if !p.running && p.err == nil && p.blocked == "" && !p.waiting {
		lines = append(lines, st.Dim.Render("no checks run yet"))
	}
	return paneFrame(st, "Checks", p.focused, p.w, p.h, strings.Join(lines, "\n"))
}

func allPassed(r *CheckReport) bool {
	for _, c := range r.Rows {
		if !c.Passed {
			return false
		}
	}
	return true
}

// gridLine states the grid a verdict stands on: full or sampled, its
// step, points and tolerance.
func gridLine(r *CheckReport) string {
	kind := "full grid"
	if r.Sampled {
		kind = "sampled grid"
	}
	return fmt.Sprintf("%s, step 1/%d, %d points, tol %g", kind, r.Resolution, r.Points, r.Tolerance)
}
