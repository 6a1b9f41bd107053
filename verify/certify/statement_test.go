package certify

import (
	"context"
	"regexp"
	"strings"
	"testing"
	"time"
)

// oneThings is a count of one with a plural noun: the slip the statements
// must not make.
var oneThings = regexp.MustCompile(`\b1 (more )?(pieces|boxes|box pairs)\b`)

// -x^2 on [0, 1] has second derivative -2 everywhere (derived by hand), so
// the first enclosure of it over the whole interval, [-2, -2], decides it: one
// piece, and the statement says "1 piece", never "1 pieces".
func TestStatementCountsOnePieceInTheSingular(t *testing.T) {
	res, err := Point(context.Background(), lineProgram(t, "-x^2", "x"), 0, 1, Settings{Deadline: 10 * time.Second})
	if err != nil {
		t.Fatal(err)
	}
	st := res.Statement()
	if res.Boxes != 1 || !strings.HasSuffix(st, "(1 piece)") || oneThings.MatchString(st) {
		t.Errorf("%d pieces: %q", res.Boxes, st)
	}
}

// Every count a statement writes takes its noun's number from the count.
func TestCounted(t *testing.T) {
	for _, c := range []struct {
		n    int
		want string
	}{{0, "0 boxes"}, {1, "1 box"}, {2, "2 boxes"}, {21, "21 boxes"}} {
		if got := counted(c.n, "box", "boxes"); got != c.want || oneThings.MatchString(got) {
			t.Errorf("counted(%d) = %q, want %q", c.n, got, c.want)
		}
	}
}
