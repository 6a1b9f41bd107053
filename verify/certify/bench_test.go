package certify

import (
	"context"
	"fmt"
	"testing"
	"time"

	"scorewright/generator/bregman"
	"scorewright/generator/payout"
	"scorewright/verify"
)

var benchRules = []struct{ name, src string }{
	{"quadratic", "1 - sum(p^2)"},
	{"log", "-sum(p*ln(p))"},
	{"spherical", "-sqrt(sum(p^2))"},
}

// BenchmarkCertify times the certificate of a generator beside the grid
// check of the same rule at its default resolution (verify.CheckRule):
// the certificate proves what the grid samples.
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
			if r.name == "spherical" {
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
// payout for two outcomes beside the grid audit.
func BenchmarkCertifyPayout(b *testing.B) {
	pay, err := payout.New("10 - 5*sum((p - hit)^2)", payout.Options{Outcomes: 2})
	if err != nil {
		b.Fatal(err)
	}
	b.Run("quadratic/n=2/certificate", func(b *testing.B) {
		for range b.N {
			res, err := Payout(context.Background(), pay, Settings{Deadline: time.Minute})
			if err != nil || res.Verdict != verify.Proper {
				b.Fatalf("%v %v", err, res.Statement())
			}
		}
	})
	b.Run("quadratic/n=2/grid", func(b *testing.B) {
		for range b.N {
			if _, err := verify.Audit(context.Background(), pay, nil, verify.Settings{}); err != nil {
				b.Fatal(err)
			}
		}
	})
}
