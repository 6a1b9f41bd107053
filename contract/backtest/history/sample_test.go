package history

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"
)

// The sample histories in testdata are demo data from an invented
// scenario: an orchard co-operative with three contracted forecasters
// (Alder, Birch and Cedar) who each night of the spring give the
// probability of a frost night, and who before harvest give a three-way
// outlook (below / near / above the usual yield) for each orchard block.
// Alder is calibrated, Birch overconfident, Cedar hedges toward the season
// average and writes some probabilities off the 5 % menu. A few rows are
// broken on purpose so that the backtest has something to skip.
//
// Regenerate with
//
//	go test ./contract/backtest/history -run TestSampleHistories -update
var update = flag.Bool("update", false, "rewrite the sample histories in testdata")

// Names of the committed samples.
const (
	frostSample   = "orchard-frost.csv"
	harvestSample = "harvest-outlook.csv"
	ferrySample   = "ferry-departures.csv"
	ferryLines    = "ferry-departures.jsonl"
)

// ferryRows: demo data from another invented scenario. A ferry
// co-operative compares two delay models, Tern (calibrated) and Gannet
// (overconfident), each giving every morning from 5 January 2026 the
// probability that the first crossing leaves late, at full precision as
// model output comes. The chance of a late start rises with a latent
// weather index.
func ferryRows() [][]string {
	rng := rand.New(rand.NewPCG(2026, 15))
	start := time.Date(2026, 1, 5, 0, 0, 0, 0, time.UTC)
	var rows [][]string
	for day := range 150 {
		date := start.AddDate(0, 0, day).Format("2006-01-02")
		z := -1.2 + 2.2*rng.NormFloat64()*0.8
		chance := logistic(z)
		outcome := "on time"
		if rng.Float64() < chance {
			outcome = "late"
		}
		tern := logistic(z + 0.35*rng.NormFloat64())
		gannet := logistic(2.4*z + 0.35*rng.NormFloat64())
		for _, f := range []struct {
			name string
			p    float64
		}{{"Tern", tern}, {"Gannet", gannet}} {
			p := math.Round(f.p*1e6) / 1e6
			rows = append(rows, []string{f.name, "crossing " + date, outcome, date, strconv.FormatFloat(p, 'f', -1, 64), strconv.FormatFloat(math.Round((1-p)*1e6)/1e6, 'f', -1, 64)})
		}
	}
	return rows
}

var ferryHeader = []string{"forecaster", "question", "outcome", "date", "late", "on time"}

func ferryCSV() string {
	var b strings.Builder
	b.WriteString(strings.Join(ferryHeader, ",") + "\n")
	for _, r := range ferryRows() {
		b.WriteString(strings.Join(r, ",") + "\n")
	}
	return b.String()
}

func ferryJSON() string {
	var b strings.Builder
	for _, r := range ferryRows() {
		fmt.Fprintf(&b, "{\"forecaster\":%q,\"question\":%q,\"outcome\":%q,\"date\":%q,\"late\":%s,\"on time\":%s}\n", r[0], r[1], r[2], r[3], r[4], r[5])
	}
	return b.String()
}

// twentieths rounds x in [0, 1] to the 5 % report menu.
func twentieths(x float64) float64 {
	return math.Round(math.Min(1, math.Max(0, x))*20) / 20
}

func logistic(z float64) float64 { return 1 / (1 + math.Exp(-z)) }

func logit(p float64) float64 { return math.Log(p / (1 - p)) }

func num(x float64) string { return fmt.Sprintf("%.4g", x) }

// frostHistory: 60 nights from 20 March; the chance of frost falls through
// the season with day-to-day weather noise.
func frostHistory() string {
	rng := rand.New(rand.NewPCG(2026, 3))
	var b strings.Builder
	b.WriteString("forecaster,question,outcome,frost,clear\n")
	for night := range 60 {
		q := fmt.Sprintf("night %02d", night+1)
		z := 0.4 - 0.06*float64(night) + 1.2*(rng.Float64()-0.5)*2
		chance := logistic(z)
		outcome := "clear"
		if rng.Float64() < chance {
			outcome = "frost"
		}
		alder := twentieths(logistic(logit(chance) + 0.3*(rng.Float64()-0.5)))
		birch := twentieths(logistic(2.2 * logit(chance)))
		cedar := 0.5*chance + 0.5*0.25
		if night%4 != 0 {
			cedar = twentieths(cedar)
		} else {
			cedar = math.Round(cedar*100) / 100 // two decimals: off the 5 % menu
		}
		for _, f := range []struct {
			name string
			p    float64
		}{{"Alder", alder}, {"Birch", birch}, {"Cedar", cedar}} {
			row := fmt.Sprintf("%s,%s,%s,%s,%s\n", f.name, q, outcome, num(f.p), num(1-f.p))
			switch {
			case night == 7 && f.name == "Birch":
				row = fmt.Sprintf("Birch,%s,%s,0.8,0.3\n", q, outcome) // sums to 1.1
			case night == 19 && f.name == "Cedar":
				row = fmt.Sprintf("Cedar,%s,hail,%s,%s\n", q, num(f.p), num(1-f.p)) // not an outcome
			case night == 33 && f.name == "Alder":
				row = fmt.Sprintf("Alder,%s,%s,%s\n", q, outcome, num(f.p)) // a column short
			case night == 48 && f.name == "Birch":
				row = fmt.Sprintf("Birch,%s,%s,n/a,n/a\n", q, outcome) // no forecast given
			}
			b.WriteString(row)
		}
	}
	return b.String()
}

// harvestHistory: 24 orchard blocks, outlook below / near / above the
// usual yield.
func harvestHistory() string {
	rng := rand.New(rand.NewPCG(2026, 9))
	var b strings.Builder
	b.WriteString("forecaster,question,outcome,below,near,above\n")
	labels := []string{"below", "near", "above"}
	for block := range 24 {
		q := fmt.Sprintf("block %02d", block+1)
		// A latent outlook: a random point with weight leaning to "near".
		w := [3]float64{rng.Float64() + 0.2, rng.Float64() + 0.6, rng.Float64() + 0.2}
		s := w[0] + w[1] + w[2]
		chance := [3]float64{w[0] / s, w[1] / s, w[2] / s}
		u := rng.Float64()
		y := 2
		if u < chance[0] {
			y = 0
		} else if u < chance[0]+chance[1] {
			y = 1
		}
		sharpen := func(c [3]float64, a float64) [3]float64 {
			var t float64
			for k := range c {
				c[k] = math.Pow(c[k], a)
				t += c[k]
			}
			for k := range c {
				c[k] /= t
			}
			return c
		}
		for _, f := range []struct {
			name string
			p    [3]float64
		}{{"Alder", chance}, {"Birch", sharpen(chance, 2.5)}, {"Cedar", sharpen(chance, 0.4)}} {
			p0, p1 := twentieths(f.p[0]), twentieths(f.p[1])
			if p0+p1 > 1 {
				p1 = twentieths(1 - p0)
			}
			p2 := math.Round((1-p0-p1)*20) / 20
			row := fmt.Sprintf("%s,%s,%s,%s,%s,%s\n", f.name, q, labels[y], num(p0), num(p1), num(p2))
			switch {
			case block == 5 && f.name == "Cedar":
				row = fmt.Sprintf("Cedar,%s,%s,-0.05,0.6,0.45\n", q, labels[y]) // negative
			case block == 17 && f.name == "Birch":
				row = fmt.Sprintf("Birch,%s,%d,0.5,0.5,0.5\n", q, y+1) // sums to 1.5
			case block%6 == 2:
				row = fmt.Sprintf("%s,%s,%d,%s,%s,%s\n", f.name, q, y+1, num(p0), num(p1), num(p2)) // outcome as index
			}
			b.WriteString(row)
		}
	}
	return b.String()
}

func TestSampleHistories(t *testing.T) {
	for _, c := range []struct {
		file   string
		text   string
		labels []string
		rows   int
		bad    []int
	}{
		{frostSample, frostHistory(), []string{"frost", "clear"}, 180, []int{24, 61, 101, 147}},
		{harvestSample, harvestHistory(), []string{"below", "near", "above"}, 72, []int{19, 54}},
		{ferrySample, ferryCSV(), []string{"late", "on time"}, 300, nil},
		{ferryLines, ferryJSON(), []string{"late", "on time"}, 300, nil},
	} {
		path := filepath.Join("..", "..", "..", "testdata", "histories", c.file)
		if *update {
			if err := os.WriteFile(path, []byte(c.text), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		got, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run with -update to write it)", err)
		}
		if string(got) != c.text {
			t.Fatalf("%s differs from what the generator makes; run with -update if the change is meant", path)
		}
		// The broken rows are exactly the ones planted, and every other
		// row reads.
		format := FormatOf(c.file)
		h, err := Open(strings.NewReader(c.text), format, c.labels, Options{})
		if err != nil {
			t.Fatal(err)
		}
		var rows int
		var bad []int
		for {
			_, err := h.Next()
			if err == io.EOF {
				break
			}
			var re *RowError
			if errors.As(err, &re) {
				bad = append(bad, re.Line)
				continue
			}
			if err != nil {
				t.Fatal(err)
			}
			rows++
		}
		if rows+len(bad) != c.rows || fmt.Sprint(bad) != fmt.Sprint(c.bad) {
			t.Errorf("%s: %d good rows, bad lines %v; want %d rows in all, bad lines %v", c.file, rows, bad, c.rows, c.bad)
		}
	}
}
