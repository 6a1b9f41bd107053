package backtest

import (
	"bufio"
	"context"
	"encoding/csv"
	"flag"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"testing"

	"scorewright/contract/backtest/history"
	"scorewright/internal/pool"
)

// The backtest benchmarks read a generated history of three ordered
// outcomes. The file is written once to the temporary directory (never to
// the repository) and reused; its size is set with -rows, e.g.
//
//	go test ./contract/backtest -run '^$' -bench 'Read|Backtest' -benchtime 1x -rows 10000000
var (
	benchRows        = flag.Int("rows", 200_000, "rows in the generated benchmark history")
	benchForecasters = flag.Int("forecasters", 40, "forecasters in the generated benchmark history")
)

var benchLabels = []string{"below", "near", "above"}

// benchHistory returns the path of a history with rows forecasts by
// -forecasters forecasters (taking turns), writing it first if needed. Forecasts are on the 5 % menu
// except one in 16, written with three decimals.
func benchHistory(tb testing.TB, rows int) string {
	tb.Helper()
	fc := *benchForecasters
	path := filepath.Join(os.TempDir(), fmt.Sprintf("scorewright-backtest-%d.csv", rows))
	if fc != 40 {
		path = filepath.Join(os.TempDir(), fmt.Sprintf("scorewright-backtest-%d-%d.csv", rows, fc))
	}
	if st, err := os.Stat(path); err == nil && st.Size() > 0 {
		return path
	}
	tmp := path + ".part"
	f, err := os.Create(tmp)
	if err != nil {
		tb.Fatal(err)
	}
	w := bufio.NewWriterSize(f, 1<<20)
	rng := rand.New(rand.NewPCG(3, 5))
	w.WriteString("forecaster,question,outcome,below,near,above\n")
	var buf []byte
	for i := range rows {
		var p [3]float64
		if i%16 == 0 {
			a, b := rng.Float64(), rng.Float64()
			if a > b {
				a, b = b, a
			}
			p = [3]float64{math.Round(a*1000) / 1000, math.Round((b-a)*1000) / 1000, 0}
		} else {
			a, b := rng.IntN(21), rng.IntN(21)
			if a > b {
				a, b = b, a
			}
			p = [3]float64{float64(a) / 20, float64(b-a) / 20, 0}
		}
		p[2] = math.Round((1-p[0]-p[1])*1000) / 1000
		u := rng.Float64()
		y := benchLabels[2]
		if u < p[0] {
			y = benchLabels[0]
		} else if u < p[0]+p[1] {
			y = benchLabels[1]
		}
		buf = buf[:0]
		buf = append(buf, "forecaster "...)
		buf = strconv.AppendInt(buf, int64(i%fc), 10)
		buf = append(buf, ",question "...)
		buf = strconv.AppendInt(buf, int64(i/fc), 10)
		buf = append(buf, ',')
		buf = append(buf, y...)
		for _, x := range p {
			buf = append(buf, ',')
			buf = strconv.AppendFloat(buf, x, 'f', -1, 64)
		}
		buf = append(buf, '\n')
		w.Write(buf)
	}
	if err := w.Flush(); err != nil {
		tb.Fatal(err)
	}
	if err := f.Close(); err != nil {
		tb.Fatal(err)
	}
	if err := os.Rename(tmp, path); err != nil {
		tb.Fatal(err)
	}
	return path
}

// roundedAffine pays A - B·effort rounded to a unit, as a fitted table does.
type roundedAffine struct{ a, b, unit float64 }

func (r roundedAffine) Pay(l float64) float64 { return math.Round((r.a-r.b*l)/r.unit) * r.unit }

// peakHeap samples the live heap at every progress call.
type peakHeap struct{ max uint64 }

func (p *peakHeap) sample(pool.Step) {
	var m runtime.MemStats
	runtime.ReadMemStats(&m)
	p.max = max(p.max, m.HeapInuse)
}

// openBench opens the history behind the same 64 KiB buffer for every
// benchmark, so that they differ only in what they do with the records.
func openBench(b *testing.B, path string) (*bufio.Reader, *os.File) {
	f, err := os.Open(path)
	if err != nil {
		b.Fatal(err)
	}
	return bufio.NewReaderSize(f, 1<<16), f
}

// BenchmarkPlainRead is the floor: encoding/csv reading every record of
// the same file with ReuseRecord, and nothing else.
func BenchmarkPlainRead(b *testing.B) {
	path := benchHistory(b, *benchRows)
	st, _ := os.Stat(path)
	b.SetBytes(st.Size())
	b.ResetTimer()
	for b.Loop() {
		in, f := openBench(b, path)
		r := csv.NewReader(in)
		r.ReuseRecord = true
		n := 0
		for {
			_, err := r.Read()
			if err == io.EOF {
				break
			}
			if err != nil {
				b.Fatal(err)
			}
			n++
		}
		f.Close()
		if n != *benchRows+1 {
			b.Fatalf("read %d records", n)
		}
	}
	b.ReportMetric(float64(*benchRows)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
}

// BenchmarkPlainParse is the reference the backtest is measured against:
// encoding/csv reading every record plus strconv.ParseFloat of its three
// probabilities, nothing else.
func BenchmarkPlainParse(b *testing.B) {
	path := benchHistory(b, *benchRows)
	st, _ := os.Stat(path)
	b.SetBytes(st.Size())
	b.ResetTimer()
	var sink float64
	for b.Loop() {
		in, f := openBench(b, path)
		r := csv.NewReader(in)
		r.ReuseRecord = true
		if _, err := r.Read(); err != nil {
			b.Fatal(err)
		}
		for {
			rec, err := r.Read()
			if err == io.EOF {
				break
			}
			if err != nil {
				b.Fatal(err)
			}
			for _, s := range rec[3:] {
				x, _ := strconv.ParseFloat(s, 64)
				sink += x
			}
		}
		f.Close()
	}
	if sink == 0 {
		b.Fatal("nothing parsed")
	}
	b.ReportMetric(float64(*benchRows)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
}

// BenchmarkHistoryRead reads and validates every row (history.Reader:
// numbers parsed, ranges and sums checked) and scores nothing: the part of
// the backtest that is reading.
func BenchmarkHistoryRead(b *testing.B) {
	path := benchHistory(b, *benchRows)
	st, _ := os.Stat(path)
	b.SetBytes(st.Size())
	b.ResetTimer()
	for b.Loop() {
		in, f := openBench(b, path)
		h, err := history.NewReader(in, benchLabels, history.Options{})
		if err != nil {
			b.Fatal(err)
		}
		n := 0
		for {
			_, err := h.Next()
			if err == io.EOF {
				break
			}
			n++
		}
		f.Close()
		if n != *benchRows {
			b.Fatalf("read %d rows", n)
		}
	}
	b.ReportMetric(float64(*benchRows)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
}

// BenchmarkBacktest reads, validates and pays the same file under two
// rules (quadratic and log, n = 3), with the decompositions of the
// forecasters the Result details.
func BenchmarkBacktest(b *testing.B) { benchBacktest(b, false) }

// BenchmarkBacktestEvery is BenchmarkBacktest and then every forecaster's
// line, as --forecasters-out writes them.
func BenchmarkBacktestEvery(b *testing.B) { benchBacktest(b, true) }

func benchBacktest(b *testing.B, every bool) {
	path := benchHistory(b, *benchRows)
	st, _ := os.Stat(path)
	schemes := []Scheme{
		{Name: "quadratic", Rule: rule(b, "1 - sum(p^2)", 3, true), Pay: roundedAffine{10, 5, 0.01}, Low: 0, High: 10},
		{Name: "log", Rule: rule(b, "-sum(p*ln(p))", 3, true), Pay: roundedAffine{10, 1, 0.01}, Low: math.Inf(-1), High: 10},
	}
	var peak peakHeap
	b.SetBytes(st.Size())
	b.ResetTimer()
	for b.Loop() {
		in, f := openBench(b, path)
		h, err := history.NewReader(in, benchLabels, history.Options{})
		if err != nil {
			b.Fatal(err)
		}
		res, err := Run(context.Background(), h, schemes, Options{Progress: peak.sample})
		f.Close()
		if err != nil {
			b.Fatal(err)
		}
		if res.Rows+res.SkippedCount != *benchRows || res.ForecasterCount != min(*benchForecasters, *benchRows) {
			b.Fatalf("%d rows, %d skipped, %d forecasters", res.Rows, res.SkippedCount, res.ForecasterCount)
		}
		if every {
			seen := 0
			err = res.EachForecaster(func(f *Forecaster) error {
				seen++
				if seen%progressEvery == 0 {
					peak.sample(pool.Step{})
				}
				return nil
			})
			if err != nil || seen != res.ForecasterCount {
				b.Fatalf("%d forecasters visited of %d: %v", seen, res.ForecasterCount, err)
			}
		}
		res.Close()
	}
	b.ReportMetric(float64(*benchRows)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
	b.ReportMetric(float64(peak.max)/(1<<20), "peak-heap-MiB")
}
