package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

func TestEvalEmphasis(t *testing.T) {
	cases := []struct {
		args      []string
		yes, no   float64
		warnings  int
		tolerance float64
	}{
		// Schervish (1989); check-values.md: -ln 0.3 = 1.203973, -ln 0.7 = 0.356675.
		{[]string{"--emphasis", "1/(c*(1-c))"}, 1.203973, 0.356675, 2, 5e-7},
		// Buja, Stuetzle & Shen (2005), a = b = -1/2: 2 sqrt((1-q)/q) and 2 sqrt(q/(1-q)).
		{[]string{"--preset", "beta", "--param", "a=-0.5", "--param", "b=-0.5"}, 2 * math.Sqrt(0.7/0.3), 2 * math.Sqrt(0.3/0.7), 2, 1e-9},
		// Same paper, a = b = 1: (1-q)^2/2 and q^2/2.
		{[]string{"--preset", "beta"}, 0.245, 0.045, 0, 1e-12},
	}
	for _, tc := range cases {
		args := append([]string{"eval", "--outcomes", "frost,clear", "--report", "0.3", "--json"}, tc.args...)
		code, out, errs := runCmd(t, args...)
		if code != 0 {
			t.Fatalf("%v: exit %d, %s", tc.args, code, errs)
		}
		var got struct {
			Effort []float64 `json:"effort"`
			Notes  []string  `json:"notes"`
		}
		if err := json.Unmarshal([]byte(out), &got); err != nil {
			t.Fatalf("%v: %v\n%s", tc.args, err, out)
		}
		if math.Abs(got.Effort[0]-tc.yes) > tc.tolerance || math.Abs(got.Effort[1]-tc.no) > tc.tolerance {
			t.Errorf("%v: efforts %v, want %v, %v", tc.args, got.Effort, tc.yes, tc.no)
		}
		if len(got.Notes) != tc.warnings {
			t.Errorf("%v: notes %q, want %d", tc.args, got.Notes, tc.warnings)
		}
	}
}

func TestEmphasisRefused(t *testing.T) {
	for _, tc := range []struct{ weight, says string }{
		{"c - 0.5", "negative"},
		{"c^(-3)", "not integrable near c = 0"},
		{"q", `unknown name "q"`},
	} {
		code, _, errs := runCmd(t, "eval", "--outcomes", "2", "--report", "0.3", "--emphasis", tc.weight)
		if code != exitUsage || !strings.Contains(errs, tc.says) {
			t.Errorf("%s: exit %d, stderr %q; want 2 and %q", tc.weight, code, errs, tc.says)
		}
	}
}
