package plans

import (
	"fmt"
	"time"

	"accelplan/priors"
	"accelplan/simulate/nufft"
	"accelplan/simulate/odt"
)

// solver holds one worker's reconstruction state for one plan method: the
// transforms it reuses across jobs.
type solver struct {
	rc    Recon
	zf    []complex128
	x     []complex128 // result of the operator-bound solvers
	wy    []complex128 // density-weighted data, grown as needed
	prior priors.Prior
	// byEnc holds the method's solver built around one operator, per
	// encoding (candidate); see opSolver.
	byEnc map[*encoding]any
	spin  *priors.CycleSpin // cycle-spun wavelet prior, reset before each solve
	toe   *toeplitzCG
	den   priors.Denoiser
}

func (w *workerState) solverFor(ri int) (*solver, error) {
	if s, ok := w.solvers[ri]; ok {
		return s, nil
	}
	rc := w.env.plan.Recons[ri]
	n := w.env.ny * w.env.nx
	s := &solver{rc: rc, zf: make([]complex128, n), x: make([]complex128, n), byEnc: map[*encoding]any{}}
	switch rc.Method {
	case MethodZeroFilled, MethodTikhonov, MethodTV, MethodTGV, MethodCGSENSE, MethodHomodyne, MethodPOCS:
	case MethodPnPADMM, MethodPnPFISTA, MethodRED:
		d, err := priors.NewDenoiser(rc.Denoiser, w.env.ny, w.env.nx)
		if err != nil {
			return nil, fmt.Errorf("recon %q: %w", rc.Label, err)
		}
		s.den = d
	case MethodFISTAWavelet, MethodADMMWavelet:
		p, err := priors.NewWaveletL1(w.env.ny, w.env.nx, rc.Levels, rc.Wavelet)
		if err != nil {
			return nil, fmt.Errorf("recon %q: %w", rc.Label, err)
		}
		s.prior = p
		if rc.CycleSpinning {
			seed := seedFor(w.env.plan.Seed, "cycle-spin|"+reconSeedKey(rc))
			if s.spin, err = priors.NewWaveletCycleSpin(p, seed, seed^0x9e3779b97f4a7c15); err != nil {
				return nil, fmt.Errorf("recon %q: %w", rc.Label, err)
			}
			s.prior = s.spin
		}
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
	t0 := time.Now()
	defer func() { w.reconSeconds += time.Since(t0).Seconds() }()
	s, err := w.solverFor(ri)
	if err != nil {
		return nil, 0, err
	}
	w.adjoint(s, enc, y)
	switch s.rc.Method {
	case MethodZeroFilled:
		return s.zf, 0, nil
	case MethodFISTAWavelet:
		if s.spin != nil {
			s.spin.Reset() // the same shifts for every solve, whatever ran before
		}
		opt := priors.FISTAOptions{MaxIter: s.rc.Iterations, Step: enc.step, X0: s.zf}
		if s.rc.Restart != "" {
			scheme, err := priors.ParseRestartScheme(s.rc.Restart)
			if err != nil {
				return nil, 0, err
			}
			x, info, err := priors.FISTARestart(enc.op, y, s.prior, priors.RelativeLambda(lambda, s.zf),
				priors.FISTARestartOptions{FISTAOptions: opt, Scheme: scheme})
			if err != nil {
				return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
			}
			return x, info.Iterations, nil
		}
		x, info, err := priors.FISTA(enc.op, y, s.prior, priors.RelativeLambda(lambda, s.zf), opt)
		if err != nil {
			return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
		}
		return x, info.Iterations, nil
	case MethodPnPADMM:
		// Venkatakrishnan, Bouman, Wohlberg 2013: the denoiser in place of
		// the proximal map; its strength σ is the tuned parameter.
		ps, err := opSolver(s, enc, func() (*priors.PnPADMM, error) { return priors.NewPnPADMM(enc.op, s.den) })
		if err != nil {
			return nil, 0, err
		}
		copy(s.x, s.zf)
		rep, err := ps.Solve(s.x, y, priors.RelativeLambda(lambda, s.zf), priors.PnPADMMOptions{MaxIter: s.rc.Iterations, Tol: 1e-5})
		if err != nil {
			return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
		}
		return s.x, rep.Iterations, nil
	case MethodPnPFISTA:
		ps, err := opSolver(s, enc, func() (*priors.PnPFISTA, error) { return priors.NewPnPFISTA(enc.op, s.den) })
		if err != nil {
			return nil, 0, err
		}
		copy(s.x, s.zf)
		rep, err := ps.Solve(s.x, y, priors.RelativeLambda(lambda, s.zf), priors.PnPFISTAOptions{MaxIter: s.rc.Iterations, Tol: 1e-5, Step: enc.step})
		if err != nil {
			return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
		}
		return s.x, rep.Iterations, nil
	case MethodRED:
		// Romano, Elad, Milanfar 2017: λ weighs the denoiser's residual; its
		// strength is the noise level of the data.
		rs, err := opSolver(s, enc, func() (*priors.RED, error) { return priors.NewRED(enc.op, s.den) })
		if err != nil {
			return nil, 0, err
		}
		copy(s.x, s.zf)
		rep, err := rs.Solve(s.x, y, lambda, w.env.out.Sigma, priors.REDOptions{MaxIter: s.rc.Iterations, Tol: 1e-5})
		if err != nil {
			return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
		}
		return s.x, rep.Iterations, nil
	case MethodTikhonov:
		// Tikhonov λ is dimensionless: both terms are squared intensities.
		if enc.toeplitz != nil {
			// Off the grid, the normal operator EᴴE is one 2×-grid
			// convolution (Toeplitz embedding, Fessler et al. 2005): CG on
			// (EᴴE + λDᴴD)x = Eᴴy costs two FFTs per iteration instead of a
			// NUFFT pair.
			return w.tikhonovToeplitz(s, enc, y, lambda)
		}
		ts, err := opSolver(s, enc, func() (*priors.TikhonovSolver, error) {
			reg, err := w.tikhonovReg(s.rc)
			if err != nil {
				return nil, err
			}
			return priors.NewTikhonovSolver(enc.op, reg, lambda)
		})
		if err != nil {
			return nil, 0, err
		}
		if err := ts.SetLambda(lambda); err != nil {
			return nil, 0, err
		}
		copy(s.x, s.zf)
		rep, err := ts.Solve(s.x, y, priors.CGOptions{MaxIter: s.rc.Iterations, Tol: 1e-6})
		if err != nil {
			return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
		}
		return s.x, rep.Iterations, nil
	case MethodTV:
		ts, err := opSolver(s, enc, func() (*priors.TVSolver, error) {
			return priors.NewTVSolver(enc.op, w.env.ny, w.env.nx, priors.BoundaryNeumann)
		})
		if err != nil {
			return nil, 0, err
		}
		copy(s.x, s.zf)
		rep, err := ts.Solve(s.x, y, priors.RelativeLambda(lambda, s.zf),
			priors.PDHGOptions{MaxIter: s.rc.Iterations, Tol: 1e-4, GapEvery: 10})
		if err != nil {
			return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
		}
		return s.x, rep.Iterations, nil
	case MethodTGV:
		ts, err := opSolver(s, enc, func() (*priors.TGVSolver, error) {
			return priors.NewTGVSolver(enc.op, w.env.ny, w.env.nx, priors.BoundaryNeumann)
		})
		if err != nil {
			return nil, 0, err
		}
		copy(s.x, s.zf)
		a1 := priors.RelativeLambda(lambda, s.zf)
		rep, err := ts.Solve(s.x, y, a1, s.rc.TGVRatio*a1, priors.PDHGOptions{MaxIter: s.rc.Iterations, Tol: 1e-4, GapEvery: 10})
		if err != nil {
			return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
		}
		return s.x, rep.Iterations, nil
	case MethodCGSENSE:
		// CG on (EᴴE + λI)x = Eᴴy with the intensity-correction
		// preconditioner (Pruessmann 2001); λ is dimensionless.
		cs, err := opSolver(s, enc, func() (*priors.CGSENSE, error) {
			d, err := priors.IntensityCorrection(w.env.maps)
			if err != nil {
				return nil, err
			}
			return priors.NewCGSENSE(enc.op, d)
		})
		if err != nil {
			return nil, 0, err
		}
		clear(s.x)
		rep, err := cs.Solve(s.x, y, lambda, priors.CGOptions{MaxIter: s.rc.Iterations, Tol: 1e-6})
		if err != nil {
			return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
		}
		return s.x, rep.Iterations, nil
	case MethodHomodyne, MethodPOCS:
		if enc.mask == nil {
			return nil, 0, fmt.Errorf("recon %q: partial Fourier needs a Cartesian mask", s.rc.Label)
		}
		pf, err := opSolver(s, enc, func() (*priors.PartialFourier, error) {
			return priors.NewPartialFourier(w.env.ny, w.env.nx, enc.mask, priors.PartialFourierOptions{})
		})
		if err != nil {
			return nil, 0, err
		}
		if s.rc.Method == MethodHomodyne {
			if err := pf.Homodyne(s.x, y); err != nil {
				return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
			}
			return s.x, 0, nil
		}
		info, err := pf.POCS(s.x, y, priors.POCSOptions{MaxIter: s.rc.Iterations})
		if err != nil {
			return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
		}
		return s.x, info.Iterations, nil
	case MethodADMMWavelet:
		as, err := opSolver(s, enc, func() (*priors.ADMM, error) { return priors.NewADMM(enc.op, s.prior) })
		if err != nil {
			return nil, 0, err
		}
		copy(s.x, s.zf)
		opt := priors.DefaultADMMOptions()
		opt.MaxIter = s.rc.Iterations
		rep, err := as.Solve(s.x, y, priors.RelativeLambda(lambda, s.zf), opt)
		if err != nil {
			return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
		}
		return s.x, rep.Iterations, nil
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

// adjoint writes the adjoint image of y into s.zf: Eᴴy, or EᴴWy with the
// density compensation of a non-Cartesian trajectory; with a receive array
// the coil images are combined with their sensitivities (through the
// prewhitening when the coil noise is correlated) and divided by Sᴴ·Ψ⁻¹·S
// (Σ|S_c|² for white noise), so that full sampling returns the object itself
// (the SNR-optimal combination of Roemer PB et al., MRM 1990;16:192-225).
func (w *workerState) adjoint(s *solver, enc *encoding, y []complex128) {
	defer func() {
		if c := w.env.combine; c != nil {
			for i := range s.zf {
				s.zf[i] *= complex(c[i], 0)
			}
		}
	}()
	if enc.weights == nil {
		enc.op.Adjoint(s.zf, y)
		return
	}
	if cap(s.wy) < len(y) {
		s.wy = make([]complex128, len(y))
	}
	wy := s.wy[:len(y)]
	for i, v := range y {
		wy[i] = v * complex(enc.weights[i], 0)
	}
	enc.op.Adjoint(s.zf, wy)
}

// normalEq is EᴴE + λDᴴD with EᴴE applied by Toeplitz embedding.
type normalEq struct {
	t      *nufft.Toeplitz
	reg    *priors.Tikhonov
	lambda float64
	tmp    []complex128
}

func (n *normalEq) Len() int { return n.t.ImageLen() }

func (n *normalEq) Apply(dst, src []complex128) {
	n.t.Apply(dst, src)
	n.reg.Apply(n.tmp, src)
	l := complex(n.lambda, 0)
	for i, v := range n.tmp {
		dst[i] += l * v
	}
}

// tikhonovToeplitz solves the Tikhonov normal equations of a non-Cartesian
// encoding by CG with the Toeplitz normal operator.
func (w *workerState) tikhonovToeplitz(s *solver, enc *encoding, y []complex128, lambda float64) ([]complex128, int, error) {
	if s.toe == nil {
		reg, err := w.tikhonovReg(s.rc)
		if err != nil {
			return nil, 0, err
		}
		cg, err := priors.NewCG(w.env.ny * w.env.nx)
		if err != nil {
			return nil, 0, err
		}
		s.toe = &toeplitzCG{reg: reg, cg: cg, b: make([]complex128, w.env.ny*w.env.nx), tmp: make([]complex128, w.env.ny*w.env.nx)}
	}
	tc := s.toe
	a := &normalEq{t: enc.toeplitz, reg: tc.reg, lambda: lambda, tmp: tc.tmp}
	enc.op.Adjoint(tc.b, y)
	copy(s.x, s.zf)
	rep, err := tc.cg.Solve(a, s.x, tc.b, priors.CGOptions{MaxIter: s.rc.Iterations, Tol: 1e-6})
	if err != nil {
		return nil, 0, fmt.Errorf("recon %q: %w", s.rc.Label, err)
	}
	return s.x, rep.Iterations, nil
}

// toeplitzCG is the work space of tikhonovToeplitz.
type toeplitzCG struct {
	reg    *priors.Tikhonov
	cg     *priors.CG
	b, tmp []complex128
}

// opSolver returns the solver of type T that s keeps for encoding enc,
// building it with build on first use. A method has one solver type, so one
// map per method serves.
func opSolver[T any](s *solver, enc *encoding, build func() (T, error)) (T, error) {
	if v, ok := s.byEnc[enc]; ok {
		return v.(T), nil
	}
	v, err := build()
	if err != nil {
		var zero T
		return zero, fmt.Errorf("recon %q: %w", s.rc.Label, err)
	}
	s.byEnc[enc] = v
	return v, nil
}

// tikhonovReg builds the regularising operator of a Tikhonov method.
func (w *workerState) tikhonovReg(rc Recon) (*priors.Tikhonov, error) {
	kind, err := priors.ParseTikhonovKind(rc.Tikhonov)
	if err != nil {
		return nil, err
	}
	return priors.NewTikhonov(kind, w.env.ny, w.env.nx, priors.BoundaryNeumann)
}
