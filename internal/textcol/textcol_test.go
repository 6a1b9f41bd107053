package textcol

import (
	"bytes"
	"math/rand/v2"
	"strings"
	"testing"
	"text/tabwriter"

	"github.com/charmbracelet/x/ansi"
)

// For ASCII text the layout is text/tabwriter's, byte for byte (the
// standard library is the reference), over random tables with ragged
// lines, empty cells, lines without tabs and both alignments.
func TestASCIIIsTabwriter(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	words := []string{"", "a", "bb", "rule A", "0.176828", "1367.43", "x y z"}
	for trial := range 500 {
		var b strings.Builder
		for range rng.IntN(8) {
			for range rng.IntN(5) {
				b.WriteString(words[rng.IntN(len(words))])
				b.WriteByte('\t')
			}
			b.WriteString(words[rng.IntN(len(words))])
			b.WriteByte('\n')
		}
		for _, flags := range []uint{0, AlignRight} {
			var want, got bytes.Buffer
			tw := tabwriter.NewWriter(&want, 0, 4, 2, ' ', flags)
			tw.Write([]byte(b.String()))
			tw.Flush()
			w := NewWriter(&got, flags)
			w.Write([]byte(b.String()))
			if err := w.Flush(); err != nil {
				t.Fatal(err)
			}
			if got.String() != want.String() {
				t.Fatalf("trial %d flags %d: input %q\ngot  %q\nwant %q", trial, flags, b.String(), got.String(), want.String())
			}
		}
	}
}

// Wide and combining characters keep the columns in line: every line's
// second column starts at the same display column.
func TestWideCharactersAlign(t *testing.T) {
	for _, flags := range []uint{0, AlignRight} {
		var got bytes.Buffer
		w := NewWriter(&got, flags)
		w.Write([]byte("霜\t1.5\tend\nclear\t22.25\tend\ncafe\u0301\t3\tend\n🌧 rain\t4\tend\n"))
		if err := w.Flush(); err != nil {
			t.Fatal(err)
		}
		lines := strings.Split(strings.TrimSuffix(got.String(), "\n"), "\n")
		at := -1
		for _, l := range lines {
			i := strings.Index(l, "end")
			if at < 0 {
				at = ansi.StringWidth(l[:i])
			}
			if c := ansi.StringWidth(l[:i]); c != at {
				t.Errorf("flags %d: %q has its last column at %d, want %d\n%s", flags, l, c, at, got.String())
			}
		}
	}
}
