package plans

import (
	"fmt"

	"accelplan/priors"
	"accelplan/simulate/odt"
)

// solver holds one worker's reconstruction state for one plan method: the
// transforms it reuses across jobs.
type solver struct {
	rc    Recon
	zf    []complex128
	wy    []complex128 // density-weighted data, grown as needed
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
	case MethodFISTABox:
		b, err := odt.BoxProjection(rc.Box[0], rc.Box[1])
		if err != nil {
			return nil, fmt.Errorf("recon %q: %w", rc.Label, err)
		}
		s.prior = b
	default:
		return nil, fmt.Errorf("recon %q: method %q has no solver", rc.Label, rc.Method)
	}
	w.solvers[ri] = s
	return s, nil
}

// reconstruct runs method ri on data y; lambda is relative to the largest
// magnitude of the adjoint image (priors.RelativeLambda). It returns the image,
// valid until the next call, and the iterations used.
//
// The adjoint image is the zero-filled inverse FFT for a Cartesian mask, and
// the density-compensated gridding reconstruction EᴴWy for a non-Cartesian
// trajectory, with W the k-space area of each sample in (cycles/FOV)², so that
// Σ w F(k) e^{2πik·x} approximates the inverse Fourier integral.
func (w *workerState) reconstruct(ri int, enc *encoding, y []complex128, lambda float64) ([]complex128, int, error) {
	s, err := w.solverFor(ri)
	if err != nil {
		return nil, 0, err
	}
	if enc.weights == nil {
		enc.op.Adjoint(s.zf, y)
	} else {
		if cap(s.wy) < len(y) {
			s.wy = make([]complex128, len(y))
		}
		wy := s.wy[:len(y)]
		for i, v := range y {
			wy[i] = v * complex(enc.weights[i], 0)
		}
		enc.op.Adjoint(s.zf, wy)
	}
	switch s.rc.Method {
	case MethodZeroFilled:
		return s.zf, 0, nil
	case MethodFISTAWavelet:
		x, info, err := priors.FISTA(enc.op, y, s.prior, priors.RelativeLambda(lambda, s.zf),
			priors.FISTAOptions{MaxIter: s.rc.Iterations, Step: enc.step, X0: s.zf})
		if err != nil {
			return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
		}
		return x, info.Iterations, nil
	case MethodFISTABox:
		// Projected gradient with FISTA momentum: the box's proximal map is
		// the projection whatever the weight, so λ is a formality.
		x, info, err := priors.FISTA(enc.op, y, s.prior, 1,
			priors.FISTAOptions{MaxIter: s.rc.Iterations, Step: enc.step, X0: s.zf})
		if err != nil {
			return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
		}
		return x, info.Iterations, nil
	}
	return nil, 0, fmt.Errorf("recon %q: method %q has no solver", s.rc.Label, s.rc.Method)
}
