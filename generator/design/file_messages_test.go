package design

import (
	"errors"
	"testing"
)

// A value of the wrong type is named by key, line and column in the
// file's words. Lines and columns are counted by hand from 1 in each
// source; the column is where the value starts.
func TestDecodeTypeMessages(t *testing.T) {
	const head = "version = 1\nmode = \"generator\"\n"
	cases := []struct {
		src, want string
		col       int
	}{
		{head + "outcomes = \"a,b\"\nformula = \"1\"\n", "line 3: outcomes: expected a list, found text", 12},
		{head + "outcomes = [\"a\", \"b\"]\nformula = \"1\"\n[budget]\ncap = \"ten\"\n", "line 6: budget.cap: expected a number, found text", 7},
		{"version = \"one\"\n", "line 1: version: expected a whole number, found text", 11},
		// An element of a list: the column is the element's.
		{head + "outcomes = [\"a\", 2]\nformula = \"1\"\n", "line 3: outcomes: expected text, found a whole number", 18},
		// A list written over several lines: the element's own line.
		{head + "outcomes = [\n  \"a\",\n  \"b\",\n  true,\n]\nformula = \"1\"\n", "line 6: outcomes: expected text, found true or false", 3},
		// A table's key after comments and blank lines.
		{head + "outcomes = [\"a\", \"b\"]\nformula = \"1\"\n\n# the money\n[budget]\n\nfloor = 0\ncap = 10\nstep = [0.1]\n", "line 11: budget.step: expected a number, found a list", 8},
		// A parameter, under its own table.
		{head + "outcomes = [\"a\", \"b\"]\nformula = \"a = 1\\n1 - a*sum(p^2)\"\n[params]\na = \"big\"\n", "line 6: params.a: expected a number, found text", 5},
		// A table where a number belongs, and a number where a table does.
		{head + "outcomes = [\"a\", \"b\"]\nformula = \"1\"\nweights = { a = 1 }\n", "line 5: weights: expected a list, found a table", 11},
		{head + "outcomes = [\"a\", \"b\"]\nformula = \"1\"\nbudget = 3\n", "line 5: budget: expected a table, found a whole number", 10},
		// The contract's dates are text, not TOML dates.
		{head + "outcomes = [\"a\", \"b\"]\nformula = \"1\"\n[contract]\nstart = 2027-01-01\n", "line 6: contract.start: expected text, found a date or time", 9},
	}
	for _, c := range cases {
		_, err := Decode([]byte(c.src))
		if err == nil || err.Error() != c.want {
			t.Errorf("Decode(%q) = %v, want %q", c.src, err, c.want)
			continue
		}
		var fe *FieldError
		if !errors.As(err, &fe) || fe.Column != c.col {
			t.Errorf("Decode(%q): error %#v, want column %d", c.src, err, c.col)
		}
	}
}

// Whole numbers are numbers: a float field takes them, in lists too.
func TestWholeNumbersAreNumbers(t *testing.T) {
	src := "version = 1\nmode = \"generator\"\noutcomes = [\"a\", \"b\"]\nformula = \"1 - sum(w*p^2)\"\nweights = [1, 2.5]\n[budget]\ncap = 10\n"
	d, err := Decode([]byte(src))
	if err != nil || d.Weights[0] != 1 || d.Budget.Cap != 10 {
		t.Fatalf("%v %+v", err, d)
	}
}
