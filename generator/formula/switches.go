package formula

// Where a formula is not smooth.
//
// abs, min, max and the comparisons under if make a formula piecewise
// smooth: each has a switching quantity whose sign picks the piece — the
// argument of abs, a - b for min(a, b), max(a, b) and a comparison of a
// with b. Between the points where some switching quantity changes sign
// the formula is as smooth as its pieces, which is what quadrature needs
// to know (a Gauss rule across a jump is accurate to the panel width, not
// to 1e-12).

// Switches is the number of switching quantities of the program: one per
// lane of every abs, min, max and comparison instruction.
func (p *Program) Switches() int {
	var s int
	for _, in := range p.code {
		if switching(in.op) {
			s += int(in.w)
		}
	}
	return s
}

func switching(op opcode) bool {
	switch op {
	case opAbs, opMin, opMax, opLt, opLe, opGt, opGe:
		return true
	}
	return false
}

// Switches evaluates the program at vars and writes its switching
// quantities into dst (len Program.Switches()), in a fixed order: the
// formula is smooth on any stretch where none of them changes sign. It
// returns the value.
func (m *Machine) Switches(dst, vars []float64) float64 {
	m.checkVars(vars)
	m.forward(vars)
	v := m.val
	j := 0
	for c := range m.prog.code {
		in := &m.prog.code[c]
		if !switching(in.op) {
			continue
		}
		for l := int32(0); l < in.w; l++ {
			a, b := v[in.a+l*in.sa], v[in.b+l*in.sb]
			if in.op == opAbs {
				dst[j] = a
			} else {
				dst[j] = a - b
			}
			j++
		}
	}
	return v[m.prog.out]
}
