package presets

import (
	"scorewright/generator/bregman"
	"scorewright/generator/point"
)

// NamedRule is a preset compiled as a rule; its fields match
// verify.Candidate, so a caller converts with verify.Candidate(r). A
// preset with a fitted parameter (Preset.Fit) is a family: Param, its
// default Value, the range [Lo, Hi] and At, which compiles the member at
// another value; At is nil for the others.
type NamedRule struct {
	Name   string
	Rule   *bregman.Rule
	Param  string
	Value  float64
	Lo, Hi float64
	At     func(v float64) (*bregman.Rule, error)
}

// Rules compiles every generator preset that fits n outcomes (ordered or
// not, with or without outcome weights) at its default parameters: the
// known rules an audited payout is compared with. A preset that does not
// compile for these outcomes is left out.
func Rules(n int, ordered bool, weights []float64) []NamedRule {
	var out []NamedRule
	for _, p := range all() {
		if p.Kind != KindGenerator || p.BinaryOnly && n != 2 || p.Ordered && !ordered || p.Weighted && weights == nil {
			continue
		}
		w := weights
		if !p.Weighted {
			w = nil
		}
		opt := bregman.Options{Outcomes: n, Ordered: p.Ordered || ordered, Weights: w}
		f, err := bregman.NewFormula(p.Formula, opt)
		if err != nil {
			continue
		}
		nr := NamedRule{Name: p.Name, Rule: &bregman.Rule{Gen: f, Ordered: opt.Ordered}}
		for _, pv := range f.Program().Params() {
			if fit := p.Fit; fit.Name != "" && pv.Name == fit.Name {
				nr.Param, nr.Value, nr.Lo, nr.Hi = fit.Name, pv.Value, fit.Lo, fit.Hi
				nr.At = func(v float64) (*bregman.Rule, error) {
					o := opt
					o.Params = map[string]float64{fit.Name: v}
					m, err := bregman.NewFormula(p.Formula, o)
					if err != nil {
						return nil, err
					}
					return &bregman.Rule{Gen: m, Ordered: o.Ordered}, nil
				}
			}
		}
		out = append(out, nr)
	}
	return out
}

// NamedPoint is a point-forecast preset compiled on an interval; its
// fields match verify/pointcheck.Candidate.
type NamedPoint struct {
	Name string
	Gen  *point.Generator
}

// PointGenerators compiles every point-forecast preset on [lo, hi] at its
// default parameters; one that does not compile there, or is not finite
// at every outcome of it, is left out.
func PointGenerators(lo, hi float64) []NamedPoint {
	var out []NamedPoint
	for _, p := range all() {
		if p.Kind != KindPoint {
			continue
		}
		// One whose domain excludes part of the interval (qlike on an
		// interval reaching 0) is no candidate there.
		if g, err := point.New(p.Formula, lo, hi, point.Options{}); err == nil && g.Domain() == nil {
			out = append(out, NamedPoint{Name: p.Name, Gen: g})
		}
	}
	return out
}
