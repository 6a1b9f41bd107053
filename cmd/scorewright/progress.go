package main

import (
	"fmt"
	"io"
	"strings"
	"time"

	"scorewright/internal/pool"
)

// barWidth is the progress bar's length in characters: room on an 80
// column line for the label, the share, the time so far and the time left.
const barWidth = 24

// gridProgress draws a long grid job's progress on one terminal line (the
// job's meter reports about ten times a second): a bar, the share done,
// the time so far and, once a twentieth is done, an estimate of the time
// left from the pace so far. The last step clears the line, so the report
// that follows starts on a clean one.
func gridProgress(w io.Writer, label string) pool.Progress {
	start := time.Now()
	return func(p pool.Step) {
		if p.Last || (p.Total > 0 && p.Done >= p.Total) {
			fmt.Fprint(w, "\r\033[K")
			return
		}
		// \033[K erases what a longer earlier frame left to the right.
		fmt.Fprint(w, "\r"+progressLine(label, p.Done/max(p.Total, 1), time.Since(start))+"\033[K")
	}
}

// progressLine is one frame of gridProgress: share (0..1) done after
// elapsed.
func progressLine(label string, share float64, elapsed time.Duration) string {
	share = min(max(share, 0), 1)
	fill := int(share * barWidth)
	left := ""
	if share >= 0.05 {
		rest := time.Duration(float64(elapsed) * (1 - share) / share)
		left = ", about " + rest.Round(100*time.Millisecond).String() + " left"
	}
	return fmt.Sprintf("%s [%s%s] %3.0f%%  %s%s ", label, strings.Repeat("#", fill), strings.Repeat("-", barWidth-fill),
		100*share, elapsed.Round(100*time.Millisecond), left)
}
