package tui

import (
	"time"

	"github.com/charmbracelet/lipgloss"
)

// Settings are the workbench's tunables. The zero value of each field
// means its default.
type Settings struct {
	// Debounce is how long the design must stay unchanged before the
	// checks are rerun (default 400 ms).
	Debounce time.Duration
	// Resolution and Tolerance are the grid and tolerance of the checks
	// (0: the checker's defaults).
	Resolution int
	Tolerance  float64
	// Workers is how many goroutines a check may use (0: all cores but
	// one, at least one, so that typing stays smooth while a check runs).
	Workers int
	// CertifyDeadline bounds the interval certificate run after the grid
	// checks (0: 3 s; negative: no certificate).
	CertifyDeadline time.Duration
	// Checker runs the checks; nil means the build's default, which may be
	// none (the checks pane then says so).
	Checker Checker
	// Fitter fits the design to its budget; nil means the build's default.
	Fitter Fitter
	// Exporter writes payment tables; nil means the build's default.
	Exporter Exporter
	// Version is the tool version written into exports.
	Version string
	// RecoveryDir is where unsaved edits are kept while they last
	// (tui/recovery; "" keeps none). The command gives the user's state
	// directory.
	RecoveryDir string
	// Dir is the directory relative paths in dialogs start from ("" is the
	// working directory).
	Dir string
}

func (s Settings) debounce() time.Duration {
	if s.Debounce <= 0 {
		return 400 * time.Millisecond
	}
	return s.Debounce
}

// Styles are the workbench's looks, made from one renderer so that tests
// can pin the colour profile.
type Styles struct {
	Border, BorderFocus lipgloss.Style
	Title, TitleFocus   lipgloss.Style
	Header              lipgloss.Style
	Label               lipgloss.Style
	Selected            lipgloss.Style
	Dim                 lipgloss.Style
	Error               lipgloss.Style
	Pass, Fail          lipgloss.Style
	Key                 lipgloss.Style
	Dialog              lipgloss.Style
	Series              [4]lipgloss.Style
}

// NewStyles returns the workbench styles rendered by r (nil: the default
// renderer).
func NewStyles(r *lipgloss.Renderer) Styles {
	if r == nil {
		r = lipgloss.DefaultRenderer()
	}
	accent := lipgloss.AdaptiveColor{Light: "#1B6F5C", Dark: "#6FD3B5"}
	soft := lipgloss.AdaptiveColor{Light: "#8A8F98", Dark: "#5C6370"}
	return Styles{
		Border:      r.NewStyle().Foreground(soft),
		BorderFocus: r.NewStyle().Foreground(accent),
		Title:       r.NewStyle().Foreground(soft),
		TitleFocus:  r.NewStyle().Foreground(accent).Bold(true),
		Header:      r.NewStyle().Bold(true),
		Label:       r.NewStyle().Foreground(soft),
		Selected:    r.NewStyle().Foreground(accent).Bold(true),
		Dim:         r.NewStyle().Foreground(soft),
		Error:       r.NewStyle().Foreground(lipgloss.AdaptiveColor{Light: "#B3261E", Dark: "#F2928A"}),
		Pass:        r.NewStyle().Foreground(lipgloss.AdaptiveColor{Light: "#2E7D32", Dark: "#9BDB8C"}),
		Fail:        r.NewStyle().Foreground(lipgloss.AdaptiveColor{Light: "#B3261E", Dark: "#F2928A"}).Bold(true),
		Key:         r.NewStyle().Foreground(accent),
		Dialog:      r.NewStyle().Border(lipgloss.DoubleBorder()).BorderForeground(accent).Padding(0, 1),
		Series: [4]lipgloss.Style{
			r.NewStyle().Foreground(lipgloss.AdaptiveColor{Light: "#1565C0", Dark: "#82B1FF"}),
			r.NewStyle().Foreground(lipgloss.AdaptiveColor{Light: "#C62828", Dark: "#FF8A80"}),
			r.NewStyle().Foreground(lipgloss.AdaptiveColor{Light: "#6A1B9A", Dark: "#E1A6F0"}),
			r.NewStyle().Foreground(lipgloss.AdaptiveColor{Light: "#EF6C00", Dark: "#FFCC80"}),
		},
	}
}
