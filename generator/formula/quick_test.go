package formula

import "testing"

func TestQuick(t *testing.T) {
	p, err := CompileString("-sum(p*ln(p))", Scope{Outcomes: 3})
	if err != nil {
		t.Fatal(err)
	}
	m := p.NewMachine()
	g := make([]float64, 3)
	h := make([]float64, 9)
	v := m.Gradient(g, []float64{0.2, 0.3, 0.5})
	t.Log(v, g, p.Len())
	v = m.Hessian(h, g, []float64{0.2, 0.3, 0.5})
	t.Log(v, g, h)
	v = m.Gradient(g, []float64{0, 0.5, 0.5})
	t.Log(v, g)
	_, err = CompileString("1 + q", Scope{Outcomes: 3})
	t.Log(err, "\n"+err.(*Error).Caret())
}
