package main

import (
	"strings"
	"testing"
)

// The point table far from zero pays what the formula gives: squared
// error on [1000000, 1000001], menu of tenths, cap 50 pays
// 50 - 50·(0.1)^2 = 49.50 at report 1000000.1 and outcome 1000000 (derived
// by hand), and every column label is distinct.
func TestPointTableFarFromZero(t *testing.T) {
	code, out, errs := runCmd(t, "table", "--interval", "1000000,1000001", "--preset", "squared-error",
		"--floor", "0", "--cap", "50", "--step", "0.1", "--unit", "0.01", "--format", "csv")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var head, row []string
	for _, line := range strings.Split(out, "\n") {
		if strings.HasPrefix(line, "#") || line == "" {
			continue
		}
		cells := strings.Split(line, ",")
		if head == nil {
			head = cells
			continue
		}
		if cells[0] == "1000000.1" {
			row = cells
		}
	}
	seen := map[string]bool{}
	for _, h := range head {
		if seen[h] {
			t.Errorf("column %q appears twice in %q", h, head)
		}
		seen[h] = true
	}
	if len(head) < 2 || !strings.Contains(head[1], "1000000") || strings.Contains(strings.Join(head, ","), "e+06") {
		t.Errorf("header %q", head)
	}
	if row == nil || row[1] != "49.50" {
		t.Errorf("row 1000000.1: %q", row)
	}
}

// A constant in the generator changes no cent of the table.
func TestGeneratorConstantChangesNoCent(t *testing.T) {
	body := func(gen string) string {
		code, out, errs := runCmd(t, "table", "--outcomes", "2", "--generator", gen, "--floor", "0", "--cap", "10", "--step", "0.05", "--unit", "0.01", "--format", "csv")
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", gen, code, errs)
		}
		var rows []string
		for _, line := range strings.Split(out, "\n") {
			if !strings.HasPrefix(line, "#") {
				rows = append(rows, line)
			}
		}
		return strings.Join(rows, "\n")
	}
	if a, b := body("1 - sum(p^2)"), body("1e12 + 1 - sum(p^2)"); a != b {
		t.Errorf("tables differ:\n%s\n---\n%s", a, b)
	}
}
