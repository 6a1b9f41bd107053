package tui

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/NimbleMarkets/ntcharts/canvas"
	"github.com/NimbleMarkets/ntcharts/linechart"
	"github.com/charmbracelet/lipgloss"
)

// series is one line of a chart: y values at evenly spaced x.
type series struct {
	name string
	y    []float64
}

// seriesMarks are the runes that tell lines apart without colour.
var seriesMarks = [...]rune{'•', '+', '×', '∘'}

// fmtTick formats an axis tick compactly.
func fmtTick(v float64) string {
	a := math.Abs(v)
	switch {
	case v == 0:
		return "0"
	case a >= 1000 || a < 0.01:
		return fmt.Sprintf("%.1e", v)
	case a >= 100:
		return fmt.Sprintf("%.0f", v)
	case a >= 10:
		return fmt.Sprintf("%.1f", v)
	default:
		return fmt.Sprintf("%.2f", v)
	}
}

// yRange returns the range to draw: the finite values, with a heavy tail
// (a rule that grows without bound at the edge) cut at the 95th
// percentile so the rest stays readable. clipped says whether it was cut.
func yRange(ss []series) (lo, hi float64, clipped bool) {
	var vals []float64
	for _, s := range ss {
		for _, v := range s.y {
			if !math.IsNaN(v) && !math.IsInf(v, 0) {
				vals = append(vals, v)
			}
		}
	}
	if len(vals) == 0 {
		return 0, 1, false
	}
	sort.Float64s(vals)
	lo, hi = vals[0], vals[len(vals)-1]
	qlo, qhi := vals[len(vals)*5/100], vals[len(vals)*95/100]
	if span := qhi - qlo; span > 0 {
		if hi-qhi > 3*span {
			hi, clipped = qhi+span*0.1, true
		}
		if qlo-lo > 3*span {
			lo, clipped = qlo-span*0.1, true
		}
	}
	if hi-lo < 1e-12*math.Max(1, math.Abs(hi)) {
		lo, hi = lo-0.5, hi+0.5
	}
	step := niceStep((hi - lo) / 4)
	return math.Floor(lo/step) * step, math.Ceil(hi/step) * step, clipped
}

// niceStep rounds s up to 1, 2 or 5 times a power of ten.
func niceStep(s float64) float64 {
	if !(s > 0) || math.IsInf(s, 0) {
		return 1
	}
	e := math.Pow(10, math.Floor(math.Log10(s)))
	for _, f := range []float64{1, 2, 5, 10} {
		if f*e >= s*(1-1e-9) {
			return f * e
		}
	}
	return 10 * e
}

// drawLines draws series against x in [xmin, xmax] in a w×h box with
// axis ticks (ntcharts), a marker per series, and an optional vertical
// mark at x = mark. It returns the chart and whether the y range was cut.
func drawLines(st Styles, w, h int, xmin, xmax float64, ss []series, mark float64) (string, bool) {
	lo, hi, clipped := yRange(ss)
	mk := func(w int) linechart.Model {
		return linechart.New(w, h, xmin, xmax, lo, hi,
			linechart.WithXYSteps(max(8, w/5), max(2, h/4)),
			linechart.WithXLabelFormatter(func(_ int, v float64) string { return fmtTick(v) }),
			linechart.WithYLabelFormatter(func(_ int, v float64) string { return fmtTick(v) }),
			linechart.WithStyles(st.Dim, lipgloss.NewStyle(), st.Dim))
	}
	// Size the graph to a multiple of four columns so the x ticks fall on
	// quarters of the range.
	lc := mk(w)
	if gw := lc.GraphWidth(); gw > 8 {
		lc = mk(w - gw%4)
		lc.SetXStep(lc.GraphWidth() / 4)
	}
	lc.DrawXYAxisAndLabel()
	if !math.IsNaN(mark) {
		lc.DrawRuneLineWithStyle(canvas.Float64Point{X: mark, Y: lo}, canvas.Float64Point{X: mark, Y: hi}, '┊', st.Dim)
	}
	for i, s := range ss {
		n := len(s.y)
		var prev *canvas.Float64Point
		for j, v := range s.y {
			if math.IsNaN(v) || math.IsInf(v, 0) || v < lo || v > hi {
				prev = nil
				continue
			}
			pt := canvas.Float64Point{X: xmin + (float64(j)+0.5)/float64(n)*(xmax-xmin), Y: v}
			if prev != nil {
				lc.DrawRuneLineWithStyle(*prev, pt, seriesMarks[i%len(seriesMarks)], st.Series[i%len(st.Series)])
			} else {
				lc.DrawRuneWithStyle(pt, seriesMarks[i%len(seriesMarks)], st.Series[i%len(st.Series)])
			}
			prev = &pt
		}
	}
	return lc.View(), clipped
}

// legend lists the series with their markers.
func legend(st Styles, ss []series) string {
	var parts []string
	for i, s := range ss {
		parts = append(parts, st.Series[i%len(st.Series)].Render(string(seriesMarks[i%len(seriesMarks)]))+" "+s.name)
	}
	return strings.Join(parts, "   ")
}

// shadeRamp maps 0..max to characters that read without colour.
const shadeRamp = ".:-=+*#%@"

// ternaryCells is where each character cell of a ternary picture sits on
// the simplex: rows top to bottom; vertex 1 at the top, 2 bottom left, 3
// bottom right.
type ternaryCells struct {
	rows, cols int
	p          [][][]float64 // nil outside the triangle
}

func newTernaryCells(rows, cols int) ternaryCells {
	t := ternaryCells{rows: rows, cols: cols, p: make([][][]float64, rows)}
	for r := 0; r < rows; r++ {
		t.p[r] = make([][]float64, cols)
		y := (float64(r) + 0.5) / float64(rows) // 0 at the top vertex
		half := y * float64(cols) / 2
		mid := float64(cols) / 2
		for c := 0; c < cols; c++ {
			x := float64(c) + 0.5
			if x < mid-half || x > mid+half {
				continue
			}
			s := (x - (mid - half)) / (2 * half)
			t.p[r][c] = []float64{1 - y, y * (1 - s), y * s}
		}
	}
	return t
}

// cellOf returns the cell nearest to the simplex point q.
func (t ternaryCells) cellOf(q []float64) (int, int) {
	y := 1 - q[0]
	r := int(math.Min(float64(t.rows-1), math.Max(0, math.Floor(y*float64(t.rows)))))
	s := 0.5
	if y > 0 {
		s = q[2] / y
	}
	mid := float64(t.cols) / 2
	half := y * float64(t.cols) / 2
	c := int(math.Floor(mid - half + s*2*half))
	return r, min(t.cols-1, max(0, c))
}

// drawTernary shades vals (one per cell, NaN outside) with the ramp,
// marks the cell at mark, and adds vertex labels and a legend.
func drawTernary(st Styles, t ternaryCells, vals [][]float64, labels []string, mark []float64, what string) string {
	vmax := 0.0
	var neg, nan, inf bool
	for r := range vals {
		for c, v := range vals[r] {
			if t.p[r][c] == nil {
				continue
			}
			switch {
			case math.IsNaN(v):
				nan = true
			case math.IsInf(v, 1):
				inf = true
			case v < 0:
				neg = true
			case v > vmax:
				vmax = v
			}
		}
	}
	mr, mc := -1, -1
	if mark != nil {
		mr, mc = t.cellOf(mark)
	}
	var b strings.Builder
	b.WriteString(centre(labels[0], t.cols) + "\n")
	for r := 0; r < t.rows; r++ {
		for c := 0; c < t.cols; c++ {
			if t.p[r][c] == nil {
				b.WriteByte(' ')
				continue
			}
			if r == mr && c == mc {
				b.WriteString(st.Selected.Render("◆"))
				continue
			}
			b.WriteString(shade(vals[r][c], vmax))
		}
		b.WriteByte('\n')
	}
	left, right := labels[1], labels[2]
	gap := t.cols - lipgloss.Width(left) - lipgloss.Width(right)
	b.WriteString(left + strings.Repeat(" ", max(1, gap)) + right)
	b.WriteString("\n" + fmt.Sprintf("%s: %c 0 … %c %s", what, shadeRamp[0], shadeRamp[len(shadeRamp)-1], fmtTick(vmax)))
	b.WriteString(" (√ scale)")
	var extra []string
	if mark != nil {
		extra = append(extra, "◆ belief")
	}
	if neg {
		extra = append(extra, "! below 0")
	}
	if inf {
		extra = append(extra, "^ +Inf")
	}
	if nan {
		extra = append(extra, "? NaN")
	}
	if len(extra) > 0 {
		b.WriteString("\n" + strings.Join(extra, "  "))
	}
	return b.String()
}

func shade(v, vmax float64) string {
	switch {
	case math.IsNaN(v):
		return "?"
	case math.IsInf(v, 1):
		return "^"
	case v < 0:
		return "!"
	case vmax <= 0:
		return string(shadeRamp[0])
	}
	i := int(math.Sqrt(v/vmax) * float64(len(shadeRamp)-1))
	return string(shadeRamp[min(len(shadeRamp)-1, max(0, i))])
}

func centre(s string, w int) string {
	pad := (w - lipgloss.Width(s)) / 2
	return strings.Repeat(" ", max(0, pad)) + s
}
