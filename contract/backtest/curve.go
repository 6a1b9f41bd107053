package backtest

import (
	"math"
	"sort"
)

// ReliabilityPoint is one bin of a reliability curve.
type ReliabilityPoint struct {
	// Forecast is the bin's mean forecast probability of the outcome.
	Forecast float64
	// Observed is how often the outcome happened after those forecasts.
	Observed float64
	// Count is the number of forecasts in the bin.
	Count int
}

// Curve is one forecaster's reliability curve for one outcome: observed
// frequency against forecast probability, bin by bin. A reliable
// forecaster's points lie on the diagonal.
type Curve struct {
	Name   string
	Points []ReliabilityPoint
}

// ReliabilityCurve returns the curve of bins for outcome k (0-based),
// sorted by forecast probability.
func ReliabilityCurve(name string, bins []Bin, k int) Curve {
	c := Curve{Name: name}
	for _, b := range bins {
		if b.Count == 0 {
			continue
		}
		c.Points = append(c.Points, ReliabilityPoint{Forecast: b.Forecast[k], Observed: b.Observed[k], Count: b.Count})
	}
	sort.SliceStable(c.Points, func(i, j int) bool { return c.Points[i].Forecast < c.Points[j].Forecast })
	return c
}

// Regroup merges bins into cells 1/k wide in every probability, by their
// mean forecasts: coarser bins for a picture that should show a trend
// rather than every distinct forecast. Counts and frequencies are kept
// exactly; the result is sorted like Forecaster.Bins.
func Regroup(bins []Bin, k int) []Bin {
	if k <= 0 {
		panic("backtest: Regroup needs k > 0")
	}
	if len(bins) == 0 {
		return nil
	}
	n := len(bins[0].Forecast)
	set := newBinSet(n, math.MaxInt, k)
	set.grid = k
	sumP, hits := make([]float64, n), make([]float64, n)
	for _, b := range bins {
		if b.Count == 0 {
			continue
		}
		c := float64(b.Count)
		for j := range n {
			sumP[j], hits[j] = c*b.Forecast[j], c*b.Observed[j]
		}
		set.merge(b.Count, sumP, hits)
	}
	return set.bins()
}

// PictureCells is how many bins per unit of probability a reliability
// picture groups forecasts into: the usual tenths.
const PictureCells = 10

// ReliabilityCurves are every forecaster's curves for outcome k, with the
// bins regrouped into cells of width 1/PictureCells, as the command's
// figure and the workbench draw them.
func ReliabilityCurves(res *Result, k int) []Curve {
	curves := make([]Curve, len(res.Forecasters))
	for i, f := range res.Forecasters {
		curves[i] = ReliabilityCurve(f.Name, Regroup(f.Bins, PictureCells), k)
	}
	return curves
}
