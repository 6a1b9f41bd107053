// Package textsafe makes text from files a user was handed (design titles,
// labels, forecaster names) safe to show: on one line where a line is
// expected, and with no control characters or terminal escape sequences
// that could move the cursor, clear a warning or fake a "passed" line.
package textsafe

import (
	"io"
	"strings"
	"unicode"
	"unicode/utf8"
)

// OneLine collapses s to a single line: every run of white space, line
// breaks included, becomes one space, control characters and escape
// sequences are dropped, and the ends are trimmed.
func OneLine(s string) string {
	s = Strip(s, true)
	return strings.Join(strings.Fields(s), " ")
}

// Strip removes terminal escape sequences (ESC [ ... final, ESC ] ... BEL
// or ESC \, and two-byte ESC x) and control characters from s. Line feeds
// and tabs are kept when keepLines is true; carriage returns never are,
// since one can overprint a line already shown.
func Strip(s string, keepLines bool) string {
	if clean(s, keepLines) {
		return s
	}
	var b strings.Builder
	w := &Writer{w: &b, KeepLines: keepLines}
	io.WriteString(w, s)
	return b.String()
}

func clean(s string, keepLines bool) bool {
	for _, r := range s {
		if isControl(r) && !(keepLines && (r == '\n' || r == '\t')) {
			return false
		}
	}
	return true
}

// isControl is a C0 or C1 control character, DEL, an invalid byte, or a
// bidirectional control (U+202E and its kin), which can make "deliaf"
// display as "failed" or reorder the words of a line.
func isControl(r rune) bool {
	return r == utf8.RuneError || unicode.IsControl(r) || unicode.Is(unicode.Bidi_Control, r)
}

// Writer passes text through to an underlying writer with escape
// sequences and control characters removed. It keeps state across Write
// calls, so a sequence split between two writes is still removed.
type Writer struct {
	w io.Writer
	// KeepLines keeps line feeds and tabs.
	KeepLines bool
	state     int
	pending   []byte // an incomplete UTF-8 sequence from the last Write
}

// NewWriter returns a Writer onto w that keeps line feeds and tabs: the
// filter for a terminal.
func NewWriter(w io.Writer) *Writer { return &Writer{w: w, KeepLines: true} }

// Unwrap returns the writer t writes to.
func (t *Writer) Unwrap() io.Writer { return t.w }

const (
	plain = iota
	esc   // after ESC
	csi   // inside ESC [ ... up to a final byte
	osc   // inside ESC ] ... up to BEL or ESC \
	oscEsc
)

// Write filters p; it reports len(p) written when the underlying write
// succeeds, as the caller's bytes were all consumed.
func (t *Writer) Write(p []byte) (int, error) {
	buf := append(t.pending, p...)
	t.pending = nil
	out := make([]byte, 0, len(buf))
	for i := 0; i < len(buf); {
		if !utf8.FullRune(buf[i:]) {
			t.pending = append([]byte(nil), buf[i:]...)
			break
		}
		r, size := utf8.DecodeRune(buf[i:])
		i += size
		switch t.state {
		case esc:
			switch r {
			case '[':
				t.state = csi
			case ']', 'P', '_', '^':
				t.state = osc
			default:
				t.state = plain
			}
			continue
		case csi:
			if r >= 0x40 && r <= 0x7e {
				t.state = plain
			}
			continue
		case osc, oscEsc:
			switch {
			case r == 0x07 || t.state == oscEsc && r == '\\':
				t.state = plain
			case r == 0x1b:
				t.state = oscEsc
			default:
				t.state = osc
			}
			continue
		}
		switch {
		case r == 0x1b:
			t.state = esc
		case r == 0x9b: // the one-character form of ESC [
			t.state = csi
		case r == 0x9d:
			t.state = osc
		case t.KeepLines && (r == '\n' || r == '\t'):
			out = append(out, byte(r))
		case isControl(r):
		default:
			out = append(out, buf[i-size:i]...)
		}
	}
	if _, err := t.w.Write(out); err != nil {
		return 0, err
	}
	return len(p), nil
}
