package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"scorewright/contract/backtest"
	"scorewright/generator/design"
)

const (
	frostHistory   = "../../testdata/histories/orchard-frost.csv"
	harvestHistory = "../../testdata/histories/harvest-outlook.csv"
)

// explicitPay pays A - B·effort with A = cap and B = 5, unrounded, on a
// menu of multiples of the budget step: a pay written out by hand, so the
// command can be tested apart from the table's budget fitting.
func explicitPay(d *design.Design, s *backtest.Scheme) {
	step := d.Budget.Step
	s.OnMenu = func(p []float64) bool {
		for _, x := range p {
			if math.Abs(x/step-math.Round(x/step)) > 1e-9 {
				return false
			}
		}
		return true
	}
	s.Pay, s.Low, s.High = backtest.Affine{A: d.Budget.Cap, B: 5}, d.Budget.Floor, d.Budget.Cap
	s.Adjust, s.Record = nil, nil
}

// readRecords reads the CSV file a command wrote, its "# key: value"
// record skipped.
func readRecords(t *testing.T, path string) [][]string {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	r := csv.NewReader(bytes.NewReader(data))
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return recs
}

func runBacktestCmd(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	e := &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb}
	code := exitCode(e, "backtest", backtestWith(e, args, explicitPay))
	return code, out.String(), errb.String()
}

var frostRule = []string{"--outcomes", "frost,clear", "--preset", "quadratic", "--floor", "0", "--cap", "10", "--step", "0.05"}

func TestBacktestSampleJSON(t *testing.T) {
	dir := t.TempDir()
	payOut := filepath.Join(dir, "pay.csv")
	args := append(append([]string{}, frostRule...), "--history", frostHistory, "--versus-preset", "spherical",
		"--pay-out", payOut, "--json")
	code, out, stderr := runBacktestCmd(t, args...)
	if code != 0 {
		t.Fatalf("exit %d, stderr %s", code, stderr)
	}
	var got struct {
		Rows        int
		Forecasters []struct {
			Name   string
			Count  int
			Total  float64
			Ranks  []int
			Totals []float64
		}
		Skipped []struct {
			Line int
			Why  string
		}
		Rules []struct {
			ID        string
			OffMenu   int     `json:"off_menu"`
			MostTotal float64 `json:"most_total"`
		}
		Caution []string
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	// The planted bad rows of the sample (see contract/backtest/history/sample_test.go).
	var lines []int
	for _, s := range got.Skipped {
		lines = append(lines, s.Line)
	}
	if fmt.Sprint(lines) != "[24 61 101 147]" {
		t.Errorf("skipped lines %v, want 24, 61, 101, 147", lines)
	}
	// Independent check: Brier (1950) in its binary form (f - o)^2, read
	// straight from the file; the two-outcome quadratic effort is twice it.
	want := map[string]float64{}
	count := map[string]int{}
	f, err := os.Open(frostHistory)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cr := csv.NewReader(f)
	cr.FieldsPerRecord = -1
	cr.Read()
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if len(rec) != 5 || (rec[2] != "frost" && rec[2] != "clear") {
			continue
		}
		fp, err1 := strconv.ParseFloat(rec[3], 64)
		cp, err2 := strconv.ParseFloat(rec[4], 64)
		if err1 != nil || err2 != nil || math.Abs(fp+cp-1) > 1e-6 {
			continue
		}
		o := 0.0
		if rec[2] == "frost" {
			o = 1
		}
		want[rec[0]] += 10 - 5*2*(fp-o)*(fp-o)
		count[rec[0]]++
	}
	if len(got.Forecasters) != 3 {
		t.Fatalf("forecasters %+v, want Alder, Birch, Cedar", got.Forecasters)
	}
	for _, fc := range got.Forecasters {
		if fc.Count != count[fc.Name] || math.Abs(fc.Total-want[fc.Name]) > 1e-9 || fc.Totals[0] != fc.Total || len(fc.Ranks) != 2 {
			t.Errorf("%s: count %d total %.12g, want %d and %.12g (Brier 1950 by direct reading)", fc.Name, fc.Count, fc.Total, count[fc.Name], want[fc.Name])
		}
	}
	// At most the cap (10) for each of the 176 scored forecasts.
	if got.Rules[0].MostTotal != 1760 {
		t.Errorf("most_total %g, want 176 × 10", got.Rules[0].MostTotal)
	}
	// Cedar writes some probabilities with two decimals: off the 5 % menu.
	if got.Rules[0].OffMenu == 0 || !strings.Contains(strings.Join(got.Caution, " "), "counsel") {
		t.Errorf("rules %+v caution %q: want off-menu forecasts counted and the caution", got.Rules, got.Caution)
	}
	// The pay-out file adds up to the same totals.
	recs := readRecords(t, payOut)
	sums := map[string]float64{}
	for _, rec := range recs[1:] {
		x, _ := strconv.ParseFloat(rec[4], 64)
		sums[rec[1]] += x
	}
	for _, fc := range got.Forecasters {
		if math.Abs(sums[fc.Name]-fc.Total) > 1e-9 {
			t.Errorf("pay-out file sums %s to %g, report says %g", fc.Name, sums[fc.Name], fc.Total)
		}
	}
	if len(recs) != got.Rows+1 || recs[0][4] != "pay A" || recs[0][7] != "pay B" {
		t.Errorf("pay-out file has %d records, header %v", len(recs), recs[0])
	}
	// Without --force the pay-out file is not replaced.
	if code, _, stderr := runBacktestCmd(t, args...); code != 2 || !strings.Contains(stderr, "file exists") {
		t.Errorf("second run: exit %d, stderr %q, want a refusal to overwrite", code, stderr)
	}
}

func TestBacktestText(t *testing.T) {
	args := append(append([]string{}, frostRule...), "--history", frostHistory, "--versus-generator", "-sqrt(sum(p^2))", "--chart")
	code, out, stderr := runBacktestCmd(t, args...)
	if code != 0 {
		t.Fatalf("exit %d, stderr %s", code, stderr)
	}

	for _, want := range []string{
		"176 forecasts scored, 4 rows skipped",
		"rank A→B", "totals against the budget",
		"mean effort = uncertainty - resolution + reliability",
		"line 24: probabilities sum to 1.1",
		`line 61: outcome "hail"`,
		"line 101: has 4 fields",
		`line 147: probability of "frost" is "n/a"`,
		"off the report menu",
		"perfect reliability", "● Alder", "▲ Birch", "■ Cedar", `forecast probability of "frost"`,
		"caution:",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

func TestBacktestStrictAndErrors(t *testing.T) {
	cases := []struct {
		args []string
		want string
	}{
		{append(append([]string{}, frostRule...), "--history", frostHistory, "--strict"), "line 24: probabilities sum to 1.1"},
		{frostRule, "--history FILE.csv is required"},
		{append(append([]string{}, frostRule...), "--history", "nosuch.csv"), "no such file"},
		{append(append([]string{}, frostRule...), "--history", frostHistory, "--versus-preset", "log", "--versus-generator", "1"), "at most one of"},
		{append(append([]string{}, frostRule...), "--history", frostHistory, "--versus-param", "g=2"), "--versus-param needs"},
		{append(append([]string{}, frostRule...), "--history", frostHistory, "--versus-preset", "nosuch"), `second rule: --preset: unknown preset "nosuch"`},
		{append(append([]string{}, frostRule...), "--history", frostHistory, "--figure", "x.gif"), "want a .svg, .png or .pdf"},
		{[]string{"--outcomes", "below,near,above", "--preset", "quadratic", "--cap", "10", "--step", "0.05", "--history", harvestHistory, "--chart"}, "the reliability picture is for 2 outcomes"},
		{[]string{"--outcomes", "3", "--preset", "quadratic", "--cap", "10", "--step", "0.05", "--history", harvestHistory}, `missing columns "1", "2", "3"; unexpected columns "below", "near", "above"`},
		{append(append([]string{}, frostRule...), "--history", frostHistory, "--tolerance", "0"), "--tolerance 0"},
		{append(append([]string{}, frostRule...), "--history", headerOnly(t)), "has no valid forecasts"},
	}
	for _, c := range cases {
		code, _, stderr := runBacktestCmd(t, c.args...)
		if code != 2 || !strings.Contains(stderr, c.want) || strings.Count(stderr, "\n") != 1 {
			t.Errorf("%v: exit %d, stderr %q, want exit 2 and one line containing %q", c.args, code, stderr, c.want)
		}
	}
}

// Three ordered outcomes, the ranked rule against the quadratic one, read
// from stdin.
func TestBacktestHarvestStdin(t *testing.T) {
	data, err := os.ReadFile(harvestHistory)
	if err != nil {
		t.Fatal(err)
	}
	var out, errb bytes.Buffer
	e := &env{stdin: bytes.NewReader(data), stdout: &out, stderr: &errb}
	args := []string{"--outcomes", "below,near,above", "--ordered", "--preset", "ranked", "--floor", "0", "--cap", "20", "--step", "0.05",
		"--history", "-", "--versus-preset", "quadratic", "--json"}
	if code := exitCode(e, "backtest", backtestWith(e, args, explicitPay)); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	var got struct {
		Rows         int
		SkippedCount int `json:"skipped_count"`
		Forecasters  []struct {
			Name          string
			Decomposition []struct {
				MeanEffort                           float64 `json:"mean_effort"`
				Uncertainty, Resolution, Reliability float64
				WithinBin                            float64 `json:"within_bin"`
			}
			Binning string
			CORP    []struct {
				Event string
				Mean  float64 `json:"mean_score"`
				MCB   float64 `json:"miscalibration"`
				DSC   float64 `json:"discrimination"`
				UNC   float64 `json:"uncertainty"`
			} `json:"corp"`
		}
	}
	if err := json.Unmarshal(out.Bytes(), &got); err != nil {
		t.Fatal(err)
	}
	if got.Rows != 70 || got.SkippedCount != 2 || len(got.Forecasters) != 3 {
		t.Fatalf("rows %d, skipped %d, forecasters %d; want 70, 2, 3", got.Rows, got.SkippedCount, len(got.Forecasters))
	}
	for _, f := range got.Forecasters {
		for _, d := range f.Decomposition {
			// Bins are cells of width 0.1: the remainder closes the identity.
			if math.Abs(d.Uncertainty-d.Resolution+d.Reliability+d.WithinBin-d.MeanEffort) > 1e-12 {
				t.Errorf("%s: %+v does not add up", f.Name, d)
			}
		}
		if !strings.Contains(f.Binning, "width 0.1") {
			t.Errorf("%s: binning %q, want cells of width 0.1 stated", f.Name, f.Binning)
		}
		// One CORP split per outcome against the rest, each exact.
		if len(f.CORP) != 3 || f.CORP[1].Event != "near against the rest" {
			t.Fatalf("%s: CORP %+v, want one per outcome", f.Name, f.CORP)
		}
		for _, c := range f.CORP {
			if math.Abs(c.MCB-c.DSC+c.UNC-c.Mean) > 1e-12 || c.MCB < 0 || c.DSC < 0 {
				t.Errorf("%s: CORP %+v does not add up", f.Name, c)
			}
		}
	}
}

func TestBacktestFigure(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"rel.svg", "rel.png", "rel.pdf"} {
		path := filepath.Join(dir, name)
		args := append(append([]string{}, frostRule...), "--history", frostHistory, "--figure", path)
		if code, _, stderr := runBacktestCmd(t, args...); code != 0 {
			t.Fatalf("%s: exit %d, %s", name, code, stderr)
		}
		data, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		switch filepath.Ext(name) {
		case ".svg":
			for _, want := range []string{"<svg", "Alder", "Birch", "Cedar", "perfect reliability", "forecast probability of"} {
				if !bytes.Contains(data, []byte(want)) {
					t.Errorf("svg lacks %q", want)
				}
			}
		case ".png":
			img, err := png.Decode(bytes.NewReader(data))
			if err != nil || img.Bounds().Dx() < 100 {
				t.Errorf("png: %v, bounds %v", err, img)
			}
		case ".pdf":
			if !bytes.HasPrefix(data, []byte("%PDF")) {
				t.Errorf("pdf starts %q", data[:8])
			}
		}
		if code, _, stderr := runBacktestCmd(t, args...); code != 2 || !strings.Contains(stderr, "use --force") {
			t.Errorf("%s again: exit %d, %q; want a refusal", name, code, stderr)
		}
		if code, _, _ := runBacktestCmd(t, append(args, "--force")...); code != 0 {
			t.Errorf("%s with --force: exit %d", name, code)
		}
	}
}

// With the real budget fit, every forecast on the menu is paid exactly
// its entry in the table the table command exports for the same flags.
func TestBacktestPaysAsTheTable(t *testing.T) {
	budgetArgs := []string{"--outcomes", "frost,clear", "--preset", "quadratic", "--floor", "0", "--cap", "10", "--step", "0.05", "--unit", "0.5"}
	code, tableCSV, stderr := runCmd(t, append(append([]string{"table"}, budgetArgs...), "--format", "csv", "--force")...)
	if code > 1 {
		t.Fatalf("table: exit %d, %s", code, stderr)
	}
	tr := csv.NewReader(strings.NewReader(tableCSV))
	tr.Comment = '#'
	tr.FieldsPerRecord = -1
	recs, err := tr.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	// report frost, report clear, pay if frost, pay if clear
	entry := map[string][2]string{}
	for _, rec := range recs {
		if len(rec) == 4 && rec[0] != "report frost" {
			entry[rec[0]] = [2]string{rec[2], rec[3]}
		}
	}
	if len(entry) != 21 {
		t.Fatalf("table has %d rows, want 21:\n%s", len(entry), tableCSV)
	}
	payOut := filepath.Join(t.TempDir(), "pay.csv")
	code, out, stderr := runCmd(t, append(append([]string{"backtest"}, budgetArgs...), "--history", frostHistory, "--pay-out", payOut)...)
	// As table does, a table that fails its re-check is reported with a
	// warning first in every output and exit status 1.
	if code != 1 {
		t.Fatalf("backtest: exit %d, %s", code, stderr)
	}
	if !strings.HasPrefix(out, "WARNING: rule A: ") || !strings.Contains(strings.SplitN(out, "\n", 2)[0], "fails its re-check") {
		t.Errorf("output does not begin with the failed re-check:\n%s", out)
	}
	if data, _ := os.ReadFile(payOut); !bytes.Contains(bytes.ToLower(data), []byte("# warning: rule a: ")) {
		t.Errorf("pay-out file does not carry the warning:\n%.600s", data)
	}
	code, js, _ := runCmd(t, append(append([]string{"backtest"}, budgetArgs...), "--history", frostHistory, "--json")...)
	if code != 1 || !strings.Contains(js, `"warnings": [`) {
		t.Errorf("--json: exit %d, no warnings field:\n%.400s", code, js)
	}
	hist := map[string][]string{} // line -> history record
	hf, _ := os.ReadFile(frostHistory)
	for i, l := range strings.Split(string(hf), "\n") {
		hist[strconv.Itoa(i+1)] = strings.Split(l, ",")
	}
	rows := readRecords(t, payOut)
	checked := 0
	for _, r := range rows[1:] {
		if r[6] != "true" {
			continue
		}
		h := hist[r[0]]
		e, ok := entry[h[3]]
		if !ok {
			t.Fatalf("line %s: forecast %s on the menu but not in the table", r[0], h[3])
		}
		want := e[0]
		if r[3] == "clear" {
			want = e[1]
		}
		got, _ := strconv.ParseFloat(r[4], 64)
		w, _ := strconv.ParseFloat(want, 64)
		if got != w {
			t.Errorf("line %s: forecast %s, outcome %s paid %g, the table says %s", r[0], h[3], r[3], got, want)
		}
		checked++
	}
	if checked < 150 {
		t.Errorf("only %d forecasts on the menu were checked", checked)
	}
}

// A second rule from a design file keeps that file's budget; one from a
// preset is fitted to the first rule's.
func TestBacktestVersusBudget(t *testing.T) {
	path := filepath.Join(t.TempDir(), "d.toml")
	os.WriteFile(path, []byte("version = 1\noutcomes = [\"frost\", \"clear\"]\nmode = \"generator\"\nformula = \"1 - sum(p^2)\"\n[budget]\nfloor = 2\ncap = 12\nstep = 0.05\n"), 0o644)
	maxPay := func(vs ...string) float64 {
		args := append(append(append([]string{}, frostRule...), "--history", frostHistory, "--json"), vs...)
		code, out, stderr := runBacktestCmd(t, args...)
		if code != 0 {
			t.Fatalf("%v: exit %d, %s", vs, code, stderr)
		}
		var got struct{ Rules []struct{ Max float64 } }
		if err := json.Unmarshal([]byte(out), &got); err != nil {
			t.Fatal(err)
		}
		return got.Rules[1].Max
	}
	// explicitPay pays cap - 5·effort, so the largest payment is the cap
	// (effort 0 for a certain, correct forecast, which the sample has).
	if m := maxPay("--versus-design", path); m != 12 {
		t.Errorf("second rule from a design with cap 12 pays at most %g", m)
	}
	if m := maxPay("--versus-preset", "quadratic"); m != 10 {
		t.Errorf("second rule from a preset pays at most %g, want the first rule's cap 10", m)
	}
}

func headerOnly(t *testing.T) string {
	path := filepath.Join(t.TempDir(), "empty.csv")
	if err := os.WriteFile(path, []byte("forecaster,question,outcome,frost,clear\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// The summary line counts the skipped rows without pinning one reason on
// all of them: here a row is skipped for an unknown outcome, not for its
// probabilities, and the line must not read as if it were.
func TestBacktestSkipLineNamesNoWrongReason(t *testing.T) {
	path := filepath.Join(t.TempDir(), "h.csv")
	rows := "forecaster,question,outcome,frost,clear\nAlder,n1,frost,0.6,0.4\nAlder,n2,hail,0.5,0.5\n"
	if err := os.WriteFile(path, []byte(rows), 0o600); err != nil {
		t.Fatal(err)
	}
	code, out, stderr := runBacktestCmd(t, append(append([]string{}, frostRule...), "--history", path)...)
	if code != 0 {
		t.Fatalf("exit %d, stderr %s", code, stderr)
	}
	head, _, _ := strings.Cut(out, "\n")
	if !strings.Contains(head, `1 forecast scored, 1 row skipped (the reasons are under "skipped rows" below)`) {
		t.Errorf("summary line %q", head)
	}
	if strings.Contains(head, "skipped (a row's probabilities") {
		t.Errorf("summary line gives the probability rule as the reason: %q", head)
	}
	if !strings.Contains(out, `line 3: outcome "hail"`) {
		t.Errorf("the skipped row's own reason is missing:\n%s", out)
	}
}
