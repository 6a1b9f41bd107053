package figure

import (
	"bytes"
	"strings"
	"testing"

	"scorewright/contract/backtest"
)

func TestFormat(t *testing.T) {
	for _, c := range []struct{ path, want, err string }{
		{"rel.svg", "svg", ""}, {"out/REL.PNG", "png", ""}, {"a.b.pdf", "pdf", ""},
		{"rel.gif", "", "want a .svg, .png or .pdf"}, {"rel", "", "want a .svg"},
	} {
		got, err := Format(c.path)
		if got != c.want || (c.err == "") != (err == nil) || (err != nil && !strings.Contains(err.Error(), c.err)) {
			t.Errorf("Format(%q) = %q, %v; want %q, %q", c.path, got, err, c.want, c.err)
		}
	}
}

// A forecaster with no points still draws (an empty curve is skipped),
// and the picture names the event, the diagonal and each forecaster.
func TestReliabilitySVG(t *testing.T) {
	curves := []backtest.Curve{
		{Name: "Alder", Points: []backtest.ReliabilityPoint{{Forecast: 0.1, Observed: 0.12, Lo: 0.05, Hi: 0.2, Count: 30}, {Forecast: 0.8, Observed: 0.7, Lo: 0.6, Hi: 0.95, Count: 5}}},
		{Name: "Birch"},
	}
	p, err := Reliability(curves, "frost", "Reliability", []string{"checks mathematics, not law."})
	if err != nil {
		t.Fatal(err)
	}
	data, err := Encode(p, "svg")
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"<svg", `forecast probability of &#34;frost&#34;`, "perfect reliability", "Alder", "0.4", "checks mathematics, not law."} {
		if !bytes.Contains(data, []byte(want)) {
			t.Errorf("svg lacks %q", want)
		}
	}
}
