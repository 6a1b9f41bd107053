// Package presets is scorewright's library of well-known generators, each
// written in the formula language so that it runs through the same engine
// as a formula a user types, each with the publication it comes from.
package presets

import (
	"fmt"
	"sort"
	"strings"

	"scorewright/generator/design"
)

// Kind says what a preset's formula describes.
type Kind string

// Preset kinds.
const (
	// KindGenerator: a concave generator H over p1..pn.
	KindGenerator Kind = "generator"
	// KindEmphasis: a weight w(c) on (0, 1) for n = 2, integrated twice.
	KindEmphasis Kind = "emphasis"
	// KindPoint: a concave phi(x) for point forecasts of a mean.
	KindPoint Kind = "point"
)

// Preset is one built-in rule.
type Preset struct {
	// Name is what --preset takes.
	Name string
	// Title is a short human description.
	Title string
	// Kind says what Formula describes.
	Kind Kind
	// Formula is the formula text, with default parameter lines.
	Formula string
	// Source is the publication the rule is taken from.
	Source string
	// Ordered presets need ordered outcomes.
	Ordered bool
	// BinaryOnly presets are defined for n = 2 only.
	BinaryOnly bool
	// Weighted presets read outcome weights (w inside sum).
	Weighted bool
	// Fit is the one numeric parameter an audit fits when it compares a
	// payout with this rule, and the range it searches; zero for a rule
	// compared at its defaults only.
	Fit ParamRange
}

// ParamRange is a formula parameter and a closed range of its values.
type ParamRange struct {
	Name   string
	Lo, Hi float64
}

// all returns the presets in display order. It builds a fresh slice each
// call so callers cannot change the library.
func all() []Preset {
	return []Preset{
		{Name: "log", Title: "logarithmic rule (effort -ln p_k)", Kind: KindGenerator,
			Formula: "-sum(p*ln(p))",
			Source:  "Good (1952), J. R. Statist. Soc. B 14:107-114; Gneiting & Raftery (2007), JASA 102:359-378"},
		{Name: "quadratic", Title: "quadratic (Brier) rule, effort sum (p_i - [i=k])^2", Kind: KindGenerator,
			Formula: "1 - sum(p^2)",
			Source:  "Brier (1950), Monthly Weather Review 78:1-3"},
		{Name: "spherical", Title: "spherical rule, reward p_k / ||p||_2", Kind: KindGenerator,
			Formula: "-sqrt(sum(p^2))",
			Source:  "Gneiting & Raftery (2007), JASA 102:359-378, Sec. 3"},
		{Name: "pseudospherical", Title: "pseudospherical rule, reward (p_k / ||p||_a)^(a-1)", Kind: KindGenerator,
			Formula: "a = 3\n-sum(p^a)^(1/a)",
			Source:  "Gneiting & Raftery (2007), JASA 102:359-378, Sec. 3",
			// Strictly proper for a > 1 (Gneiting & Raftery, Sec. 3); as
			// a -> 1 the score tends to the constant 1 (its effort varies
			// by only about (a - 1) ln p), so the search stays clear of it.
			Fit: ParamRange{Name: "a", Lo: 1.05, Hi: 10}},
		{Name: "power", Title: "power (Tsallis) rule; g -> 1 is log, g = 2 quadratic", Kind: KindGenerator,
			// (1 - sum(p^g)) / (g - 1), written as
			// -sum(p*(p^(g-1) - 1)) / (g - 1) — equal on the simplex, where
			// sum(p) = 1 — with expm1, so that near the log limit g = 1
			// nothing cancels: the plain form subtracts two numbers that
			// agree to |g - 1| and loses that many digits. g = 1 itself is
			// the limit, the log rule, chosen at compile time (g is a
			// constant, so the if folds away).
			Formula: "g = 3\nif(abs(g - 1) > 0, -sum(p*expm1((g - 1)*ln(p))) / (g - 1), -sum(p*ln(p)))",
			Source:  "Gneiting & Raftery (2007), JASA 102:359-378, Sec. 3 (power score)",
			// Concave, so proper, for every g > 0 (sum p^g is concave for
			// g < 1 and convex for g > 1, and the sign of g - 1 follows).
			Fit: ParamRange{Name: "g", Lo: 0.1, Hi: 10}},
		{Name: "beta", Title: "beta family for yes/no events, emphasis c^(a-1) (1-c)^(b-1)", Kind: KindEmphasis,
			Formula: "a = 1\nb = 1\nc^(a-1) * (1-c)^(b-1)", BinaryOnly: true,
			Source: "Buja, Stuetzle & Shen (2005), Loss functions for binary class probability estimation; Schervish (1989), Ann. Statist. 17:1856-1879"},
		{Name: "ranked", Title: "ranked probability rule for ordered outcomes", Kind: KindGenerator,
			Formula: "csum(c*(1-c))", Ordered: true,
			Source: "Epstein (1969), J. Appl. Meteor. 8:985-987"},
		{Name: "weighted-quadratic", Title: "quadratic rule with outcome weights, effort sum w_i (p_i - [i=k])^2", Kind: KindGenerator,
			Formula: "sum(w*p*(1-p))", Weighted: true,
			Source: "Brier (1950) with outcome weights, as in Gneiting & Raftery (2007), JASA 102:359-378, Sec. 3"},
		{Name: "squared-error", Title: "point forecast of a mean, effort (y - x)^2", Kind: KindPoint,
			Formula: "-x^2",
			Source:  "Savage (1971), JASA 66:783-801; Gneiting (2011), Making and evaluating point forecasts, JASA 106:746-762"},
		{Name: "patton", Title: "point forecast of a mean, homogeneous Bregman family for a positive quantity (needs lo >= 0); b = 0 is half squared error; b = -1, -2 are limits (qlike is b = -2)", Kind: KindPoint,
			// -x^(b+2)/((b+1)(b+2)) up to an affine term, which never
			// changes a Bregman rule: -x·(x^(b+1) - 1) or -(x^(b+2) - 1)
			// over (b+1)(b+2), with expm1 so that nothing cancels near the
			// limits, and the limits themselves at b = -1 (-x ln x, effort
			// y ln(y/x) - y + x) and b = -2 (ln x, QLIKE) rather than 0/0
			// (Patton 2011, eq. 5). b is a constant, so the ifs fold away.
			Formula: "b = 1\nif(abs(b + 1) > 0, if(abs(b + 2) > 0, if(b > -1.5, -x*expm1((b + 1)*ln(x)), -expm1((b + 2)*ln(x))) / ((b + 1)*(b + 2)), ln(x)), -x*ln(x))",
			Source:  "Patton (2011), Volatility forecast comparison using imperfect volatility proxies, J. Econometrics 160:246-256"},
		{Name: "qlike", Title: "point forecast of a positive mean, effort y/x - ln(y/x) - 1 (needs lo > 0)", Kind: KindPoint,
			Formula: "ln(x)",
			Source:  "Patton (2011), J. Econometrics 160:246-256 (the b = -2 member, QLIKE)"},
		{Name: "exponential", Title: "point forecast of a mean, exponential Bregman family; a > 0 penalises under-forecasts more", Kind: KindPoint,
			Formula: "a = 1\n-2*exp(a*x) / a^2",
			Source:  "Patton (2020), Comparing possibly misspecified forecasts, J. Business & Economic Statistics 38:796-809"},
	}
}

// All returns every preset, in display order.
func All() []Preset { return all() }

// Names returns the preset names, sorted.
func Names() []string {
	var names []string
	for _, p := range all() {
		names = append(names, p.Name)
	}
	sort.Strings(names)
	return names
}

// Lookup returns the preset called name.
func Lookup(name string) (Preset, error) {
	for _, p := range all() {
		if p.Name == name {
			return p, nil
		}
	}
	return Preset{}, fmt.Errorf("unknown preset %q; known: %s", name, strings.Join(Names(), ", "))
}

// Apply fills a design's formula, mode and ordering from its Preset name,
// and checks that the preset fits the design's outcomes.
func Apply(d *design.Design) error {
	p, err := Lookup(d.Preset)
	if err != nil {
		return err
	}
	if p.BinaryOnly && d.N() != 2 {
		return fmt.Errorf("preset %q is for 2 outcomes, the design has %d", p.Name, d.N())
	}
	if p.Ordered && !d.Ordered {
		d.Ordered = true
	}
	d.Formula = p.Formula
	switch p.Kind {
	case KindEmphasis:
		d.Mode = design.ModeEmphasis
	case KindPoint:
		d.Mode = design.ModePoint
	default:
		d.Mode = design.ModeGenerator
	}
	return nil
}

// withoutComments is a formula's text without its comments ('#' to the end
// of a line) and blank lines, each line trimmed: a preset's formula under a
// comment of the user's ("# quadratic rule") is still the preset's.
func withoutComments(src string) string {
	var lines []string
	for _, l := range strings.Split(src, "\n") {
		if i := strings.IndexByte(l, '#'); i >= 0 {
			l = l[:i]
		}
		if l = strings.TrimSpace(l); l != "" {
			lines = append(lines, l)
		}
	}
	return strings.Join(lines, "\n")
}

// Settle makes a design's preset name agree with its formula: when the
// design names a preset but gives a formula of its own that is not the
// preset's, the formula is what is computed, so the name is dropped (a
// record saying "preset: log" over a quadratic formula would misstate the
// rule). It returns a note saying so, or "".
func Settle(d *design.Design) string {
	if d.Preset == "" || strings.TrimSpace(d.Formula) == "" {
		return ""
	}
	p, err := Lookup(d.Preset)
	if err == nil && withoutComments(p.Formula) == withoutComments(d.Formula) {
		return ""
	}
	name := d.Preset
	d.Preset = ""
	return fmt.Sprintf("the design names preset %q but gives a formula of its own; the formula is used and recorded, the preset name is not", name)
}
