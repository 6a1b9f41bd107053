package certify

import (
	"context"
	"fmt"
	"testing"
	"time"

	"scorewright/generator/bregman"
	"scorewright/generator/formula"
	"scorewright/generator/payout"
	"scorewright/verify"
)

var benchRules = []struct{ name, src string }{
	{"quadratic", "1 - sum(p^2)"},
	{"log", "-sum(p*ln(p))"},
	{"spherical", "-sqrt(sum(p^2))"},
	{"pseudospherical", "a = 3\n-sum(p^a)^(1/a)"},
	{"power3", "g = 3\n-sum(p*expm1((g - 1)*ln(p))) / (g - 1)"},
	{"min", "min(1 - sum(p^2), -sum(p*ln(p)) - 0.1)"},
}

// BenchmarkCertify times the certificate of a generator beside the grid
// check of the same rule at its default resolution (verify.CheckRule):
// the certificate proves what the grid samples. BENCHMARKS.md records
// the quadratic, log, spherical and pseudospherical rules at n = 2, 3, 4.
func BenchmarkCertify(b *testing.B) {
	for _, r := range benchRules {
		for n := 2; n <= 4; n++ {
			f, err := bregman.NewFormula(r.src, bregman.Options{Outcomes: n})
			if err != nil {
				b.Fatal(err)
			}
			b.Run(fmt.Sprintf("%s/n=%d/certificate", r.name, n), func(b *testing.B) {
				for range b.N {
					res, err := Generator(context.Background(), f.Program(), n, Settings{Deadline: time.Minute})
					if err != nil || res.Verdict != verify.StrictlyProper {
						b.Fatalf("%v %v", err, res.Statement())
					}
				}
			})
			if r.name == "power3" || r.name == "min" {
				continue
			}
			b.Run(fmt.Sprintf("%s/n=%d/grid", r.name, n), func(b *testing.B) {
				for range b.N {
					if _, err := verify.CheckRule(context.Background(), &bregman.Rule{Gen: f}, verify.Settings{}); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}

// BenchmarkCertifyPayout times the payout certificate of the quadratic
// payout beside the grid audit.
func BenchmarkCertifyPayout(b *testing.B) {
	for n := 2; n <= 4; n++ {
		pay, err := payout.New("10 - 5*sum((p - hit)^2)", payout.Options{Outcomes: n})
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("quadratic/n=%d/certificate", n), func(b *testing.B) {
			for range b.N {
				res, err := Payout(context.Background(), pay, Settings{Deadline: time.Minute})
				if err != nil || res.Verdict != EpsilonProper {
					b.Fatalf("%v %v", err, res.Statement())
				}
			}
		})
		b.Run(fmt.Sprintf("quadratic/n=%d/grid", n), func(b *testing.B) {
			for range b.N {
				if _, err := verify.Audit(context.Background(), pay, nil, verify.Settings{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkCertifyLine times the certificates on a line: an emphasis
// weight and a point generator.
func BenchmarkCertifyLine(b *testing.B) {
	w, err := formula.CompileString("4*c*(1-c)", formula.Scope{Vars: []string{"c"}})
	if err != nil {
		b.Fatal(err)
	}
	phi, err := formula.CompileString("-x^4", formula.Scope{Vars: []string{"x"}})
	if err != nil {
		b.Fatal(err)
	}
	b.Run("emphasis/4c(1-c)", func(b *testing.B) {
		for range b.N {
			if res, _ := Emphasis(context.Background(), w, Settings{}); res.Verdict != verify.StrictlyProper {
				b.Fatal(res.Statement())
			}
		}
	})
	b.Run("point/-x^4", func(b *testing.B) {
		for range b.N {
			if res, _ := Point(context.Background(), phi, 0, 1, Settings{}); res.Verdict != verify.StrictlyProper {
				b.Fatal(res.Statement())
			}
		}
	})
}
