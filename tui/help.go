package tui

import (
	"fmt"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/lipgloss"
)

// helpText lays out every key of km in columns that fit width.
func helpText(st Styles, km KeyMap, width int) string {
	row := func(b ...key.Binding) string {
		var ks []string
		for _, x := range b {
			ks = append(ks, x.Help().Key)
		}
		desc := b[0].Help().Desc
		if len(b) == 2 {
			desc = b[0].Help().Desc + " / " + strings.TrimPrefix(strings.TrimPrefix(b[1].Help().Desc, "step the item "), "small step ")
		}
		return st.Key.Render(fmt.Sprintf("%-16s", strings.Join(ks, " "))) + " " + desc
	}
	section := func(title string, rows ...string) string {
		return st.Header.Render(title) + "\n" + strings.Join(rows, "\n")
	}
	k := km
	left := []string{
		section("Anywhere", row(k.QuitHard), row(k.Quit), row(k.Help), row(k.NextPane), row(k.PrevPane),
			row(k.Save), row(k.Open), row(k.Export), row(k.Demo), row(k.Backtest), row(k.Risk)),
		section("Design pane", row(k.Up), row(k.Down), row(k.Edit), row(k.Leave), row(k.Less, k.More),
			row(k.LessFine, k.MoreFine), row(k.Toggle), row(k.AddOutcome), row(k.DropOutcome)),
	}
	right := []string{
		section("While typing (formula, labels, values)",
			"printable keys are text, never shortcuts;",
			"esc stops, tab moves on; ctrl+c ctrl+s",
			"ctrl+o ctrl+x and F1 still work",
			"editor: arrows, home/end, enter new line,",
			"alt+←/→ word, ctrl+k / ctrl+u cut to line",
			"end / start, ctrl+w delete word, ctrl+v paste"),
		section("Unsaved changes",
			"q and ctrl+n act on the second press"),
		section("Picture pane", row(k.Measure), row(k.BeliefDown), row(k.BeliefUp), row(k.Pair)),
		section("Checks pane", row(k.Rerun)),
		section("Budget pane (↑ ↓ ← → enter as above)", row(k.PageUp), row(k.PageDown)),
		section("Backtest view (ctrl+b)", row(k.History), row(k.StopRun),
			"↑ ↓ pgup pgdn scroll, esc or ctrl+b close;",
			"an edit reruns it after the debounce and",
			"cancels the run for the old design"),
		section("Risk view (ctrl+r)",
			"↑ ↓ choose utility, coefficient, wealth or",
			"belief; ← → step it (shift: a tenth);",
			"esc or ctrl+r close; a change reruns it",
			"and cancels the run for the old inputs"),
		section("Dialogs", row(k.Field), row(k.Lottery), row(k.Confirm), row(k.Cancel), row(k.Yes), row(k.No)),
	}
	l := strings.Join(left, "\n\n")
	r := strings.Join(right, "\n\n")
	if width >= 84 {
		cw := (width - 8) / 2
		return lipgloss.JoinHorizontal(lipgloss.Top, block(l, cw, strings.Count(l, "\n")+1), "  ", block(r, cw, strings.Count(r, "\n")+1))
	}
	return l + "\n\n" + r
}
