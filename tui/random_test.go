package tui

import (
	"math/rand/v2"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"
)

// Random key sequences never panic the workbench, and every frame fits
// the terminal. The checker is a stand-in so the test stays short; the
// budget fit and the pictures are the real ones.
func TestRandomKeysKeepTheScreenWhole(t *testing.T) {
	keys := []tea.KeyMsg{keyUp, keyDown, keyLeft, keyRight, keyEnter, keyEsc, keyTab, keyBack, keyEnd,
		{Type: tea.KeyShiftTab}, {Type: tea.KeyShiftLeft}, {Type: tea.KeyShiftRight}, {Type: tea.KeyPgDown}, {Type: tea.KeyPgUp},
		{Type: tea.KeySpace, Runes: []rune{' '}}, {Type: tea.KeyF1}, keyCtrlN, keyCtrlS, tea_ctrlO(), tea_ctrlX(), keyCtrlR, keyCtrlR, keyCtrlY, keyCtrlY,
		runes("+"), runes("-"), runes("m"), runes("p"), runes("["), runes("]"), runes("r"), runes("?"), runes("y"), runes("n"),
		runes("x"), runes("1"), runes("("), runes("^"), runes(","), runes("."), runes("q")}
	for seed := uint64(1); seed <= 4; seed++ {
		w, h := 80, 24
		if seed%2 == 0 {
			w, h = 120, 40
		}
		fc := &fakeChecker{points: 100}
		m := testModel(t, nil, Settings{Checker: fc.check})
		start(t, m, w, h)
		rng := rand.New(rand.NewPCG(seed, 7))
		var trail []string
		for i := 0; i < 400; i++ {
			k := keys[rng.IntN(len(keys))]
			trail = append(trail, k.String())
			if m.quitting {
				m = testModel(t, nil, Settings{Checker: fc.check})
				start(t, m, w, h)
			}
			press(t, m, k)
			if m.quitting {
				continue // a quitting program draws nothing
			}
			lines := strings.Split(m.View(), "\n")
			if len(lines) != h {
				t.Fatalf("seed %d after %v: %d lines", seed, trail, len(lines))
			}
			for j, l := range lines {
				if lw := ansi.StringWidth(l); lw > w {
					t.Fatalf("seed %d after %v: line %d is %d wide", seed, trail, j, lw)
				}
			}
		}
	}
}
