package tui

import (
	"strings"
	"testing"
	"text/tabwriter"

	"github.com/charmbracelet/x/ansi"
)

// For ASCII cells rightTable is the layout of text/tabwriter (the standard
// library) right-aligning with padding 2, which the tables used before.
func TestRightTableMatchesTabwriterOnASCII(t *testing.T) {
	rows := [][]string{{"forecaster", "count", "mean"}, {"Alder", "59", "8.639"}, {"all", "", "9.1"}}
	var b strings.Builder
	tw := tabwriter.NewWriter(&b, 0, 4, 2, ' ', tabwriter.AlignRight)
	for _, r := range rows {
		b2 := strings.Join(r, "\t") + "\t\n"
		if _, err := tw.Write([]byte(b2)); err != nil {
			t.Fatal(err)
		}
	}
	if err := tw.Flush(); err != nil {
		t.Fatal(err)
	}
	if got := rightTable(rows); got != b.String() {
		t.Errorf("rightTable:\n%q\ntabwriter:\n%q", got, b.String())
	}
}

// A wide character (東 and 雨 take two cells each, Unicode East Asian
// Width "W"), a combining accent (e + U+0301 takes one) and an emoji keep
// every column's right edge at the same screen column; counting runes
// would not.
func TestTablesLaidOutByDisplayWidth(t *testing.T) {
	rows := [][]string{{"name", "event", "score"}, {"東風", "雨", "0.25"}, {"Cafe\u0301", "🌧", "1"}, {"plain", "rain", "0.125"}}
	lines := strings.Split(strings.TrimSuffix(rightTable(rows), "\n"), "\n")
	for _, l := range lines[1:] {
		if ansi.StringWidth(l) != ansi.StringWidth(lines[0]) {
			t.Errorf("line %q is %d cells wide, the header %d", l, ansi.StringWidth(l), ansi.StringWidth(lines[0]))
		}
	}
	// Every cell ends where its column ends: the text up to the end of
	// the second cell is equally wide on every line.
	w := columnWidths(rows)
	for i, r := range rows {
		upTo := padLeft(r[0], w[0]+2) + padLeft(r[1], w[1]+2)
		if !strings.HasPrefix(lines[i], upTo) || ansi.StringWidth(upTo) != w[0]+w[1]+4 {
			t.Errorf("row %d: %q does not end its second column at %d cells", i, lines[i], w[0]+w[1]+4)
		}
	}
	if got := padRight("東", 4); ansi.StringWidth(got) != 4 || got != "東  " {
		t.Errorf("padRight(東, 4) = %q", got)
	}
}
