package table

import (
	"strings"
	"testing"
	"unicode/utf8"
)

// TestValueAxis: the figure's value axis names the kind once.
func TestValueAxis(t *testing.T) {
	for _, c := range []struct {
		kind      Kind
		name, out string
	}{
		{KindMoney, "pay", "pay"},
		{"chance of the prize", "chance", "chance of the prize"},
		{"points", "score", "score (points)"},
	} {
		if got := (&Table{Kind: c.kind, ValueName: c.name}).valueAxis(); got != c.out {
			t.Errorf("%q/%q: %q, want %q", c.kind, c.name, got, c.out)
		}
	}
}

// TestLegendOutsideTheData: curve figures keep their legend out of the
// data area (it sat on the curves, or pushed a chance axis past 1), and
// list one entry per outcome column for the strip under the panel.
func TestLegendOutsideTheData(t *testing.T) {
	tb := &Table{Kind: "chance of the prize", ValueName: "chance", Labels: []string{"frost", "clear"},
		Reports: [][]float64{{0, 1}, {0.5, 0.5}, {1, 0}}, Values: [][]float64{{0, 1}, {0.75, 0.75}, {1, 0}}}
	p, legend, err := tb.curvePlot("report")
	if err != nil {
		t.Fatal(err)
	}
	if len(legend) != 2 || legend[0].label != "chance if frost" {
		t.Errorf("legend %v", legend)
	}
	if p.Y.Max > 1 {
		t.Errorf("value axis reaches %v for chances in [0, 1]", p.Y.Max)
	}
	if h := legendHeight(legend); !(h > 0) || legendHeight(nil) != 0 {
		t.Errorf("legend strip %v, empty %v", h, legendHeight(nil))
	}
}

// A formula without spaces is cut to the width; no line is longer than it.
func TestWrapCutsLongWords(t *testing.T) {
	long := "formula: " + strings.Repeat("p1*ln(p1)+", 30) + "0 and ünïcödé words"
	lines := Wrap(long, 40)
	for _, l := range lines {
		if n := utf8.RuneCountInString(l); n > 40 {
			t.Errorf("line of %d characters: %q", n, l)
		}
	}
	if got := strings.ReplaceAll(strings.Join(lines, ""), " ", ""); got != strings.ReplaceAll(long, " ", "") {
		t.Errorf("wrapping lost text: %q", got)
	}
}
