package reliability

import (
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"
	"github.com/muesli/termenv"

	"scorewright/contract/backtest"
)

var update = flag.Bool("update", false, "rewrite the golden files")

// demo curves: a calibrated forecaster on the diagonal, an overconfident
// one whose extreme forecasts come true less often than said.
func pt(f, o float64, n int) backtest.ReliabilityPoint {
	return backtest.ReliabilityPoint{Forecast: f, Observed: o, Count: n}
}

var demo = []backtest.Curve{
	{Name: "Alder", Points: []backtest.ReliabilityPoint{pt(0.1, 0.1, 20), pt(0.5, 0.5, 10), pt(0.9, 0.9, 5)}},
	{Name: "Birch", Points: []backtest.ReliabilityPoint{pt(0, 0.2, 12), pt(1, 0.6, 9)}},
}

func TestGolden(t *testing.T) {
	lipgloss.SetColorProfile(termenv.Ascii)
	for _, size := range [][2]int{{60, 20}, {40, 12}} {
		got := New("frost", demo).View(size[0], size[1])
		name := filepath.Join("testdata", fmt.Sprintf("chart-%dx%d.golden", size[0], size[1]))
		if *update {
			if err := os.WriteFile(name, []byte(got), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		want, err := os.ReadFile(name)
		if err != nil {
			t.Fatalf("%v (run with -update)", err)
		}
		if got != string(want) {
			t.Errorf("%dx%d differs from %s:\n%s", size[0], size[1], name, got)
		}
	}
}

// The chart fills exactly the size it is given, and the markers land where
// their coordinates say: (0, 0.2) and (1, 0.6) for Birch.
func TestLayout(t *testing.T) {
	lipgloss.SetColorProfile(termenv.Ascii)
	for _, size := range [][2]int{{24, 10}, {60, 20}, {81, 33}} {
		v := New("frost", demo).View(size[0], size[1])
		lines := strings.Split(v, "\n")
		if len(lines) != size[1] {
			t.Errorf("%v: %d lines", size, len(lines))
		}
		for i, l := range lines {
			if w := ansi.StringWidth(l); w > size[0] {
				t.Errorf("%v: line %d is %d wide: %q", size, i, w, l)
			}
		}
		for _, want := range []string{`observed frequency of "frost"`, `forecast probability of "frost"`, "● Alder", "▲ Birch", "perfect reliability", "0.0", "0.2"} {
			if !strings.Contains(v, want) && size[0] >= 40 {
				t.Errorf("%v: view lacks %q:\n%s", size, want, v)
			}
		}
	}
	if v := New("frost", demo).View(10, 5); !strings.Contains(v, "needs at least") {
		t.Errorf("tiny view %q", v)
	}
}

// With the point (0, 1) alone, the marker sits on the y axis at the 1.0
// tick.
func TestCorner(t *testing.T) {
	lipgloss.SetColorProfile(termenv.Ascii)
	v := New("frost", []backtest.Curve{{Name: "A", Points: []backtest.ReliabilityPoint{pt(0, 1, 1)}}}).View(40, 14)
	top := strings.Split(v, "\n")[1]
	if !strings.HasPrefix(top, "1.0●") {
		t.Errorf("top row %q, want the marker on the axis at 1.0", top)
	}
}
