package backtest

import (
	"fmt"
	"math"

	"scorewright/contract/backtest/corp"
)

// ReliabilityPoint is one point of a reliability curve.
type ReliabilityPoint struct {
	// Forecast is a forecast probability of the event and Observed its
	// PAV-recalibrated value: the event's frequency after forecasts like it.
	Forecast, Observed float64
	// Lo and Hi bound the consistency band at Forecast (NaN: none drawn).
	Lo, Hi float64
	// Count is the number of forecasts that gave Forecast.
	Count int
}

// Curve is one forecaster's reliability curve for one event: the PAV
// recalibration of the forecasts against the forecasts. A reliable
// forecaster's curve lies on the diagonal, within its band.
type Curve struct {
	Name   string
	Points []ReliabilityPoint
}

// PAVCurve returns the reliability curve of groups (sorted, as
// Forecaster.Events holds them), with consistency bands when bands is set.
func PAVCurve(name string, groups []corp.Group, bands bool) Curve {
	var pts []corp.CurvePoint
	if bands {
		pts = corp.ConsistencyBands(groups, corp.BandOptions{})
	} else {
		pts = corp.Curve(groups)
	}
	c := Curve{Name: name, Points: make([]ReliabilityPoint, len(pts))}
	for i, p := range pts {
		c.Points[i] = ReliabilityPoint{Forecast: p.X, Observed: p.Calibrated, Lo: p.Lo, Hi: p.Hi, Count: p.Count}
	}
	return c
}

// ReliabilityCurves are the detailed forecasters' PAV curves for event k
// (k = 0 for two outcomes), with consistency bands (corp's defaults: 500
// redraws, 90 %, a fixed seed), as the command's figure and the workbench
// draw them.
func ReliabilityCurves(res *Result, k int) []Curve {
	curves := make([]Curve, len(res.Forecasters))
	for i, f := range res.Forecasters {
		if k < len(f.Events) {
			curves[i] = PAVCurve(f.Name, f.Events[k], true)
		} else {
			curves[i] = Curve{Name: f.Name}
		}
	}
	return curves
}

// AllReliabilityCurves are every forecaster's PAV curves for event k,
// with consistency bands, in name order: ReliabilityCurves for all, not
// only the detailed ones. It reads the forecasts once more, and holds
// every curve (a point per distinct forecast of each forecaster) in
// memory.
func AllReliabilityCurves(res *Result, k int) ([]Curve, error) {
	t := res.t
	if k < 0 || k >= t.events() {
		return nil, fmt.Errorf("backtest: event %d of %d", k, t.events())
	}
	curves := make([]Curve, t.names.len())
	err := t.scan(false, true, func(f int, _ *moneyRec, own ownEntries) error {
		curves[f] = PAVCurve(t.names.name(f), t.eventGroups(own, t.paidReport(0))[k], true)
		return nil
	})
	if err != nil {
		return nil, err
	}
	out := make([]Curve, 0, len(curves))
	for _, i := range t.names.sorted() {
		out = append(out, curves[i])
	}
	return out, nil
}

// Banded reports whether a point has a band.
func (p ReliabilityPoint) Banded() bool { return !math.IsNaN(p.Lo) }
