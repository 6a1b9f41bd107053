package presets

import (
	"strings"
	"testing"

	"scorewright/generator/design"
)

// A preset's formula under a comment of the user's keeps the preset's name
// (the water design's "# quadratic rule" above 1 - sum(p^2)); a formula
// that differs drops it, with a note.
func TestSettleIgnoresComments(t *testing.T) {
	d := &design.Design{Preset: "quadratic", Formula: "# quadratic rule\n1 - sum(p^2)  # Brier"}
	if note := Settle(d); note != "" || d.Preset != "quadratic" {
		t.Errorf("note %q, preset %q", note, d.Preset)
	}
	d = &design.Design{Preset: "quadratic", Formula: "# quadratic rule\n1 - sum(p^3)"}
	if note := Settle(d); !strings.Contains(note, "formula of its own") || d.Preset != "" {
		t.Errorf("note %q, preset %q", note, d.Preset)
	}
}
