package tui

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"scorewright/contract/backtest/history"
	"scorewright/generator/design"
)

// replayText runs history rows (CSV) through design d as the backtest
// view does.
func replayText(t *testing.T, d *design.Design, rows string) *BacktestResult {
	t.Helper()
	h, err := history.Open(strings.NewReader(rows), history.CSV, d.Labels, history.Options{})
	if err != nil {
		t.Fatal(err)
	}
	r, err := replay(context.Background(), d, h, "h.csv", 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// The backtest view pays on the table's own menu: a design with a menu
// file (no step) is replayed, not refused, and its clamp is applied as the
// table applies it.
func TestBacktestUsesTheDesignsMenuAndClamp(t *testing.T) {
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "menu.csv"), []byte("0\n0.5\n1\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	rows := "forecaster,question,outcome,frost,clear\nAlder,n1,frost,0.5,0.5\nAlder,n2,frost,1,0\n"
	d := &design.Design{Version: design.SchemaVersion, Labels: []string{"frost", "clear"}, Mode: design.ModeGenerator,
		Formula: "-sum(p*ln(p))", Dir: dir,
		Budget: design.Budget{Floor: 0, Cap: 100, Unit: 1, Menu: "menu.csv", Clamp: 0.01}}
	res := replayText(t, d, rows)
	// Derived by hand: the log rule's effort is -ln p_k of the clamped
	// report; report 1 is paid as (1, 0.01)/1.01, so the menu's efforts
	// run from lo = ln 1.01 to hi = ln 101, and the fit A - B·L maps them
	// to 100 and 0. Report 0.5 pays A - B·ln 2 and report 1 pays 100 when
	// frost happens.
	lo, hi := math.Log(1.01), math.Log(101)
	B := 100 / (hi - lo)
	A := 100 + B*lo
	want := math.Round(A-B*math.Ln2) + 100
	if len(res.Result.Forecasters) != 1 {
		t.Fatalf("forecasters %+v", res.Result.Forecasters)
	}
	if got := res.Result.Forecasters[0].Money[0].Total; math.Abs(float64(got)-want) > 1e-9 {
		t.Errorf("Alder paid %v, the table pays %v", got, want)
	}
	if !strings.Contains(res.Menu, "menu.csv") {
		t.Errorf("menu %q is not the design's file", res.Menu)
	}
}
