package main

import (
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"
)

// The water utility's invented design at menu step 0.1: the quadratic
// rule pays 150 − 75·(1 − p)², so at the base rate 0.1 the base-rate
// forecaster expects 0.1·89.25 + 0.9·149.25 = 143.25 a day and a perfect
// one 150 (derived by hand), over 365 days 52286.25 and 54750.
func TestTableStatesTheCost(t *testing.T) {
	design := filepath.Join("..", "..", "testdata", "designs", "water.toml")
	code, out, errs := runCmd(t, "table", "--design", design, "--step", "0.1", "--json", "--out", filepath.Join(t.TempDir(), "w.csv"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var sum struct {
		Cost costJSON `json:"cost"`
	}
	if err := json.Unmarshal([]byte(out), &sum); err != nil {
		t.Fatal(err)
	}
	c := sum.Cost
	if c.Forecasts != 365 || float64(c.BaseRateOnly) != 143.25 || float64(c.Perfect) != 150 || c.Currency != "EUR" {
		t.Fatalf("cost %+v", c)
	}
	if !strings.Contains(strings.Join(c.Lines, "\n"), "52286.25 EUR per season") {
		t.Errorf("lines %q", c.Lines)
	}
	code, out, _ = runCmd(t, "table", "--design", design, "--step", "0.1", "--base-rate", "0.5,0.5", "--forecasts", "10", "--format", "csv")
	// At 0.5 the row 0.5 pays 131.25 either way: 1312.50 over ten days.
	if code != 0 || !strings.Contains(out, "1312.50 EUR for a forecaster who only reports the base rate") || !strings.Contains(out, "(EUR)") {
		t.Errorf("exit %d:\n%s", code, out)
	}
	for _, bad := range [][]string{{"--base-rate", "0.5,0.6"}, {"--forecasts", "-1"}, {"--start", "2027-13-01"}, {"--currency", "a\nb"}} {
		if code, _, _ := runCmd(t, append([]string{"table", "--design", design, "--format", "csv"}, bad...)...); code != exitUsage {
			t.Errorf("%v: exit %d, want %d", bad, code, exitUsage)
		}
	}
}
