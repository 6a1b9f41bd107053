package formula

import (
	"runtime"
	"strings"
	"testing"
)

// A chain of powers recurses through the parser once per "^"; it must hit
// the nesting guard, not the stack.
func TestPowerChainHitsTheNestingGuard(t *testing.T) {
	src := strings.Repeat("p1^", 20000) + "2"
	_, err := Parse(src)
	if err == nil || !strings.Contains(err.Error(), "nested too deeply") {
		t.Fatalf("20000 chained powers: %v", err)
	}
	// At the limit a chain still parses.
	if _, err := Parse(strings.Repeat("p1^", maxDepth-2) + "2"); err != nil {
		t.Errorf("%d chained powers: %v", maxDepth-2, err)
	}
}

// A formula longer than the language allows is refused before any token
// is made, so megabytes of text cost no more than their own bytes.
func TestLongFormulaRefusedCheaply(t *testing.T) {
	huge := strings.Repeat("p1+", 4<<20/3) + "p1"
	alloc := allocated(func() {
		_, err := Parse(huge)
		if err == nil || !strings.Contains(err.Error(), "at most 65536 bytes") || !strings.HasPrefix(err.Error(), "1:1: ") {
			t.Errorf("4 MB formula: %v", err)
		}
	})
	if alloc > 1<<20 {
		t.Errorf("refusing a 4 MB formula allocated %d bytes", alloc)
	}
}

// At the length limit a long flat sum parses and compiles in memory
// proportional to its length (about 35 MB measured for 64 KiB; a 4 MB
// formula took 1.5 GB before the length bound).
func TestLongestFormulaCompiles(t *testing.T) {
	src := strings.Repeat("p1+", (MaxSource-2)/3) + "p1"
	if len(src) > MaxSource {
		t.Fatal("test formula too long")
	}
	alloc := allocated(func() {
		if _, err := CompileString(src, Scope{Outcomes: 2}); err != nil {
			t.Fatal(err)
		}
	})
	t.Logf("compiled %d bytes with %d bytes allocated", len(src), alloc)
	if alloc > 64<<20 {
		t.Errorf("a %d-byte formula took %d bytes to compile", len(src), alloc)
	}
}

func allocated(f func()) uint64 {
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	f()
	runtime.ReadMemStats(&after)
	return after.TotalAlloc - before.TotalAlloc
}

// A control character is an error wherever it is, and the source line
// shown under the message carries "?" in its place, never the raw byte.
func TestControlCharactersNeverEchoed(t *testing.T) {
	for _, src := range []string{"1 - sum(p^2) \x1b[2J", "# note \x1b[1A\x1b[2Kpassed\n1 - sum(p^2)"} {
		_, err := Parse(src)
		if err == nil {
			t.Errorf("%q parsed", src)
			continue
		}
		if e := err.(*Error); strings.ContainsRune(e.Error()+e.Caret(), 0x1b) {
			t.Errorf("%q: message echoes the escape: %q / %q", src, e.Error(), e.Caret())
		}
	}
}

func TestSplitConstant(t *testing.T) {
	cases := []struct {
		src, rest string
		c         float64
	}{
		{"1e12 + 1 - sum(p^2)", "(-sum((p ^ 2)))", 1e12 + 1},
		{"-(3 - p1) + 2*p2 - 7", "(p1 + (2 * p2))", -10},
		{"1 - sum(p^2)", "(-sum((p ^ 2)))", 1},
		{"5", "0", 5},
		{"ln(2) + 1 - sum(p*ln(p))", "(ln(2) - sum((p * ln(p))))", 1},
	}
	for _, k := range cases {
		f, err := Parse(k.src)
		if err != nil {
			t.Fatal(err)
		}
		rest, c := SplitConstant(f.Expr)
		if got := String(rest); got != k.rest || c != k.c {
			t.Errorf("%s: %s and %g, want %s and %g", k.src, got, c, k.rest, k.c)
		}
	}
}

func TestUses(t *testing.T) {
	for src, want := range map[string]bool{
		"1 - sum(w*p^2)": true, "1 - sum(p^2)": false, "p[1]*w[2]": true, "a = 2\n1 - sum(p^a)": false,
	} {
		f, err := Parse(src)
		if err != nil {
			t.Fatal(err)
		}
		if got := f.Uses("w"); got != want {
			t.Errorf("%q uses w: %v, want %v", src, got, want)
		}
	}
}
