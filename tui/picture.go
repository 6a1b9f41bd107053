package tui

import (
	"context"
	"math"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
)

// measure is what the picture draws.
type measure int

const (
	mScores     measure = iota // score per outcome against the report (n = 2) or along a slice (n > 3)
	mPay                       // fitted payment per outcome (n = 2, when the budget fit is known)
	mGenerator                 // H(p) (n = 2, generator mode)
	mEmphasis                  // -H''(p) (n = 2, generator mode)
	mGap                       // honesty gap against the belief (n = 2 line, n = 3 ternary)
	mDivergence                // divergence from the chosen belief (n = 3 ternary, n > 3 slice)
)

// pictureSpec is everything a picture depends on besides the design.
type pictureSpec struct {
	measure measure
	belief  []float64
	active  int // n = 3: the outcome [ and ] move the belief toward; n > 3: first of the pair
	pair    int // n > 3: index into the list of pairs
	w, h    int
	hasPay  bool
}

type pictureMsg struct {
	gen, spec uint64
	text      string
}

// PicturePane draws the design live.
type PicturePane struct {
	st          Styles
	keys        KeyMap
	w, h        int
	focused     bool
	spec        pictureSpec
	specVersion uint64
	text        string
	n           int
	reward      bool
	point       bool
	hasDesign   bool
}

// NewPicturePane returns an empty picture pane.
func NewPicturePane(st Styles, keys KeyMap) PicturePane {
	return PicturePane{st: st, keys: keys, text: "drawing…"}
}

// SetSize sets the outer size of the pane.
func (p *PicturePane) SetSize(w, h int) {
	p.w, p.h = w, h
	p.spec.w, p.spec.h = max(10, w-2), max(4, h-2)
	p.specVersion++
}

// Focus and Blur mark the pane as the one keys go to.
func (p *PicturePane) Focus() { p.focused = true }

// Blur is Focus undone.
func (p *PicturePane) Blur() { p.focused = false }

// KeyHelp lists the pane's keys.
func (p PicturePane) KeyHelp() []key.Binding {
	return []key.Binding{p.keys.Measure, p.keys.BeliefDown, p.keys.BeliefUp, p.keys.Pair}
}

// measures lists what can be drawn for n outcomes.
func (p PicturePane) measures() []measure {
	switch {
	case p.point && p.reward:
		return []measure{mScores}
	case p.point:
		return []measure{mScores, mGenerator}
	case p.n == 2 && p.reward:
		return []measure{mScores, mGap}
	case p.n == 2:
		ms := []measure{mScores}
		if p.spec.hasPay {
			ms = append(ms, mPay)
		}
		return append(ms, mGenerator, mEmphasis, mGap)
	case p.n == 3:
		return []measure{mGap, mDivergence}
	default:
		return []measure{mScores, mDivergence}
	}
}

// setDesign tells the pane the outcome count and orientation of the
// compiled design, keeping the measure and belief when they still fit.
func (p *PicturePane) setDesign(n int, reward, hasPay, point bool) {
	if point {
		n = 1 // one number: where the report mark sits, as a share of the interval
	}
	p.point = point
	if n != p.n || len(p.spec.belief) != n {
		p.spec.belief = make([]float64, n)
		for i := range p.spec.belief {
			p.spec.belief[i] = 1 / float64(n)
		}
		if n == 2 {
			p.spec.belief[0], p.spec.belief[1] = 0.3, 0.7
		}
		if n == 1 {
			p.spec.belief[0] = 0.3
		}
		p.spec.active, p.spec.pair = 0, 0
	}
	p.n, p.reward, p.spec.hasPay, p.hasDesign = n, reward, hasPay, true
	ok := false
	for _, m := range p.measures() {
		ok = ok || m == p.spec.measure
	}
	if !ok {
		p.spec.measure = p.measures()[0]
	}
	p.specVersion++
}

// Update handles the pane's keys. changed says the picture must be redrawn.
func (p PicturePane) Update(msg tea.Msg) (PicturePane, bool) {
	km, ok := msg.(tea.KeyMsg)
	if !ok || !p.hasDesign {
		return p, false
	}
	switch {
	case key.Matches(km, p.keys.Measure):
		ms := p.measures()
		for i, m := range ms {
			if m == p.spec.measure {
				p.spec.measure = ms[(i+1)%len(ms)]
				break
			}
		}
	case key.Matches(km, p.keys.BeliefUp), key.Matches(km, p.keys.BeliefDown):
		d := 0.05
		if key.Matches(km, p.keys.BeliefDown) {
			d = -d
		}
		if p.point {
			p.spec.belief[0] = math.Min(1, math.Max(0, math.Round((p.spec.belief[0]+d)*100)/100))
		} else {
			p.spec.belief = shiftBelief(p.spec.belief, p.spec.active, d)
		}
	case key.Matches(km, p.keys.Pair):
		if p.n == 3 {
			p.spec.active = (p.spec.active + 1) % 3
		} else if p.n > 3 {
			p.spec.pair = (p.spec.pair + 1) % len(pairs(p.n))
			p.spec.active = pairs(p.n)[p.spec.pair][0]
		} else {
			return p, false
		}
	default:
		return p, false
	}
	p.specVersion++
	return p, true
}

// shiftBelief moves mass d to (or from) outcome k, taking it from (or
// giving it to) the others in proportion, keeping every entry within
// [0.01, 0.99] so the belief stays inside the simplex.
func shiftBelief(q []float64, k int, d float64) []float64 {
	out := append([]float64(nil), q...)
	nv := math.Min(0.99, math.Max(0.01, q[k]+d))
	rest := 1 - q[k]
	for i := range out {
		if i == k {
			out[i] = nv
		} else if rest > 0 {
			out[i] = q[i] / rest * (1 - nv)
		} else {
			out[i] = (1 - nv) / float64(len(q)-1)
		}
	}
	return out
}

// pairs lists the outcome pairs a slice can run along.
func pairs(n int) [][2]int {
	var ps [][2]int
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			ps = append(ps, [2]int{i, j})
		}
	}
	return ps
}

// request returns the command drawing the picture for c, or nil.
func (p PicturePane) request(ctx context.Context, gen uint64, c *compiled, pay func(float64) float64) tea.Cmd {
	if !c.ok() || p.w == 0 {
		return nil
	}
	spec, version, st := p.spec, p.specVersion, p.st
	spec.belief = append([]float64(nil), spec.belief...)
	return func() tea.Msg {
		return pictureMsg{gen: gen, spec: version, text: renderPicture(ctx, st, c, spec, pay)}
	}
}

// noDesign says why there is nothing to draw.
func (p *PicturePane) noDesign(why string) {
	p.hasDesign = false
	p.text = p.st.Dim.Render(why)
	p.specVersion++
}

// show takes a drawn picture if it is for the current spec.
func (p *PicturePane) show(m pictureMsg) {
	if m.spec == p.specVersion {
		p.text = m.text
	}
}

// View draws the pane.
func (p PicturePane) View() string {
	title := "Picture"
	if p.hasDesign {
		title += " · " + p.measureName()
	}
	return paneFrame(p.st, title, p.focused, p.w, p.h, p.text)
}

func (p PicturePane) measureName() string {
	if p.point {
		switch {
		case p.reward:
			return "pay by report"
		case p.spec.measure == mGenerator:
			return "generator phi(x)"
		}
		return "effort by report"
	}
	switch p.spec.measure {
	case mScores:
		if p.n > 3 {
			return "slice"
		}
		if p.reward {
			return "pay per outcome"
		}
		return "effort per outcome"
	case mPay:
		return "pay per outcome"
	case mGenerator:
		return "generator H"
	case mEmphasis:
		return "emphasis weight"
	case mGap:
		return "honesty gap"
	default:
		if p.n > 3 {
			return "slice, divergence"
		}
		return "divergence from belief"
	}
}
