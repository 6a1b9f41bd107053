package history

import (
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

// parseDecimal agrees bit for bit with strconv.ParseFloat on every string
// it accepts, and accepts the usual ways of writing a probability.
func TestParseDecimalIsParseFloat(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 2))
	alphabet := "0123456789.....-+eE xn"
	cases := []string{"0", "1", "0.5", ".5", "5.", "1.000", "0.1", "0.3", "0.7", "0.999999999999999",
		"000000000000000", "0000000000000001", ".", "", "1e-3", "-0", "+0.5", "NaN", "Inf", "0x1p-2", "1_0", "0.1.2"}
	for range 200000 {
		var b strings.Builder
		for range 1 + rng.IntN(18) {
			if rng.IntN(4) == 0 {
				b.WriteByte(alphabet[rng.IntN(len(alphabet))])
			} else {
				b.WriteByte(byte('0' + rng.IntN(10)))
			}
		}
		cases = append(cases, b.String(), strconv.FormatFloat(rng.Float64(), 'f', rng.IntN(17), 64))
	}
	accepted := 0
	for _, s := range cases {
		got, ok := parseDecimal(s)
		if !ok {
			continue
		}
		accepted++
		want, err := strconv.ParseFloat(s, 64)
		if err != nil || math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("parseDecimal(%q) = %v, strconv.ParseFloat gives %v, %v", s, got, want, err)
		}
	}
	for _, s := range []string{"0", "1", "0.5", ".5", "5.", "0.125", "0.999999999999999"} {
		if _, ok := parseDecimal(s); !ok {
			t.Errorf("parseDecimal(%q) refused a plain decimal", s)
		}
	}
	if accepted < len(cases)/3 {
		t.Errorf("accepted %d of %d cases: the test hardly exercises the fast path", accepted, len(cases))
	}
}

// trim trims what strings.TrimSpace trims, on fields with ASCII and
// Unicode spaces at either end or none.
func TestTrimIsTrimSpace(t *testing.T) {
	for _, s := range []string{"", " ", "a", " a", "a ", "\ta\r", "\u00a0a", "a\u00a0", "\u2003x\u2003", "é", "0.25", "\x7f", "a b"} {
		if got, want := trim(s), strings.TrimSpace(s); got != want {
			t.Errorf("trim(%q) = %q, strings.TrimSpace gives %q", s, got, want)
		}
	}
}
