package tui

import (
	"strings"
	"testing"

	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/lipgloss"
)

// The key map's general words for ← → and enter ("previous mode", "pick a
// preset") belong to the design pane. The budget pane's footer and the
// help overlay's budget and terms blocks name what those keys do there.
func TestKeyHelpNamesWhatKeysDoInEachPane(t *testing.T) {
	km := DefaultKeyMap()
	p := NewBudgetPane(NewStyles(lipgloss.DefaultRenderer()), km, true)
	misnamed := func(where string, bs []key.Binding) {
		t.Helper()
		for _, b := range bs {
			if d := b.Help().Desc; strings.Contains(d, "mode") || strings.Contains(d, "preset") {
				t.Errorf("%s: %s reads %q", where, b.Help().Key, d)
			}
		}
	}
	misnamed("budget pane footer", p.KeyHelp())
	seen := 0
	for _, g := range km.groups() {
		if strings.HasPrefix(g.title, "Budget pane") || strings.HasPrefix(g.title, "Terms of the annex") {
			seen++
			misnamed(g.title, g.keys)
		}
	}
	if seen != 2 {
		t.Fatalf("found %d of the budget and terms help blocks, want 2", seen)
	}
}
