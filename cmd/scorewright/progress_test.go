package main

import (
	"bytes"
	"strings"
	"testing"
	"time"

	"scorewright/internal/pool"
)

// The bar fills in proportion, the share is rounded, and the time left is
// elapsed·(1 - share)/share (derived by hand: 2 s for a quarter leaves 6 s).
func TestProgressLine(t *testing.T) {
	for _, c := range []struct {
		share   float64
		elapsed time.Duration
		want    string
	}{
		{0, 0, "grid [------------------------]   0%  0s "},
		{0.25, 2 * time.Second, "grid [######------------------]  25%  2s, about 6s left "},
		{1.5, time.Second, "grid [########################] 100%  1s, about 0s left "},
	} {
		if got := progressLine("grid", c.share, c.elapsed); got != c.want {
			t.Errorf("share %g: %q, want %q", c.share, got, c.want)
		}
	}
	if w := len(progressLine("grid", 0.5, 75*time.Minute)); w > 79 {
		t.Errorf("a long job's line is %d characters, wider than 80 columns allow", w)
	}
}

// The last step clears the line, so the report starts on a clean one.
func TestProgressClearsAtTheEnd(t *testing.T) {
	var b bytes.Buffer
	p := gridProgress(&b, "grid")
	p(pool.Step{Done: 1, Total: 4})
	p(pool.Step{Done: 4, Total: 4, Last: true})
	if out := b.String(); !strings.HasSuffix(out, "\r\033[K") || !strings.Contains(out, " 25%") {
		t.Errorf("progress wrote %q", out)
	}
}
