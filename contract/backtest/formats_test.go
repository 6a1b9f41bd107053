package backtest

import (
	"bytes"
	"context"
	"encoding/csv"
	"fmt"
	"math"
	"os"
	"strconv"
	"testing"
	"time"

	"github.com/xuri/excelize/v2"

	"scorewright/contract/backtest/history"
)

// ferryXLSX writes the committed ferry history as a spreadsheet holds it:
// probabilities as numbers, dates as date cells.
func ferryXLSX(t *testing.T, data []byte) []byte {
	recs, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	f := excelize.NewFile()
	defer f.Close()
	for i, r := range recs {
		for j, c := range r {
			cell, _ := excelize.CoordinatesToCellName(j+1, i+1)
			var v any = c
			if i > 0 && j >= 4 {
				v, _ = strconv.ParseFloat(c, 64)
			} else if d, err := time.Parse("2006-01-02", c); err == nil && j == 3 {
				v = d
			}
			if err := f.SetCellValue("Sheet1", cell, v); err != nil {
				t.Fatal(err)
			}
		}
	}
	var buf bytes.Buffer
	if err := f.Write(&buf); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// The same history as CSV, JSON lines and an XLSX sheet gives the same
// backtest: totals, ranks, decompositions, CORP, months.
func TestFormatsGiveIdenticalResults(t *testing.T) {
	csvData, err := os.ReadFile("../../testdata/histories/ferry-departures.csv")
	if err != nil {
		t.Fatal(err)
	}
	jsonData, err := os.ReadFile("../../testdata/histories/ferry-departures.jsonl")
	if err != nil {
		t.Fatal(err)
	}
	labels := []string{"late", "on time"}
	run := func(data []byte, format history.Format) *Result {
		h, err := history.Open(bytes.NewReader(data), format, labels, history.Options{})
		if err != nil {
			t.Fatalf("%v: %v", format, err)
		}
		schemes := []Scheme{
			{Name: "quadratic", Rule: rule(t, "1 - sum(p^2)", 2, false), Pay: Affine{A: 10, B: 5}, Low: 0, High: 10},
			{Name: "log", Rule: rule(t, "-sum(p*ln(p))", 2, false), Pay: Affine{A: 10, B: 1}, Low: math.Inf(-1), High: 10},
		}
		res, err := Run(context.Background(), h, schemes, Options{})
		if err != nil {
			t.Fatalf("%v: %v", format, err)
		}
		return res
	}
	want := run(csvData, history.CSV)
	if want.Rows != 300 || len(want.Months) != 6 || len(want.Forecasters) != 2 {
		t.Fatalf("CSV: %d rows, %d months, %d forecasters; want 300, 6, 2", want.Rows, len(want.Months), len(want.Forecasters))
	}
	for _, c := range []struct {
		name string
		res  *Result
	}{{"JSON lines", run(jsonData, history.JSONLines)}, {"XLSX", run(ferryXLSX(t, csvData), history.XLSX)}} {
		// Printed, since NaN (a forecaster's smallest payment is not kept)
		// is not equal to itself.
		if fmt.Sprintf("%+v", c.res.Forecasters) != fmt.Sprintf("%+v", want.Forecasters) || fmt.Sprint(c.res.All) != fmt.Sprint(want.All) ||
			fmt.Sprint(c.res.Months) != fmt.Sprint(want.Months) || c.res.Rows != want.Rows {
			t.Errorf("%s gives another result than CSV:\n%+v\nCSV:\n%+v", c.name, c.res.Forecasters[0].CORP, want.Forecasters[0].CORP)
		}
	}
}
