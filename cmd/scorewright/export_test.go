package main

import (
	"bytes"
	"compress/zlib"
	"encoding/json"
	"image/png"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// pdfText inflates every stream of a PDF (Flate) so that what the
// streams hold can be searched.
func pdfText(t *testing.T, b []byte) string {
	t.Helper()
	var all strings.Builder
	for rest := b; ; {
		i := bytes.Index(rest, []byte("stream\n"))
		if i < 0 {
			break
		}
		rest = rest[i+len("stream\n"):]
		j := bytes.Index(rest, []byte("endstream"))
		if j < 0 {
			break
		}
		if r, err := zlib.NewReader(bytes.NewReader(rest[:j])); err == nil {
			data, _ := io.ReadAll(r)
			all.Write(data)
		}
		rest = rest[j:]
	}
	return all.String()
}

// TestEveryExportCarriesTheCaution: every format of every kind of table
// (over outcomes, point forecasts, and both as lotteries) carries the
// metadata block and the caution, and lottery exports the gambling
// caution besides. PNG text cannot be searched, so a PNG must decode and
// be taller than the panels alone (the metadata block is drawn under them).
func TestEveryExportCarriesTheCaution(t *testing.T) {
	t.Setenv("SOURCE_DATE_EPOCH", "1790000000")
	dir := t.TempDir()
	kinds := []struct {
		name string
		args []string
	}{
		{"frost", []string{"--outcomes", "frost,clear", "--preset", "quadratic", "--floor", "0", "--cap", "100", "--step", "0.1", "--unit", "1"}},
		{"harvest", []string{"--outcomes", "below,near,above", "--ordered", "--preset", "ranked", "--floor", "0", "--cap", "40", "--step", "0.25", "--unit", "0.5"}},
		{"milk", []string{"--interval", "20,40", "--preset", "squared-error", "--floor", "0", "--cap", "50", "--step", "2", "--unit", "0.5"}},
	}
	for _, k := range kinds {
		for _, lottery := range []bool{false, true} {
			for _, format := range []string{"csv", "md", "json", "tex", "svg", "png", "pdf", "xlsx", "html"} {
				name := k.name + "." + format
				args := append([]string{"table"}, k.args...)
				if lottery {
					name = k.name + "-lottery." + format
					args = append(args, "--lottery")
				}
				path := filepath.Join(dir, name)
				if code, _, errs := runCmd(t, append(args, "--out", path)...); code != 0 {
					t.Errorf("%s: exit %d: %s", name, code, errs)
					continue
				}
				b, err := os.ReadFile(path)
				if err != nil {
					t.Fatal(err)
				}
				text := string(b)
				switch format {
				case "png":
					img, err := png.Decode(bytes.NewReader(b))
					if err != nil {
						t.Errorf("%s: %v", name, err)
					} else if w, h := img.Bounds().Dx(), img.Bounds().Dy(); 3*h < 2*w {
						// The tallest panel alone is half the width.
						t.Errorf("%s: %d×%d pixels; no room for the metadata block", name, w, h)
					}
					continue
				case "pdf":
					// The annex's text is set in an embedded font, by glyph
					// number (.ci/e2e-annex.sh reads it with pdftotext); the
					// design it attaches is plain text in a stream.
					if !strings.HasPrefix(text, "%PDF") {
						t.Errorf("%s does not start with %%PDF", name)
					}
					if !strings.Contains(pdfText(t, b), "# scorewright design file") {
						t.Errorf("%s does not attach its design", name)
					}
					continue
				case "xlsx":
					if !strings.HasPrefix(text, "PK") {
						t.Errorf("%s is not a zip container", name)
					}
					continue
				case "json":
					var v map[string]any
					if err := json.Unmarshal(b, &v); err != nil {
						t.Errorf("%s: not JSON: %v", name, err)
					}
				}
				want := []string{"mathematics, not law", "regulated", "qualified counsel", "scorewright 0.1.0-dev", "2026-09-21", "smallest margin"}
				if format == "json" {
					want[3], want[5] = `"tool_version": "0.1.0-dev"`, `"min_margin"`
				}
				if lottery {
					want = append(want, "gambling", "Hossain")
				}
				for _, w := range want {
					if !strings.Contains(text, w) {
						t.Errorf("%s lacks %q", name, w)
					}
				}
			}
		}
	}
}

// TestPointTableRefusedWhenRoundingTies: squared error on [0, 10], cap
// 100, floor 0 pays 100 - (y - x)^2; rounded to 25, a forecaster sure of
// y = 5 gets 100 from x = 5 and from x = 4 (99 rounds to 100): a tie
// (derived by hand), so the table is refused without --force (exit 1,
// nothing written) and carries a warning with it.
func TestPointTableRefusedWhenRoundingTies(t *testing.T) {
	path := filepath.Join(t.TempDir(), "milk.csv")
	args := []string{"table", "--interval", "0,10", "--preset", "squared-error", "--floor", "0", "--cap", "100", "--step", "1", "--unit", "25", "--out", path}
	code, out, errs := runCmd(t, args...)
	if code != 1 || !strings.Contains(errs, "refused") || !strings.Contains(out, "re-check  FAILED") {
		t.Errorf("exit %d\n%s%s", code, out, errs)
	}
	if _, err := os.Stat(path); !os.IsNotExist(err) {
		t.Errorf("a refused table was written: %v", err)
	}
	code, _, _ = runCmd(t, append(args, "--force")...)
	b, _ := os.ReadFile(path)
	if code != 1 || !strings.HasPrefix(string(b), "# WARNING: this table FAILED") {
		t.Errorf("--force: exit %d, file starts %.80q", code, b)
	}
}

// TestLotterySummarySaysLottery: the --json summary of a lottery table
// names the prize and carries the gambling caution, for tables over
// outcomes and point tables alike. Brier rule on [10, 50]: the prize is
// 50 - 10 = 40.
func TestLotterySummarySaysLottery(t *testing.T) {
	for _, rule := range [][]string{
		{"--outcomes", "frost,clear", "--preset", "quadratic", "--floor", "10", "--cap", "50", "--step", "0.25"},
		{"--interval", "20,40", "--preset", "squared-error", "--floor", "10", "--cap", "50", "--step", "5"},
	} {
		args := append(append([]string{"table"}, rule...), "--lottery", "--json", "--out", filepath.Join(t.TempDir(), "t.md"))
		code, out, errs := runCmd(t, args...)
		var got struct {
			Lottery *struct{ Prize, Floor, Cap float64 } `json:"lottery"`
			Caution []string                             `json:"caution"`
		}
		if err := json.Unmarshal([]byte(out), &got); err != nil || code != 0 {
			t.Fatalf("%v: exit %d, %v\n%s%s", rule, code, err, out, errs)
		}
		if got.Lottery == nil || got.Lottery.Prize != 40 || got.Lottery.Floor != 10 {
			t.Errorf("%v: lottery %+v", rule, got.Lottery)
		}
		if !strings.Contains(strings.Join(got.Caution, " "), "gambling") {
			t.Errorf("%v: caution %q", rule, got.Caution)
		}
	}
}

// TestDesignFileTableRecordsWeights: a four-way storm outlook from a
// design file, weighted quadratic with weights (1, 1, 2, 4) and ordered
// outcomes. The weights and the order change the rule, so the table's
// record must carry them. The effort is sum_i w_i (p_i - [i = k])^2; the
// worst is report (0, 0, 1, 0) when "hurricane" happens, 2 + 4 = 6, the
// best 0, so on [0, 30] B = 30/6 = 5 and A = 30 (derived by hand).
func TestDesignFileTableRecordsWeights(t *testing.T) {
	dir := t.TempDir()
	design := filepath.Join(dir, "storm.toml")
	src := `version = 1
title = "Storm-category outlook"
outcomes = ["calm", "gale", "storm", "hurricane"]
ordered = true
mode = "generator"
formula = "sum(w*p*(1-p))"
weights = [1, 1, 2, 4]

[budget]
floor = 0
cap = 30
step = 0.25
unit = 0.5
`
	if err := os.WriteFile(design, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCmd(t, "table", "--design", design, "--format", "csv")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"# title: Storm-category outlook\n", "# outcome weights: 1, 1, 2, 4\n", "# outcomes: calm, gale, storm, hurricane (ordered)\n", "# A: 30\n", "# B: 5\n"} {
		if !strings.Contains(out, want) {
			t.Errorf("CSV lacks %q:\n%s", want, out)
		}
	}
}

// csvRows returns the non-comment lines of a CSV export.
func csvRows(s string) []string {
	var rows []string
	for _, l := range strings.Split(strings.TrimSpace(s), "\n") {
		if !strings.HasPrefix(l, "#") {
			rows = append(rows, l)
		}
	}
	return rows
}

// TestLotteryChanceByHand: Brier rule for frost nights on [10, 50], step
// 0.25, unit 1. Derived by hand: the largest effort is 2, so B = 40/2 = 20
// and A = 50; at report 0.75, L(frost) = 2·0.25² = 0.125 pays 47.5 -> 48
// (halves away from zero) and L(clear) = 2·0.75² = 1.125 pays 27.5 -> 28;
// as chances of a prize of 40 above the 10 paid for certain:
// (48 - 10)/40 = 0.95 and (28 - 10)/40 = 0.45.
func TestLotteryChanceByHand(t *testing.T) {
	code, out, errs := runCmd(t, "table", "--outcomes", "frost,clear", "--preset", "quadratic", "--floor", "10", "--cap", "50", "--step", "0.25", "--unit", "1", "--lottery", "--format", "csv")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	rows := csvRows(out)
	if len(rows) != 6 || rows[0] != "report frost,report clear,chance if frost,chance if clear" || rows[4] != "0.75,0.25,0.950,0.450" {
		t.Errorf("rows %q", rows)
	}
}

// TestConstantEmphasisIsTheBrierTable: a constant weight w(c) = 1 gives
// H(p) = p(1 - p)/2, a quarter of the Brier generator 2p(1 - p)
// (Schervish 1989; Buja, Stuetzle & Shen 2005, a = b = 1). A positive
// scale is absorbed by B when both are fitted to the same budget, so the
// two tables must agree cell for cell; the metadata differs only in the
// formula and B (B is 4 times larger for the emphasis rule).
func TestConstantEmphasisIsTheBrierTable(t *testing.T) {
	budget := []string{"--floor", "0", "--cap", "80", "--step", "0.05", "--unit", "0.01", "--format", "csv"}
	_, brier, _ := runCmd(t, append([]string{"table", "--outcomes", "frost,clear", "--preset", "quadratic"}, budget...)...)
	_, emph, errs := runCmd(t, append([]string{"table", "--outcomes", "frost,clear", "--emphasis", "1"}, budget...)...)
	b, e := csvRows(brier), csvRows(emph)
	if len(b) != 22 || strings.Join(b, "\n") != strings.Join(e, "\n") {
		t.Errorf("tables differ:\nBrier %q\nemphasis %q\n%s", b, e, errs)
	}
	if !strings.Contains(brier, "# B: 40\n") || !strings.Contains(emph, "# B: 160\n") {
		t.Errorf("B: Brier 80/2 = 40, emphasis 80/0.5 = 160 (derived by hand)")
	}
	// The record says what each formula is: "1" is a weight, not a generator.
	if !strings.Contains(emph, "# formula is: the emphasis weight w(c)") || !strings.Contains(brier, "# formula is: the generator H(p)") {
		t.Errorf("the records do not say what the formula is")
	}
}

// TestEmphasisWeightAsGiven: eval of an emphasis design reports the
// weight the formula gives (here the constant 1, and 1/(0.3·0.7) for
// the log weight at 0.3), not the Hessian recombined with float noise.
func TestEmphasisWeightAsGiven(t *testing.T) {
	for _, c := range []struct {
		weight string
		want   float64
	}{{"1", 1}, {"1/(c*(1-c))", 1 / (0.3 * 0.7)}} {
		code, out, errs := runCmd(t, "eval", "--outcomes", "frost,clear", "--emphasis", c.weight, "--report", "0.3", "--json")
		var got struct {
			Emphasis float64 `json:"emphasis"`
		}
		if err := json.Unmarshal([]byte(out), &got); err != nil || code != 0 || got.Emphasis != c.want {
			t.Errorf("w = %s: exit %d, emphasis %v, want %v (%v) %s", c.weight, code, got.Emphasis, c.want, err, errs)
		}
	}
}

// TestReferenceNeedsMeanPay: a reference belief with a cap fit would be
// silently ignored; it is refused, naming the flag.
func TestReferenceNeedsMeanPay(t *testing.T) {
	code, _, errs := runCmd(t, "table", "--outcomes", "2", "--preset", "quadratic", "--floor", "0", "--cap", "10", "--step", "0.1", "--reference", "0.2,0.8")
	if code != 2 || !strings.Contains(errs, "--reference") || !strings.Contains(errs, "--mean-pay") {
		t.Errorf("exit %d, %q", code, errs)
	}
	if code, _, errs := runCmd(t, "table", "--outcomes", "2", "--preset", "quadratic", "--floor", "0", "--mean-pay", "8", "--step", "0.1", "--reference", "0.2,0.8"); code != 0 {
		t.Errorf("with --mean-pay: exit %d, %s", code, errs)
	}
}
