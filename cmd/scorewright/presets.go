package main

import (
	"fmt"
	"strings"

	"scorewright/internal/textcol"
	"scorewright/presets"
)

type presetJSON struct {
	Name    string `json:"name"`
	Title   string `json:"title"`
	Kind    string `json:"kind"`
	Formula string `json:"formula"`
	Source  string `json:"source"`
	Ordered bool   `json:"ordered,omitempty"`
	Binary  bool   `json:"binary_only,omitempty"`
	Weights bool   `json:"needs_weights,omitempty"`
}

func runPresets(e *env, args []string) error {
	fs := newFlags("presets")
	asJSON := fs.Bool("json", false, "print JSON")
	if err := parseFlags(e, fs, "[--json]", args, false); err != nil {
		return err
	}
	all := presets.All()
	if *asJSON {
		out := make([]presetJSON, len(all))
		for i, p := range all {
			out[i] = presetJSON{p.Name, p.Title, string(p.Kind), p.Formula, p.Source, p.Ordered, p.BinaryOnly, p.Weighted}
		}
		return writeJSON(e.stdout, map[string]any{"presets": out})
	}
	tw := textcol.NewWriter(e.stdout, 0)
	for _, p := range all {
		var notes []string
		if p.Kind != presets.KindGenerator {
			notes = append(notes, string(p.Kind))
		}
		if p.BinaryOnly {
			notes = append(notes, "2 outcomes")
		}
		if p.Ordered {
			notes = append(notes, "ordered")
		}
		if p.Weighted {
			notes = append(notes, "needs --weights")
		}
		note := ""
		if len(notes) > 0 {
			note = " [" + strings.Join(notes, ", ") + "]"
		}
		fmt.Fprintf(tw, "%s\t%s%s\n", p.Name, p.Title, note)
		fmt.Fprintf(tw, "\t  %s\n", strings.ReplaceAll(p.Formula, "\n", "; "))
		fmt.Fprintf(tw, "\t  source: %s\n", p.Source)
	}
	return tw.Flush()
}
