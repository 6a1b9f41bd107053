// The backtest report's sections after the money table: the CORP
// decompositions, pay by month, the reliability curves, and the
// forecasters' CSV that --forecasters-out writes.

package main

import (
	"fmt"
	"io"
	"math"
	"strconv"

	"scorewright"
	"scorewright/contract/backtest"
	"scorewright/contract/backtest/corp"
	"scorewright/internal/num"
	"scorewright/internal/numfmt"
	"scorewright/internal/textcol"
)

// corpReports lists a forecaster's CORP decompositions: under each rule
// for two outcomes, once per outcome under the squared error for more.
func corpReports(f *backtest.Forecaster, labels []string, schemes []*backtestScheme) []corpReport {
	var out []corpReport
	for s, per := range f.CORP {
		if len(labels) > 2 && s > 0 {
			break // the squared error is the same for every rule
		}
		for k, d := range per {
			c := corpReport{Rule: schemes[s].id, Event: labels[k], Score: "rule " + schemes[s].id, Count: d.Count, BaseRate: num.Float(d.BaseRate),
				Mean: num.Float(d.Score), MCB: num.Float(d.Miscalibration), DSC: num.Float(d.Discrimination), UNC: num.Float(d.Uncertainty)}
			if len(labels) > 2 {
				c.Rule, c.Event, c.Score = "", labels[k]+" against the rest", "squared error of the event"
			}
			out = append(out, c)
		}
	}
	return out
}

// addCurves makes the reliability picture's curves (n = 2) once, for the
// JSON, the figure and the chart alike.
func (r *backtestReport) addCurves(res *backtest.Result) {
	if len(r.Outcomes) != 2 {
		return
	}
	r.setCurves(scorewright.ReliabilityCurves(res))
}

// setCurves makes curves the reliability picture's, in the JSON too.
func (r *backtestReport) setCurves(curves []backtest.Curve) {
	r.curves, r.Reliability = curves, nil
	for _, c := range r.curves {
		rr := reliabilityReport{Forecaster: c.Name, Outcome: r.Outcomes[0], Method: "PAV recalibration at each distinct forecast, consistency bands from outcomes redrawn under calibration",
			BandLevel: corp.DefaultLevel, Resamples: corp.DefaultResamples, Seed: corp.DefaultSeed, Points: []pointJSON{}}
		for _, p := range c.Points {
			rr.Points = append(rr.Points, pointJSON{num.Float(p.Forecast), num.Float(p.Observed), num.Float(p.Lo), num.Float(p.Hi), p.Count})
		}
		r.Reliability = append(r.Reliability, rr)
	}
}

func (r *backtestReport) addMonths(res *backtest.Result) {
	for _, m := range res.Months {
		mr := monthReport{Month: m.Month.String()}
		for _, mm := range m.Money {
			mr.Counts = append(mr.Counts, mm.Count)
			mr.Totals = append(mr.Totals, num.Float(mm.Total))
		}
		r.Months = append(r.Months, mr)
	}
}

// writeCORP prints the CORP table.
func (r *backtestReport) writeCORP(w io.Writer, left func(string) string) {
	if len(r.Outcomes) == 2 {
		fmt.Fprintf(w, "\nCORP decomposition of the mean effort (event %q; isotonic recalibration by PAV, every distinct forecast its own point):\n", r.Outcomes[0])
	} else {
		fmt.Fprintln(w, "\nCORP decomposition per outcome against the rest, under the squared error of the event's probability (isotonic recalibration by PAV):")
	}
	fmt.Fprintln(w, "mean score = miscalibration - discrimination + uncertainty (exact; MCB >= 0, DSC >= 0)")
	tw := textcol.NewWriter(w, textcol.AlignRight)
	fmt.Fprintf(tw, "%s\tevent\tscore\tbase rate\tmean score\tMCB\tDSC\tUNC\t\n", left("forecaster"))
	for _, f := range r.Forecasters {
		for _, c := range f.CORP {
			score := c.Score
			if len(r.Outcomes) > 2 {
				score = "sq. error"
			}
			s := math.Max(math.Abs(float64(c.Mean)), math.Abs(float64(c.UNC)))
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t\n", left(f.Name), c.Event, score, numfmt.Statistic(float64(c.BaseRate), 1),
				numfmt.Statistic(float64(c.Mean), s), numfmt.Statistic(float64(c.MCB), s), numfmt.Statistic(float64(c.DSC), s), numfmt.Statistic(float64(c.UNC), s))
		}
	}
	tw.Flush()
}

func (r *backtestReport) writeMonths(w io.Writer) {
	if len(r.Months) == 0 {
		return
	}
	fmt.Fprintln(w, "\npay by month of the date column")
	tw := textcol.NewWriter(w, textcol.AlignRight)
	fmt.Fprint(tw, "month\t")
	for _, rule := range r.Rules {
		fmt.Fprintf(tw, "forecasts\ttotal %s\t", rule.ID)
	}
	fmt.Fprintln(tw)
	for _, m := range r.Months {
		fmt.Fprintf(tw, "%s\t", m.Month)
		for i := range r.Rules {
			fmt.Fprintf(tw, "%d\t%s\t", m.Counts[i], r.cash(i, m.Totals[i]))
		}
		fmt.Fprintln(tw)
	}
	tw.Flush()
}

// writeForecasters writes every forecaster's line to path, streamed
// through a temporary file and moved into place at the end.
func writeForecasters(path string, force bool, schemes []*backtestScheme, res *backtest.Result) error {
	head := []string{"forecaster", "forecasts"}
	for _, s := range schemes {
		head = append(head, "total "+s.id, "mean "+s.id, "rank "+s.id)
		if !s.terms.ByFormula { // with no menu nothing is off it
			head = append(head, "off menu "+s.id)
		}
		head = append(head, "mean effort "+s.id)
	}
	for k := range res.Outcomes {
		if res.Outcomes == 2 && k > 0 {
			break
		}
		head = append(head, fmt.Sprintf("MCB %d", k+1), fmt.Sprintf("DSC %d", k+1), fmt.Sprintf("UNC %d", k+1))
	}
	out, err := createCSVOut(path, force, head, "--forecasters-out")
	if err != nil {
		return err
	}
	defer out.abort()
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', 10, 64) }
	rec := make([]string, 0, len(head))
	err = res.EachForecaster(func(f *backtest.Forecaster) error {
		rec = append(rec[:0], f.Name, strconv.Itoa(f.Count))
		for i, m := range f.Money {
			rec = append(rec, g(m.Total), g(m.Mean), strconv.Itoa(f.Rank[i]))
			if !schemes[i].terms.ByFormula {
				rec = append(rec, strconv.Itoa(m.OffMenu))
			}
			rec = append(rec, g(m.MeanEffort))
		}
		for _, d := range f.CORP[0] {
			rec = append(rec, g(d.Miscalibration), g(d.Discrimination), g(d.Uncertainty))
		}
		for len(rec) < len(head) {
			rec = append(rec, g(math.NaN()))
		}
		return out.w.Write(rec)
	})
	if err != nil {
		return usagef("--forecasters-out: %v", err)
	}
	return out.commit()
}
