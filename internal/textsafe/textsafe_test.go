package textsafe

import (
	"strings"
	"testing"
)

func TestOneLine(t *testing.T) {
	cases := map[string]string{
		"Frost  contract":                           "Frost contract",
		"Frost\ncontract\r\n":                       "Frost contract",
		"title\n\nRESULT: passed":                   "title RESULT: passed",
		"red \x1b[31mtext\x1b[0m":                   "red text",
		"clear\x1b[2J\x1b[Hscreen":                  "clearscreen",
		"link \x1b]8;;http://x\x07here\x1b]8;;\x07": "link here",
		"bell\x07 and back\bspace":                  "bell and backspace",
		"c1 \u009b2Jcsi":                            "c1 csi",
		"ünïcödé stays":                             "ünïcödé stays",
		"rtl \u202edeliaf\u202c ok":                 "rtl deliaf ok",
		"isolate \u2067x\u2069 mark \u200f.":        "isolate x mark .",
		"שלום عربي stays":                           "שלום عربي stays",
	}
	for in, want := range cases {
		if got := OneLine(in); got != want {
			t.Errorf("OneLine(%q) = %q, want %q", in, got, want)
		}
	}
}

// A sequence split across writes is removed all the same; lines and tabs
// stay, carriage returns (which overprint a shown line) go.
func TestWriterAcrossWrites(t *testing.T) {
	var b strings.Builder
	w := NewWriter(&b)
	for _, part := range []string{"FAILED\n\x1b", "[1A\x1b[", "2Kpassed\r", "\tok\n", "\xc3", "\xa9\n"} {
		if n, err := w.Write([]byte(part)); err != nil || n != len(part) {
			t.Fatalf("Write(%q) = %d, %v", part, n, err)
		}
	}
	if got, want := b.String(), "FAILED\npassed\tok\né\n"; got != want {
		t.Errorf("got %q, want %q", got, want)
	}
}
