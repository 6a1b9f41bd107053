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
	// Certifier runs the interval certificate, as a job of its own after
	// the grid check; nil with the default Checker means the build's.
	Certifier Certifier
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

// barColour fills the progress bars of the views: the palette's ochre
// (NewStyles), as a plain colour because the bars take one.
const barColour = "#E0B050"

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
	// The workbench's palette: ochre for what has focus or asks for action,
	// slate for frames and secondary text, sage and brick for pass and fail.
	// Each has a darker shade for light terminals. Nothing depends on colour
	// alone: focus is also a heavy bracket, pass and fail also ✓ and ✗.
	ochre := lipgloss.AdaptiveColor{Light: "#8A5A00", Dark: "#E0B050"}
	slate := lipgloss.AdaptiveColor{Light: "#5F6B7A", Dark: "#7D8799"}
	sage := lipgloss.AdaptiveColor{Light: "#3F6B2A", Dark: "#A8C686"}
	brick := lipgloss.AdaptiveColor{Light: "#A3361C", Dark: "#F08A6C"}
	steel := lipgloss.AdaptiveColor{Light: "#2F5F8F", Dark: "#7FA7D9"}
	plum := lipgloss.AdaptiveColor{Light: "#6E3F86", Dark: "#C9A0DC"}

	// dialogEdge frames dialogs with half blocks: a solid edge of our own,
	// unlike the line-drawn pane brackets behind it.
	dialogEdge := lipgloss.Border{
		Top: "▀", Bottom: "▄", Left: "▌", Right: "▐",
		TopLeft: "▛", TopRight: "▜", BottomLeft: "▙", BottomRight: "▟",
	}

	return Styles{
		Border:      r.NewStyle().Foreground(slate),
		BorderFocus: r.NewStyle().Foreground(ochre),
		Title:       r.NewStyle().Foreground(slate).Bold(true),
		TitleFocus:  r.NewStyle().Foreground(ochre).Bold(true),
		Header:      r.NewStyle().Bold(true),
		Label:       r.NewStyle().Foreground(slate),
		Selected:    r.NewStyle().Foreground(ochre).Bold(true),
		Dim:         r.NewStyle().Foreground(slate),
		Error:       r.NewStyle().Foreground(brick),
		Pass:        r.NewStyle().Foreground(sage),
		Fail:        r.NewStyle().Foreground(brick).Bold(true),
		Key:         r.NewStyle().Foreground(ochre).Bold(true),
		Dialog:      r.NewStyle().Border(dialogEdge).BorderForeground(ochre).Padding(0, 1),
		Series: [4]lipgloss.Style{
			r.NewStyle().Foreground(steel),
			r.NewStyle().Foreground(brick),
			r.NewStyle().Foreground(plum),
			r.NewStyle().Foreground(sage),
		},
	}
}
