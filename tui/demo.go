package tui

import (
	"strings"

	"scorewright/generator/design"
	"scorewright/presets"
)

// The demo designs are invented scenarios; their numbers are demo data.

// DemoFrost is the design the workbench opens with: an orchard
// co-operative pays a contracted forecaster, night by night, for the
// probability of a frost night (against a clear one). Its labels are those
// of the sample history testdata/histories/orchard-frost.csv.
func DemoFrost() *design.Design {
	return &design.Design{
		Version: design.SchemaVersion,
		Title:   "Orchard co-operative: frost-night forecasts",
		Labels:  []string{"frost", "clear"},
		Mode:    design.ModeGenerator,
		Preset:  "power",
		Formula: "# power family; g = 2 is the quadratic rule\ng = 2\n(1 - sum(p^g)) / (g - 1)",
		Budget:  design.Budget{Floor: 0, Cap: 40, Step: 0.05, Unit: 0.1, Rounding: "nearest"},
	}
}

// DemoHarvest is the second demo, reachable from the first: the same
// co-operative buys a three-way harvest outlook (below / near / above the
// usual crop), whose outcomes are ordered.
func DemoHarvest() *design.Design {
	return &design.Design{
		Version: design.SchemaVersion,
		Title:   "Orchard co-operative: harvest outlook",
		Labels:  []string{"below", "near", "above"},
		Ordered: true,
		Mode:    design.ModeGenerator,
		Preset:  "ranked",
		Formula: "csum(c*(1-c))",
		Budget:  design.Budget{Floor: 5, Cap: 60, Step: 0.1, Unit: 0.1, Rounding: "nearest"},
	}
}

// NewDesign is the blank design the new-design key starts: two outcomes,
// no title (files are named "design" until the terms give one), and the
// quadratic rule written out, with a comment saying it is there to be
// replaced, so the design checks from the first moment.
func NewDesign() *design.Design {
	return &design.Design{
		Version: design.SchemaVersion,
		Labels:  []string{"yes", "no"},
		Mode:    design.ModeGenerator,
		Formula: "# write H(p) here; this is the quadratic rule\n1 - sum(p^2)",
		Budget:  design.Budget{Floor: 0, Cap: 100, Step: 0.05, Unit: 0.01, Rounding: "nearest"},
	}
}

// demos lists the demo designs in the order the demo key cycles them.
func demos() []func() *design.Design { return []func() *design.Design{DemoFrost, DemoHarvest} }

// cloneDesign returns a deep copy of d, so that background jobs never
// share memory with the design being edited.
func cloneDesign(d *design.Design) *design.Design { return d.Clone() }

// prepareDesign fills in what a design file may leave out: the formula of
// a named preset. The note says what it changed (a preset name dropped),
// or is empty.
func prepareDesign(d *design.Design) (note string, err error) {
	// A preset name over a formula of the design's own is dropped, as on
	// the command line: exports must name the rule computed.
	note = presets.Settle(d)
	if strings.TrimSpace(d.Formula) == "" && d.Preset != "" {
		return note, presets.Apply(d)
	}
	return note, nil
}
