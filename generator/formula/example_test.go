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

// Second derivatives are exact too, and 0·ln 0 is 0: the entropy
// H(p) = -sum(p ln p) has the Hessian diag(-1/p) (derived by hand), and
// at a report that gives an outcome probability 0 its value is still
// defined while the gradient -ln p - 1 there is +Inf.
func ExampleMachine_Hessian() {
	prog, err := formula.CompileString("-sum(p*ln(p))", formula.Scope{Outcomes: 2})
	if err != nil {
		fmt.Println(err)
		return
	}
	m := prog.NewMachine()
	hess, grad := make([]float64, 4), make([]float64, 2)
	m.Hessian(hess, grad, []float64{0.25, 0.75})
	fmt.Printf("Hessian = [%.4f %.4f; %.4f %.4f]\n", hess[0], hess[1], hess[2], hess[3])
	h := m.Gradient(grad, []float64{0, 1})
	fmt.Println("H(0, 1) is 0:", h == 0, "gradient =", grad)
	// Output:
	// Hessian = [-4.0000 0.0000; 0.0000 -1.3333]
	// H(0, 1) is 0: true gradient = [+Inf -1]
}
