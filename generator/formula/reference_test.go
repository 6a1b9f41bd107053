package formula

import (
	"math"
	"math/rand/v2"
	"testing"
)

// refEval is an independent tree-walking evaluator of the language, used
// only in tests: the compiler (folding, sharing, fusing, linking) must give
// the same value. It follows formulas.md directly and shares no code with
// the compiler but the scalar helpers mul0, min2, max2 and cmp, whose
// conventions are tested on their own.
type refEnv struct {
	scope  Scope
	params map[string]float64
	vars   []float64
	// inside sum/csum
	inSum, inCsum bool
	i             int
	cum           float64
}

func refFile(f *File, scope Scope, vars []float64) (float64, bool) {
	e := &refEnv{scope: scope, params: map[string]float64{}, vars: vars}
	for _, p := range f.Params {
		v, ok := e.eval(p.Value)
		if !ok {
			return 0, false
		}
		if o, has := scope.Params[p.Name]; has {
			v = o
		}
		e.params[p.Name] = v
	}
	return e.eval(f.Expr)
}

func (e *refEnv) eval(n Node) (float64, bool) {
	switch n := n.(type) {
	case *Num:
		return n.Value, true
	case *Ident:
		return e.ident(n.Name)
	case *Index:
		k, ok := e.eval(n.Index)
		if !ok || k != math.Trunc(k) || k < 1 || int(k) > e.scope.Outcomes {
			return 0, false
		}
		return e.vars[int(k)-1], true
	case *Unary:
		x, ok := e.eval(n.X)
		if n.Op == "-" {
			x = -x
		}
		return x, ok
	case *Binary:
		a, ok1 := e.eval(n.X)
		b, ok2 := e.eval(n.Y)
		if !ok1 || !ok2 {
			return 0, false
		}
		switch n.Op {
		case "+":
			return a + b, true
		case "-":
			return a - b, true
		case "*":
			return mul0(a, b), true
		case "/":
			return a / b, true
		case "^":
			return math.Pow(a, b), true
		case "<":
			return cmp(a, b, a < b), true
		case "<=":
			return cmp(a, b, a <= b), true
		case ">":
			return cmp(a, b, a > b), true
		case ">=":
			return cmp(a, b, a >= b), true
		}
	case *Call:
		return e.call(n)
	}
	return 0, false
}

func (e *refEnv) ident(name string) (float64, bool) {
	if v, ok := e.params[name]; ok {
		return v, true
	}
	n := e.scope.Outcomes
	switch name {
	case "pi":
		return math.Pi, true
	case "e":
		return math.E, true
	case "n":
		return float64(n), n > 0
	case "i":
		return float64(e.i), e.inSum || e.inCsum
	case "p":
		if e.inSum {
			return e.vars[e.i-1], true
		}
		if n == 2 {
			return e.vars[0], true
		}
	case "w":
		if e.inSum {
			if e.scope.Weights == nil {
				return 1, true
			}
			return e.scope.Weights[e.i-1], true
		}
	case "c":
		if e.inCsum {
			return e.cum, true
		}
	case "y":
		if e.scope.Payout {
			return float64(e.scope.Outcome), true
		}
	case "hit":
		if e.scope.Payout && e.inSum {
			return b2f(e.i == e.scope.Outcome), true
		}
	case "hitc":
		if e.scope.Payout && e.inCsum {
			return b2f(e.scope.Outcome <= e.i), true
		}
	}
	for k, v := range e.scope.Vars {
		if v == name {
			return e.vars[n+k], true
		}
	}
	if k := isOutcomeVar(name); k > 0 && k <= n {
		return e.vars[k-1], true
	}
	return 0, false
}

func (e *refEnv) call(c *Call) (float64, bool) {
	args := make([]float64, 0, len(c.Args))
	switch c.Func {
	case "sum", "csum":
		if e.inSum || e.inCsum || len(c.Args) != 1 {
			return 0, false
		}
		var s, cum float64
		last := e.scope.Outcomes
		if c.Func == "csum" {
			last--
		}
		for i := 1; i <= last; i++ {
			sub := *e
			sub.i = i
			if c.Func == "sum" {
				sub.inSum = true
			} else {
				cum += e.vars[i-1]
				sub.inCsum, sub.cum = true, cum
			}
			v, ok := sub.eval(c.Args[0])
			if !ok {
				return 0, false
			}
			s += v
		}
		return s, true
	}
	for _, a := range c.Args {
		v, ok := e.eval(a)
		if !ok {
			return 0, false
		}
		args = append(args, v)
	}
	one := func(f func(float64) float64) (float64, bool) {
		if len(args) != 1 {
			return 0, false
		}
		return f(args[0]), true
	}
	switch c.Func {
	case "ln", "log":
		return one(math.Log)
	case "log2":
		return one(func(x float64) float64 { return math.Log(x) / math.Ln2 })
	case "log10":
		return one(func(x float64) float64 { return math.Log(x) / math.Ln10 })
	case "exp":
		return one(math.Exp)
	case "expm1":
		return one(math.Expm1)
	case "log1p":
		return one(math.Log1p)
	case "sqrt":
		return one(math.Sqrt)
	case "abs":
		return one(math.Abs)
	case "min", "max":
		if len(args) == 0 {
			return 0, false
		}
		r := args[0]
		for _, a := range args[1:] {
			if c.Func == "min" {
				r = min2(r, a)
			} else {
				r = max2(r, a)
			}
		}
		return r, true
	case "if":
		if len(args) != 3 {
			return 0, false
		}
		switch {
		case args[0] != args[0]:
			return math.NaN(), true
		case args[0] != 0:
			return args[1], true
		}
		return args[2], true
	}
	return 0, false
}

// agree compares the machine with the reference, allowing rounding
// differences from reassociated sums and fused log2/log10/xlnx.
func agree(a, b float64) bool {
	if math.IsNaN(a) || math.IsNaN(b) {
		return math.IsNaN(a) && math.IsNaN(b)
	}
	if math.IsInf(a, 0) || math.IsInf(b, 0) {
		return a == b
	}
	return math.Abs(a-b) <= 1e-12*math.Max(1, math.Max(math.Abs(a), math.Abs(b)))
}

// randomFormula builds a random expression over the names valid in a
// generator or payout scope.
func randomFormula(rng *rand.Rand, depth int, inSum, inCsum bool, scope Scope) string {
	if depth == 0 || rng.IntN(4) == 0 {
		leaves := []string{"1", "2.5", "0", "pi", "n", "p1", "p2"}
		if scope.Outcomes == 2 && !inSum {
			leaves = append(leaves, "p")
		}
		if inSum {
			leaves = append(leaves, "p", "i", "w", "p[i]")
			if scope.Payout {
				leaves = append(leaves, "hit")
			}
		}
		if inCsum {
			leaves = append(leaves, "c", "i")
			if scope.Payout {
				leaves = append(leaves, "hitc")
			}
		}
		if scope.Payout {
			leaves = append(leaves, "p[y]", "y")
		}
		return leaves[rng.IntN(len(leaves))]
	}
	sub := func() string { return randomFormula(rng, depth-1, inSum, inCsum, scope) }
	switch rng.IntN(14) {
	case 0:
		return "(" + sub() + " + " + sub() + ")"
	case 1:
		return "(" + sub() + " - " + sub() + ")"
	case 2:
		return "(" + sub() + " * " + sub() + ")"
	case 3:
		return "(" + sub() + " / " + sub() + ")"
	case 4:
		return "(" + sub() + ")^" + []string{"2", "0.5", "3", "p1"}[rng.IntN(4)]
	case 5:
		return []string{"ln", "exp", "sqrt", "abs", "log2", "expm1", "log1p"}[rng.IntN(7)] + "(" + sub() + ")"
	case 6:
		return "-" + sub()
	case 7:
		return "min(" + sub() + ", " + sub() + ", " + sub() + ")"
	case 8:
		return "max(" + sub() + ", " + sub() + ")"
	case 9:
		return "if(" + sub() + " < " + sub() + ", " + sub() + ", " + sub() + ")"
	case 10:
		if !inSum && !inCsum {
			return "sum(" + randomFormula(rng, depth-1, true, false, scope) + ")"
		}
	case 11:
		if !inSum && !inCsum && scope.Ordered {
			return "csum(" + randomFormula(rng, depth-1, false, true, scope) + ")"
		}
	case 12:
		return "(" + sub() + ") * ln(" + sub() + ")"
	}
	return "p1 * ln(p1)"
}

// The compiled machine agrees with the tree-walking reference on random
// formulas at random points, boundary points included.
func TestMachineAgreesWithReference(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 8))
	scopes := []Scope{
		{Outcomes: 2},
		{Outcomes: 3, Ordered: true, Weights: []float64{1, 2, 3}},
		{Outcomes: 4, Ordered: true, Payout: true, Outcome: 3},
		{Outcomes: 5},
	}
	for trial := 0; trial < 3000; trial++ {
		scope := scopes[trial%len(scopes)]
		src := randomFormula(rng, 4, false, false, scope)
		f, err := Parse(src)
		if err != nil {
			t.Fatalf("%q: %v", src, err)
		}
		prog, err := Compile(f, scope)
		if err != nil {
			t.Fatalf("%q: %v", src, err)
		}
		m := prog.NewMachine()
		grad := make([]float64, prog.NumVars())
		for k := 0; k < 4; k++ {
			x := make([]float64, scope.Outcomes)
			for j := range x {
				x[j] = rng.Float64()
				if rng.IntN(4) == 0 {
					x[j] = 0
				}
			}
			want, ok := refFile(f, scope, x)
			if !ok {
				t.Fatalf("%q: reference could not evaluate", src)
			}
			if got := m.Value(x); !agree(got, want) {
				t.Fatalf("%q at %v: machine %v, reference %v", src, x, got, want)
			}
			if got := m.Gradient(grad, x); !agree(got, want) {
				t.Fatalf("%q at %v: machine (gradient pass) %v, reference %v", src, x, got, want)
			}
		}
	}
}
