package plans

import (
	"fmt"

	"accelplan/priors"
	"accelplan/simulate"
)

// solver holds one worker's reconstruction state for one plan method: the
// transforms it reuses across jobs.
type solver struct {
	rc    Recon
	zf    []complex128
	prior priors.Prior
}

func (w *workerState) solverFor(ri int) (*solver, error) {
	if s, ok := w.solvers[ri]; ok {
		return s, nil
	}
	rc := w.env.plan.Recons[ri]
	s := &solver{rc: rc, zf: make([]complex128, w.env.ny*w.env.nx)}
	switch rc.Method {
	case MethodZeroFilled:
	case MethodFISTAWavelet:
		p, err := priors.NewWaveletL1(w.env.ny, w.env.nx, rc.Levels, rc.Wavelet)
		if err != nil {
			return nil, fmt.Errorf("recon %q: %w", rc.Label, err)
		}
		s.prior = p
	default:
		return nil, fmt.Errorf("recon %q: method %q has no solver", rc.Label, rc.Method)
	}
	w.solvers[ri] = s
	return s, nil
}

// reconstruct runs method ri on data y; lambda is relative to the largest
// zero-filled magnitude (priors.RelativeLambda). It returns the image, valid
// until the next call, and the iterations used.
func (w *workerState) reconstruct(ri int, op simulate.Operator, y []complex128, lambda float64) ([]complex128, int, error) {
	s, err := w.solverFor(ri)
	if err != nil {
		return nil, 0, err
	}
	op.Adjoint(s.zf, y)
	switch s.rc.Method {
	case MethodZeroFilled:
		return s.zf, 0, nil
	case MethodFISTAWavelet:
		// The masked orthonormal FFT has ‖E‖ = 1, so the step is 1.
		x, info, err := priors.FISTA(op, y, s.prior, priors.RelativeLambda(lambda, s.zf),
			priors.FISTAOptions{MaxIter: s.rc.Iterations, Step: 1, X0: s.zf})
		if err != nil {
			return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
		}
		return x, info.Iterations, nil
	}
	return nil, 0, fmt.Errorf("recon %q: method %q has no solver", s.rc.Label, s.rc.Method)
}
