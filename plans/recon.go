package plans

import (
	"fmt"
	"math"

	"accelplan/simulate"
)

// solver holds one worker's reconstruction state for one plan method: the
// transforms and buffers it reuses across jobs.
type solver struct {
	rc  Recon
	img []complex128
}

func (w *workerState) solverFor(ri int) (*solver, error) {
	if s, ok := w.solvers[ri]; ok {
		return s, nil
	}
	rc := w.env.plan.Recons[ri]
	s := &solver{rc: rc, img: make([]complex128, w.env.ny*w.env.nx)}
	w.solvers[ri] = s
	return s, nil
}

// reconstruct runs method ri on data y; lambda is relative to the largest
// zero-filled magnitude. It returns the image (owned by the solver, valid
// until the next call) and the iterations used.
func (w *workerState) reconstruct(ri int, op simulate.Operator, y []complex128, lambda float64) ([]complex128, int, error) {
	s, err := w.solverFor(ri)
	if err != nil {
		return nil, 0, err
	}
	op.Adjoint(s.img, y)
	switch s.rc.Method {
	case MethodZeroFilled:
		return s.img, 0, nil
	}
	_ = maxAbs(s.img) * lambda
	return nil, 0, fmt.Errorf("method %q is not available yet", s.rc.Method)
}

func maxAbs(x []complex128) float64 {
	m := 0.0
	for _, v := range x {
		if a := math.Hypot(real(v), imag(v)); a > m {
			m = a
		}
	}
	return m
}
