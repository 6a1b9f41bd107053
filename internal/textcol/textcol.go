// Package textcol lays out tab-separated columns for the terminal by
// display width. text/tabwriter counts runes, so a wide (CJK, emoji) or
// combining character in an outcome label or a forecaster's name pushes
// every later column of its line out of line. A Writer here gives the
// same bytes as a tabwriter with padding 2 and space padding for ASCII
// text, and aligns by display width (ansi.StringWidth) otherwise.
//
// How: the text is buffered until Flush; each cell is replaced by a
// placeholder of as many runes as the cell has display width, the
// placeholders are laid out by text/tabwriter itself (so its column-block
// rules are kept exactly), and the cells are put back in order.
package textcol

import (
	"bytes"
	"io"
	"strings"
	"text/tabwriter"

	"github.com/charmbracelet/x/ansi"
)

// AlignRight right-aligns every column's cells (tabwriter.AlignRight).
const AlignRight = tabwriter.AlignRight

// mark stands for one column of display width in a placeholder. Text
// reaching the terminal has its control characters filtered already
// (internal/textsafe); a cell that holds one is laid out by rune count.
const mark = '\x01'

// Writer buffers tab-separated text and writes it aligned on Flush.
type Writer struct {
	out   io.Writer
	flags uint
	buf   bytes.Buffer
}

// NewWriter returns a Writer to out with tabwriter flags (0 or
// AlignRight); the padding is two spaces, as every table of the commands
// uses.
func NewWriter(out io.Writer, flags uint) *Writer { return &Writer{out: out, flags: flags} }

// Write buffers p; nothing is written before Flush.
func (w *Writer) Write(p []byte) (int, error) { return w.buf.Write(p) }

// Flush lays out what was written and writes it.
func (w *Writer) Flush() error {
	text := w.buf.String()
	w.buf.Reset()
	if strings.ContainsRune(text, mark) {
		return w.plain(text)
	}
	var cells []string
	var ph strings.Builder
	start := 0
	for i := 0; i <= len(text); i++ {
		if i < len(text) && !isTerminator(text[i]) {
			continue
		}
		if cell := text[start:i]; cell != "" {
			cells = append(cells, cell)
			ph.WriteString(strings.Repeat(string(mark), max(1, ansi.StringWidth(cell))))
		}
		if i < len(text) {
			ph.WriteByte(text[i])
		}
		start = i + 1
	}
	var laid bytes.Buffer
	tw := tabwriter.NewWriter(&laid, 0, 4, 2, ' ', w.flags)
	if _, err := io.WriteString(tw, ph.String()); err != nil {
		return err
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	return w.restore(laid.String(), cells)
}

// restore writes laid with each run of placeholder marks replaced, in
// order, by the cell it stands for (a run can hold two cells side by
// side, so each takes exactly its own count of marks).
func (w *Writer) restore(laid string, cells []string) error {
	var out strings.Builder
	k := 0
	for i := 0; i < len(laid); {
		if laid[i] != mark {
			out.WriteByte(laid[i])
			i++
			continue
		}
		n := max(1, ansi.StringWidth(cells[k]))
		out.WriteString(cells[k])
		i += n
		k++
	}
	_, err := io.WriteString(w.out, out.String())
	return err
}

// plain lays text out by rune count, as text/tabwriter does.
func (w *Writer) plain(text string) error {
	tw := tabwriter.NewWriter(w.out, 0, 4, 2, ' ', w.flags)
	if _, err := io.WriteString(tw, text); err != nil {
		return err
	}
	return tw.Flush()
}

// isTerminator reports whether c ends a cell for text/tabwriter.
func isTerminator(c byte) bool { return c == '\t' || c == '\v' || c == '\n' || c == '\f' }
