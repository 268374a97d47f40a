package priors

import "accelplan/simulate"

// applyNormal writes EᴴE·src into dst: through the operator's own Normal
// when it is a simulate.NormalOperator (a Cartesian mask of whole rows needs
// only the column transforms), else as Adjoint∘Forward through r, a scratch
// of op.DataLen() values.
func applyNormal(op simulate.Operator, dst, src, r []complex128) {
	if n, ok := op.(simulate.NormalOperator); ok {
		n.Normal(dst, src)
		return
	}
	op.Forward(r, src)
	op.Adjoint(dst, r)
}

// gradStep computes the forward (gradient) step of the data term
// ½‖E z − y‖² that FISTA, its restarted form and PnP-FISTA take:
// g = z − s·Eᴴ(E z − y). With a NormalOperator it uses
// Eᴴ(E z − y) = EᴴE z − Eᴴy with Eᴴy computed once, which for Cartesian
// row masks halves the transforms of an iteration; otherwise it runs
// Forward, the residual and Adjoint.
type gradStep struct {
	op     simulate.Operator
	normal simulate.NormalOperator // nil when op has no Normal
	y      []complex128
	ehy    []complex128 // Eᴴy, only with normal
	r      []complex128 // data-sized scratch, only without normal
}

// newGradStep prepares the step for op; r is a data-sized scratch the
// caller may share (it is not used with a NormalOperator). Call setData
// before apply.
func newGradStep(op simulate.Operator, r []complex128) *gradStep {
	s := &gradStep{op: op, r: r}
	if n, ok := op.(simulate.NormalOperator); ok {
		s.normal = n
		s.ehy = make([]complex128, op.ImageLen())
	}
	return s
}

// setData sets the measured data y (kept, not copied, until the next call).
func (s *gradStep) setData(y []complex128) {
	s.y = y
	if s.normal != nil {
		s.op.Adjoint(s.ehy, y)
	}
}

// apply writes z − step·Eᴴ(E z − y) into g; g and z must not alias.
func (s *gradStep) apply(g, z []complex128, step float64) {
	if s.normal != nil {
		s.normal.Normal(g, z)
		b := s.ehy[:len(g)]
		z = z[:len(g)]
		for i, v := range g {
			d := v - b[i]
			g[i] = z[i] - complex(step*real(d), step*imag(d))
		}
		return
	}
	s.op.Forward(s.r, z)
	for i := range s.r {
		s.r[i] -= s.y[i]
	}
	s.op.Adjoint(g, s.r)
	z = z[:len(g)]
	for i, v := range g {
		g[i] = z[i] - complex(step*real(v), step*imag(v))
	}
}
