package formula

import (
	"strings"
	"testing"
)

// How formulas are read: precedence and associativity as formulas.md
// specifies them.
func TestParsePrecedence(t *testing.T) {
	cases := []struct{ src, want string }{
		{"-p^2", "(-(p ^ 2))"},
		{"2^3^2", "(2 ^ (3 ^ 2))"},
		{"2^-1", "(2 ^ (-1))"},
		{"1 - 2 - 3", "((1 - 2) - 3)"},
		{"1 + 2 * 3", "(1 + (2 * 3))"},
		{"a/b*c", "((a / b) * c)"},
		{"p < 0.5", "(p < 0.5)"},
		{"1 + p < 2 * p", "((1 + p) < (2 * p))"},
		{"-sum(p*ln(p))", "(-sum((p * ln(p))))"},
		{"p[y] + p[2]", "(p[y] + p[2])"},
		{"if(p <= 0.5, min(p, 1, 2), max(p))", "if((p <= 0.5), min(p, 1, 2), max(p))"},
		{"# a comment\n\n  1 +\n  2  # trailing\n", "(1 + 2)"},
		{"1e-3 * .5", "(0.001 * 0.5)"},
	}
	for _, c := range cases {
		f, err := Parse(c.src)
		if err != nil {
			t.Errorf("Parse(%q): %v", c.src, err)
			continue
		}
		if got := String(f.Expr); got != c.want {
			t.Errorf("Parse(%q) = %s, want %s", c.src, got, c.want)
		}
	}
}

func TestParseParams(t *testing.T) {
	f, err := Parse("# power family\ng = 1.5\nh = -2\n(1 - sum(p^g)) / (g - 1)")
	if err != nil {
		t.Fatal(err)
	}
	if len(f.Params) != 2 || f.Params[0].Name != "g" || f.Params[1].Name != "h" {
		t.Fatalf("params = %+v", f.Params)
	}
	if f.Params[1].At != (Pos{3, 1}) {
		t.Errorf("h at %v, want 3:1", f.Params[1].At)
	}
}

// Bad inputs and the exact messages a user sees. The messages are part of
// the product, so they are pinned here.
func TestParseErrors(t *testing.T) {
	cases := []struct{ src, want string }{
		{"", "1:1: expected an expression, found end of formula"},
		{"   # only a comment", "1:20: expected an expression, found end of formula"},
		{"1 +", "1:4: expected a number, name or \"(\", found end of formula"},
		{"(p1 + p2", "1:9: expected \")\", found end of formula"},
		{"sum(p^2", "1:8: expected \",\" or \")\" in the arguments of sum, found end of formula"},
		{"2 p", "1:3: expected an operator or end of formula, found name \"p\""},
		{"p $ 2", "1:3: expected an operator or end of formula, found character \"$\""},
		{"$", "1:1: unexpected character \"$\""},
		{"1 < p < 2", "1:7: comparisons cannot be chained; use parentheses or if(...)"},
		{"g = 2\n", "2:1: expected an expression after the parameter lines, found end of formula"},
		{"g = \n1", "1:5: expected a value after \"=\", found end of line"},
		{"g = 2 3\n1", "1:7: expected end of line after the parameter value, found number 3"},
		{"g = 1\ng = 2\ng", "2:1: parameter \"g\" is set twice (first at 1:1)"},
		{"p1 + p2\ng = 3", "2:3: expected an operator or end of formula, found \"=\" (parameter lines must come before the expression)"},
		{"(1+2)[3]", "1:6: only a name can be subscripted, as in p[y]"},
		{"p[y", "1:4: expected \"]\" to close the subscript, found end of formula"},
		{"1e999", "1:1: number 1e999 is out of range"},
		{"1 ** 2", "1:4: expected a number, name or \"(\", found \"*\""},
		{"p == 1", "1:3: \"==\" is not part of the language; compare with <, <=, > or >= inside if(...)"},
	}
	for _, c := range cases {
		_, err := Parse(c.src)
		if err == nil {
			t.Errorf("Parse(%q): no error, want %q", c.src, c.want)
			continue
		}
		if err.Error() != c.want {
			t.Errorf("Parse(%q)\n got %q\nwant %q", c.src, err.Error(), c.want)
		}
		if _, ok := err.(*Error); !ok {
			t.Errorf("Parse(%q): error is %T, want *Error", c.src, err)
		}
	}
}

// Compile-time errors: names that do not exist where they are used.
func TestCompileErrors(t *testing.T) {
	gen3 := Scope{Outcomes: 3}
	cases := []struct {
		src   string
		scope Scope
		want  string
	}{
		{"1 + q", gen3, `1:5: unknown name "q"; known here: p1..p3, n, pi, e`},
		{"sum(q)", gen3, `1:5: unknown name "q"; known here: p, i, w, p1..p3, n, pi, e`},
		{"p * 2", gen3, "1:1: p alone is the event's probability only when there are 2 outcomes; use p1..p3, or p inside sum(...)"},
		{"p4", gen3, "1:1: p4 names outcome 4, but there are only 3 outcomes"},
		{"foo(p1)", gen3, "1:1: unknown function \"foo\"; known: abs, csum, exp, expm1, if, ln, log, log10, log1p, log2, max, min, sqrt, sum"},
		{"ln(p1, p2)", gen3, "1:1: ln takes 1 argument, found 2"},
		{"if(p1 < 1, 2)", gen3, "1:1: if takes 3 arguments, found 2"},
		{"ln + 1", gen3, "1:1: ln is a function; write ln(...)"},
		{"csum(c)", gen3, "1:1: csum(...) needs ordered outcomes (cumulative probabilities have no meaning otherwise)"},
		{"sum(sum(p))", gen3, "1:5: sum(...) cannot be nested inside sum(...) or csum(...)"},
		{"p[y]", gen3, `1:3: the subscript of p must be a constant, but uses "y"; known here: pi, e, n`},
		{"p[4]", Scope{Outcomes: 3, Payout: true, Outcome: 1}, "1:3: subscript 4 is not an outcome number 1..3"},
		{"hit", Scope{Outcomes: 3, Payout: true, Outcome: 1}, "1:1: hit exists only inside sum(...); outside it, compare y with an outcome number"},
		{"pi = 3\npi", gen3, "1:1: parameter \"pi\" clashes with a built-in name; choose another"},
		{"a = p1\na", gen3, `1:5: the value of parameter "a" must be a constant, but uses "p1"; known here: pi, e, n`},
		{"x^2 + p", Scope{Vars: []string{"x"}}, `1:7: unknown name "p"; known here: x, pi, e`},
		{"i", gen3, "1:1: i is the outcome index and exists only inside sum(...) or csum(...)"},
		{"2(p1)", gen3, "1:2: expected an operator or end of formula, found \"(\""},
	}
	for _, c := range cases {
		_, err := CompileString(c.src, c.scope)
		if err == nil {
			t.Errorf("%q: no error, want %q", c.src, c.want)
			continue
		}
		if err.Error() != c.want {
			t.Errorf("%q\n got %q\nwant %q", c.src, err.Error(), c.want)
		}
	}
}

func TestUnknownParamOverride(t *testing.T) {
	_, err := CompileString("g = 2\nsum(p^g)", Scope{Outcomes: 2, Params: map[string]float64{"h": 1}})
	if err == nil || err.Error() != `unknown parameter "h"; the formula sets: g` {
		t.Errorf("got %v", err)
	}
}

func TestCaret(t *testing.T) {
	_, err := Parse("1 + 2 +\n\t3 + $")
	e, ok := err.(*Error)
	if !ok {
		t.Fatalf("error %v is %T", err, err)
	}
	want := "\t3 + $\n\t    ^"
	if got := e.Caret(); got != want {
		t.Errorf("caret:\n%q\nwant\n%q", got, want)
	}
	if !strings.HasPrefix(e.Error(), "2:6:") {
		t.Errorf("position %s, want 2:6", e.Error())
	}
}

// Functions() and the compiler's arity table name the same functions.
func TestFunctionsListed(t *testing.T) {
	for _, f := range Functions() {
		if _, _, ok := arity(f); !ok {
			t.Errorf("%s is listed but has no arity", f)
		}
	}
	for _, f := range []string{"foo", "p", "sin"} {
		if _, _, ok := arity(f); ok {
			t.Errorf("%s has an arity but is not a function", f)
		}
	}
}
