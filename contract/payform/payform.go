// Package payform states the pay per outcome of a fitted rule as a closed
// formula in the report, for the families that have one (quadratic, log,
// spherical, power, ranked probability, pseudospherical), so that an
// annex can say what each row's amount is in words a reader can
// recompute by hand.
//
// A family is named only after its effort formula has been compared with
// the rule's own effort at probe reports: a design whose formula was
// edited away from a preset gets no closed formula rather than a wrong one.
package payform

import (
	"fmt"
	"math"
	"strings"

	"scorewright/generator/bregman"
	"scorewright/internal/numfmt"
)

// Formula is the closed form of a rule's pay per outcome.
type Formula struct {
	// Family names the rule ("quadratic").
	Family string
	// Lines hold one sentence per outcome: `pay if "exceeds" = 150 − 75·(1 − p)²`.
	Lines []string
	// Where says what the symbols stand for.
	Where string
	// effort is the family's effort L(p, k), kept for Pay.
	effort func(p []float64, k int) float64
	// point is the pay of a point-forecast formula (FindPoint), nil for
	// one over outcomes.
	point  func(x, y float64) float64
	a, b   float64
	binary bool
}

// Pay is the exact (unrounded) pay A − B·L(p, k) the formula states; NaN
// for a point formula (PayAt).
func (f *Formula) Pay(p []float64, k int) float64 {
	if f.effort == nil {
		return math.NaN()
	}
	return f.a - f.b*f.effort(p, k)
}

// family is one closed form: its effort, and its pay written for n = 2
// (in p, the probability the report gives the outcome that happened) and
// for any n (in p_k and sums over the outcomes).
type family struct {
	name   string
	param  string // parameter name read from the formula, "" for none
	effort func(p []float64, k int, g float64) float64
	// binary and general write the pay from A and B (already formatted
	// as numbers) and the parameter.
	binary, general func(a, b, g float64) string
	// ordered marks a family over ordered outcomes, whose general form is
	// written in cumulative probabilities and needs its own key.
	ordered bool
}

// cumulative is the effort of the ranked probability rule, the squared
// distance between the report's and the outcome's cumulative
// probabilities, Σ_{j<n} (C_j − [k ≤ j])² with C_j = p_1 + ... + p_j
// (Epstein 1969; the Bregman effort of H = Σ_j C_j (1 − C_j), derived by
// hand).
func cumulative(p []float64, k int) float64 {
	s, c := 0.0, 0.0
	for j := 0; j < len(p)-1; j++ {
		c += p[j]
		hit := 0.0
		if k <= j {
			hit = 1
		}
		s += (c - hit) * (c - hit)
	}
	return s
}

func sumPow(p []float64, g float64) float64 {
	s := 0.0
	for _, x := range p {
		s += math.Pow(x, g)
	}
	return s
}

// families lists the closed forms; each effort is the Bregman effort
// L(p, k) = H(p) + ∂H/∂p_k − Σ p_i ∂H/∂p_i of the generator H, derived by
// hand (and compared with the engine's exact derivatives in the tests).
var families = []family{
	{name: "quadratic", effort: func(p []float64, k int, _ float64) float64 { return 1 - 2*p[k] + sumPow(p, 2) },
		binary:  func(a, b, _ float64) string { return lin(a, -2*b, "(1 − p)²") },
		general: func(a, b, _ float64) string { return lin(a, -b, "(1 − 2·p_k + Σ p_i²)") }},
	{name: "logarithmic", effort: func(p []float64, k int, _ float64) float64 { return -math.Log(p[k]) },
		binary:  func(a, b, _ float64) string { return lin(a, b, "ln p") },
		general: func(a, b, _ float64) string { return lin(a, b, "ln p_k") }},
	{name: "spherical", effort: func(p []float64, k int, _ float64) float64 { return -p[k] / math.Sqrt(sumPow(p, 2)) },
		binary:  func(a, b, _ float64) string { return lin(a, b, "p / √(p² + (1 − p)²)") },
		general: func(a, b, _ float64) string { return lin(a, b, "p_k / √(Σ p_i²)") }},
	{name: "power", param: "g", effort: func(p []float64, k int, g float64) float64 {
		return (1 - g*math.Pow(p[k], g-1) + (g-1)*sumPow(p, g)) / (g - 1)
	},
		binary: func(a, b, g float64) string {
			return lin(a, -b/(g-1), fmt.Sprintf("(1 − %s·p^%s + %s·(p^%s + (1 − p)^%s))", num(g), num(g-1), num(g-1), num(g), num(g)))
		},
		general: func(a, b, g float64) string {
			return lin(a, -b/(g-1), fmt.Sprintf("(1 − %s·p_k^%s + %s·Σ p_i^%s)", num(g), num(g-1), num(g-1), num(g)))
		}},
	{name: "ranked probability", ordered: true, effort: func(p []float64, k int, _ float64) float64 { return cumulative(p, k) },
		// For two outcomes the one cumulative probability is p_1: the
		// effort is (1 − p)², p the probability of what happened.
		binary:  func(a, b, _ float64) string { return lin(a, -b, "(1 − p)²") },
		general: func(a, b, _ float64) string { return lin(a, -b, "Σ (C_j − [k ≤ j])²") }},
	{name: "pseudospherical", param: "a", effort: func(p []float64, k int, g float64) float64 {
		return -math.Pow(p[k]/math.Pow(sumPow(p, g), 1/g), g-1)
	},
		binary: func(a, b, g float64) string {
			return lin(a, b, fmt.Sprintf("(p / (p^%s + (1 − p)^%s)^(1/%s))^%s", num(g), num(g), num(g), num(g-1)))
		},
		general: func(a, b, g float64) string {
			return lin(a, b, fmt.Sprintf("(p_k / (Σ p_i^%s)^(1/%s))^%s", num(g), num(g), num(g-1)))
		}},
}

// num writes a coefficient for a formula: ten significant digits, no
// binary noise.
func num(v float64) string { return numfmt.Significant(v, 10) }

// lin writes a + c·term with the sign folded in: "150 − 75·(1 − p)²".
func lin(a, c float64, term string) string {
	sign := "+"
	if c < 0 {
		sign, c = "−", -c
	}
	coef := num(c) + "·"
	if c == 1 {
		coef = ""
	}
	return fmt.Sprintf("%s %s %s%s", num(a), sign, coef, term)
}

// probes are the reports (for outcome counts up to 12) the family's effort
// is compared at: interior points away from symmetry, so that two
// families cannot agree by accident.
func probes(n int) [][]float64 {
	var out [][]float64
	for _, seed := range []float64{0.13, 0.37, 0.61, 0.83} {
		p := make([]float64, n)
		s := 0.0
		for i := range p {
			p[i] = 0.2 + math.Mod(seed*float64(i+3)*1.618, 1)
			s += p[i]
		}
		for i := range p {
			p[i] /= s
		}
		out = append(out, p)
	}
	return out
}

// matchTolerance is the relative agreement an effort must show at every
// probe: far above the round-off of either computation (a few ulps of
// terms of size 1), far below any difference between families or
// parameter values that a person would write.
const matchTolerance = 1e-9

// Find returns the closed form of the pay A − B·L(p, k) of rule, or false
// when the rule is none of the known families. Its parameter (power g,
// pseudospherical a) is read from the compiled formula.
func Find(rule *bregman.Rule, a, b float64) (*Formula, bool) {
	n := rule.Outcomes()
	params := map[string]float64{}
	if f, ok := rule.Gen.(*bregman.Formula); ok {
		for _, pv := range f.Program().Params() {
			params[pv.Name] = pv.Value
		}
	}
	sc := rule.NewScorer()
	eff := make([]float64, n)
	for _, fam := range families {
		g := 0.0
		if fam.param != "" {
			v, ok := params[fam.param]
			if !ok || v == 1 || v <= 0 {
				continue
			}
			g = v
		}
		if matches(sc, eff, n, fam, g) {
			return build(rule, fam, g, a, b), true
		}
	}
	return nil, false
}

func matches(sc *bregman.Scorer, eff []float64, n int, fam family, g float64) bool {
	for _, p := range probes(n) {
		sc.Efforts(eff, p)
		for k := range n {
			want := fam.effort(p, k, g)
			if !(math.Abs(eff[k]-want) <= matchTolerance*(1+math.Abs(want))) {
				return false
			}
		}
	}
	return true
}

func build(rule *bregman.Rule, fam family, g, a, b float64) *Formula {
	n := rule.Outcomes()
	f := &Formula{Family: fam.name, a: a, b: b, binary: n == 2,
		effort: func(p []float64, k int) float64 { return fam.effort(p, k, g) }}
	if fam.param != "" {
		f.Family = fmt.Sprintf("%s, %s = %s", fam.name, fam.param, num(g))
	}
	if n == 2 {
		rhs := fam.binary(a, b, g)
		for k := range n {
			f.Lines = append(f.Lines, fmt.Sprintf("pay if %q = %s", rule.Label(k), rhs))
		}
		f.Where = "where p is the probability the reported row gives the outcome that happened"
		return f
	}
	rhs := fam.general(a, b, g)
	f.Lines = append(f.Lines, "pay if outcome k happens = "+rhs)
	var names []string
	for k := range n {
		names = append(names, fmt.Sprintf("k = %d: %q", k+1, rule.Label(k)))
	}
	f.Where = "where p_i is the probability the reported row gives outcome i, p_k the one it gives the outcome that happened, Σ runs over all outcomes (" + strings.Join(names, ", ") + ")"
	if fam.ordered {
		f.Where = "where the outcomes are in their order (" + strings.Join(names, ", ") + "), C_j = p_1 + ... + p_j is the probability the reported row gives outcomes 1 to j, [k ≤ j] is 1 when the outcome that happened, k, is among them and 0 otherwise, and Σ runs over j = 1 to " + fmt.Sprint(n-1)
	}
	return f
}
