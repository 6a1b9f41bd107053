package design

import (
	"strings"
	"testing"
)

// A date in the right layout that is no day of the calendar is refused
// as such; one in another layout is told the layout. February 2027 has 28
// days (2027 is not a leap year: not divisible by 4).
func TestContractDateMessages(t *testing.T) {
	for _, c := range []struct{ start, want string }{
		{"2027-02-30", `contract.start: "2027-02-30" is not a day of the calendar`},
		{"2027-13-01", `contract.start: "2027-13-01" is not a day of the calendar`},
		{"1/3/2027", `contract.start: "1/3/2027" is not a date written YYYY-MM-DD`},
		{"2027-3-01", `contract.start: "2027-3-01" is not a date written YYYY-MM-DD`},
	} {
		ct := Contract{Start: c.start}
		err := ct.Validate(2)
		if err == nil || err.Error() != c.want {
			t.Errorf("start %q: %v, want %s", c.start, err, c.want)
		}
	}
	leap := Contract{Start: "2028-02-29"}
	if err := leap.Validate(2); err != nil {
		t.Errorf("2028-02-29 (a leap day) refused: %v", err)
	}
}

// A file that is not TOML (a menu CSV opened as a design) is refused with
// the line and a word on what a design file is, not the parser's bare
// complaint about dots and equals signs.
func TestNotTOMLSaysWhatADesignIs(t *testing.T) {
	_, err := Decode([]byte("# a report menu\n1, 0, 0\n0, 1, 0\n"))
	if err == nil {
		t.Fatal("a CSV was read as a design")
	}
	want := "line 2: TOML syntax: "
	if got := err.Error(); len(got) < len(want) || got[:len(want)] != want || !strings.HasSuffix(got, "(a design file is TOML, as scorewright saves it)") {
		t.Errorf("error %q", got)
	}
}
