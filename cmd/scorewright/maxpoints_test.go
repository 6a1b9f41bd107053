package main

import (
	"encoding/json"
	"strings"
	"testing"
)

// --max-points below the lattice gives a sample, stated in the JSON (the
// flag, the statement naming the lattice and the limit, a note with the
// reason) and in the text; at its default the same check is a full grid.
func TestMaxPointsStatesFullOrSampled(t *testing.T) {
	base := []string{"check", "--outcomes", "3", "--preset", "quadratic", "--resolution", "40"}
	code, out, errs := runCmd(t, append(append([]string{}, base...), "--max-points", "500", "--samples", "100", "--json")...)
	if code != 0 {
		t.Fatalf("exit %d, %q", code, errs)
	}
	var v struct {
		Grid struct {
			Points    int    `json:"points"`
			Sampled   bool   `json:"sampled"`
			Statement string `json:"statement"`
		} `json:"grid"`
		Notes []string `json:"notes"`
	}
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatal(err)
	}
	// C(42, 2) = 861 lattice points at K = 40 (derived by hand); the
	// sample is 100 points and the 3 vertices.
	if !v.Grid.Sampled || v.Grid.Points != 103 || !strings.Contains(v.Grid.Statement, "the full lattice is 861 points, above the limit of 500") {
		t.Errorf("grid %+v", v.Grid)
	}
	if !strings.Contains(strings.Join(v.Notes, "\n"), "more than the limit of 500 (the limit asked for)") {
		t.Errorf("notes %q", v.Notes)
	}
	code, out, errs = runCmd(t, base...)
	if code != 0 || !strings.Contains(out, "full grid at resolution 40") || !strings.Contains(out, "861 points") {
		t.Errorf("default: exit %d, %q\n%s", code, errs, out)
	}
	code, _, errs = runCmd(t, append(append([]string{}, base...), "--max-points", "-1")...)
	if code != 2 || !strings.Contains(errs, "--max-points must not be negative") {
		t.Errorf("negative: exit %d, %q", code, errs)
	}
	code, _, errs = runCmd(t, append(append([]string{}, base...), "--max-points", "1000000000")...)
	if code != 2 || !strings.Contains(errs, "--max-points: 1000000000 is more than this machine can hold for 3 outcomes (at most ") {
		t.Errorf("beyond the machine: exit %d, %q", code, errs)
	}
}
