package formula_test

import (
	"fmt"

	"scorewright/generator/formula"
)

// A formula is text: parameter lines, then one expression. Compiled for
// two outcomes, the quadratic generator H(p) = 1 - (p1² + p2²) has the
// gradient -2p (derived by hand).
func ExampleCompileString() {
	prog, err := formula.CompileString("a = 1\na - sum(p^2)", formula.Scope{Outcomes: 2})
	if err != nil {
		fmt.Println(err)
		return
	}
	m := prog.NewMachine()
	p := []float64{0.25, 0.75}
	grad := make([]float64, 2)
	h := m.Gradient(grad, p)
	fmt.Println("H =", h, "gradient =", grad, "params =", prog.Params())
	// Output:
	// H = 0.375 gradient = [-0.5 -1.5] params = [{a 1}]
}

// Errors name the line and column, and Caret draws where.
func ExampleParse() {
	_, err := formula.Parse("1 - sum(p^2")
	fmt.Println(err)
	if fe, ok := err.(*formula.Error); ok {
		fmt.Println(fe.Caret())
	}
	// Output:
	// 1:12: expected "," or ")" in the arguments of sum, found end of formula
	// 1 - sum(p^2
	//            ^
}
