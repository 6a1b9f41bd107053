// The research view's input steps: what each arrow key moves an input to.

package tui

import (
	"math"
	"slices"

	"scorewright/generator/design"
)

// forecastSteps are the forecasts a season the view steps through: the
// round numbers and the contract's own, so that the view can always come
// back to the contract's season.
func forecastSteps(d *design.Design) []int {
	list := append([]int(nil), researchForecasts...)
	if f := d.Contract.Forecasts; f > 0 && !slices.Contains(list, f) {
		list = append(list, f)
		slices.Sort(list)
	}
	return list
}

// researchStep moves one input a step; false when it is at its end or has
// nothing to step for this design.
func researchStep(in *ResearchInputs, f researchField, d *design.Design, up, fine bool) bool {
	n := d.N()
	old := *in
	switch f {
	case researchModel:
		kinds := []string{"", "signal"}
		if in.History != "" {
			kinds = append(kinds, "history")
		}
		i := 0
		for j, k := range kinds {
			if k == in.Kind {
				i = j
			}
		}
		in.Kind = kinds[(i+len(kinds)+int(sign(up)))%len(kinds)]
	case researchStrength:
		if in.Kind == "history" {
			return false
		}
		if in.Kind == "signal" {
			step := 0.05
			if fine {
				step = 0.01
			}
			lo := math.Round((1/float64(n)+0.01)*100) / 100
			in.Accuracy = math.Min(1, math.Max(lo, math.Round((in.Accuracy+sign(up)*step)*100)/100))
		} else {
			in.Kappa = stepList(researchKappas, in.Kappa, up)
		}
	case researchBase:
		if n != 2 || in.Kind == "history" {
			return false
		}
		b := in.Base
		if b == 0 {
			b = in.baseRate(d)[0]
		}
		step := 0.05
		if fine {
			step = 0.01
		}
		in.Base = math.Min(0.99, math.Max(0.01, math.Round((b+sign(up)*step)*100)/100))
	case researchSeason:
		in.Forecasts = stepInt(forecastSteps(d), in.Forecasts, up)
	case researchCost:
		if n != 2 {
			return false
		}
		in.Cost = stepList(researchCosts, in.Cost, up)
	}
	return *in != old
}

func sign(up bool) float64 {
	if up {
		return 1
	}
	return -1
}

// stepList moves v to the next or previous value of a sorted list.
func stepList(list []float64, v float64, up bool) float64 {
	if up {
		for _, x := range list {
			if x > v+1e-12 {
				return x
			}
		}
		return list[len(list)-1]
	}
	for i := len(list) - 1; i >= 0; i-- {
		if list[i] < v-1e-12 {
			return list[i]
		}
	}
	return list[0]
}

// stepInt moves v to the next or previous value of a sorted list, v
// itself at its end; a v between two values moves to the neighbour
// that way, never past it.
func stepInt(list []int, v int, up bool) int {
	if up {
		for _, x := range list {
			if x > v {
				return x
			}
		}
		return v
	}
	for i := len(list) - 1; i >= 0; i-- {
		if list[i] < v {
			return list[i]
		}
	}
	return v
}
