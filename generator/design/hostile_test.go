package design

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"scorewright/internal/inputfile"
)

const goodDesign = "version = 1\nmode = \"generator\"\noutcomes = [\"frost\", \"clear\"]\nformula = \"1 - sum(p^2)\"\n"

// An endless stream stops at the bound with an error naming it, having
// read no more than the bound and one buffer.
func TestReadStopsAnEndlessStream(t *testing.T) {
	for _, fill := range []byte{0, '#', '"'} {
		src := &inputfile.Endless{Fill: fill}
		_, err := Read(src, "frost.toml")
		if !errors.Is(err, inputfile.ErrTooLarge) || !strings.Contains(err.Error(), "frost.toml") || !strings.Contains(err.Error(), "4 MiB") {
			t.Errorf("fill %q: %v", fill, err)
		}
		if src.N > MaxFileBytes+1<<20 {
			t.Errorf("fill %q: read %d bytes", fill, src.N)
		}
	}
}

// A device or a pipe given as a design file is refused at once; a pipe
// with no writer must not block.
func TestLoadRefusesSpecialFiles(t *testing.T) {
	paths := []string{"/dev/zero", t.TempDir()}
	fifo := filepath.Join(t.TempDir(), "design.toml")
	if err := syscall.Mkfifo(fifo, 0o600); err == nil {
		paths = append(paths, fifo)
	}
	for _, path := range paths {
		done := make(chan error, 1)
		go func() { _, err := Load(path); done <- err }()
		select {
		case err := <-done:
			if _, statErr := os.Stat(path); statErr == nil && !errors.Is(err, inputfile.ErrNotRegular) {
				t.Errorf("%s: %v", path, err)
			}
		case <-time.After(5 * time.Second):
			t.Fatalf("%s: Load blocked", path)
		}
	}
}

func TestHostileDesignsRefused(t *testing.T) {
	cases := []struct{ src, want string }{
		{strings.Replace(goodDesign, "version = 1", "version = -3", 1), "version: -3 is not a version"},
		{goodDesign + "[budget]\ncap = 10\nreference = [0.2, 0.8]\n", "budget.reference: the belief a mean_pay target is set at"},
		{goodDesign + "[params]\ng = nan\n", "params.g: NaN is not a finite number"},
		{goodDesign + "[budget]\ncap = 10\nclamp = 0.7\n", "budget.clamp: 0.7; must be in [0, 0.5)"},
		{goodDesign + "[budget]\ncap = 10\nclamp = -0.1\n", "budget.clamp: -0.1"},
		{strings.Replace(goodDesign, `"clear"]`, `"clear", "rain"]`, 1) + "[budget]\ncap = 10\nclamp = 0.4\n", "budget.clamp: 0.4; with 3 outcomes it must be below 1/3"},
		{"version = 1\nmode = \"point\"\ninterval = [0, 10]\nformula = \"-x^2\"\n[budget]\ncap = 10\nclamp = 0.1\n", "budget.clamp and budget.menu are for rules over outcomes"},
		{goodDesign + "[budget]\ncap = 10\nstep = 0.1\nmenu = \"m.csv\"\n", `budget: menu "m.csv" and step 0.1 are both set`},
		{goodDesign + "[budget]\ncap = 10\nmenu = \"a\\nb\"\n", "budget.menu: the path must be one line"},
		{strings.Replace(goodDesign, `"frost"`, `"frost, hard"`, 1), `label 1 "frost, hard" has a comma`},
		{strings.Replace(goodDesign, `"frost"`, `"Outcome"`, 1), `label 1 "Outcome" is the name of a fixed column`},
		{strings.Replace(goodDesign, `"frost"`, `"frost\nRESULT: passed"`, 1), "has a control character (U+000A)"},
		{strings.Replace(goodDesign, `"frost"`, `"\u001b[2Jfrost"`, 1), "has a control character (U+001B)"},
		{strings.Replace(goodDesign, `"1 - sum(p^2)"`, `"1 - p1`+strings.Repeat(" - p1", 14000)+`"`, 1), "formula: 70006 bytes; a formula may be at most 65536 bytes"},
	}
	for _, c := range cases {
		_, err := Decode([]byte(c.src))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%.60q: %v, want %q", c.src, err, c.want)
		}
	}
}

// A mean-pay budget may name its reference belief.
func TestReferenceWithMeanPayAccepted(t *testing.T) {
	if _, err := Decode([]byte(goodDesign + "[budget]\nmean_pay = 5\nreference = [0.2, 0.8]\nstep = 0.1\n")); err != nil {
		t.Fatal(err)
	}
}

// Titles arrive on one line with no escape sequences; a byte-order mark
// from a Windows editor is accepted.
func TestTitleMadeOneLineAndBOMAccepted(t *testing.T) {
	src := "\ufeff" + goodDesign + "title = \"Frost\\n\\nRESULT: \\u001b[32mpassed\\u001b[0m\"\n"
	d, err := Decode([]byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if d.Title != "Frost RESULT: passed" {
		t.Errorf("title %q", d.Title)
	}
}

func TestParseOutcomesRefusesHostileLabels(t *testing.T) {
	for in, want := range map[string]string{
		"frost,outcome":                 `label 2 "outcome" is the name of a fixed column`,
		"a,b\x1b[2J":                    "control character",
		"yes,\u202eon":                  "bidirectional control character (U+202E)",
		"a," + strings.Repeat("b", 300): "at most 200",
	} {
		if _, err := ParseOutcomes(in); err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("ParseOutcomes(%q) = %v, want %q", in, err, want)
		}
	}
}
