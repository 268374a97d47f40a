package priors

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"

	"accelplan/simulate"
)

// ZeroFilled returns E^H y, the adjoint of the encoding operator applied to
// the data: for a masked Cartesian FFT the zero-filled inverse FFT. It is the
// usual starting point of the iterative solvers and the reference scale for
// λ (see RelativeLambda). It allocates the result.
func ZeroFilled(op simulate.Operator, y []complex128) []complex128 {
	x := make([]complex128, op.ImageLen())
	op.Adjoint(x, y)
	return x
}

// MaxAbs returns max_i |x_i|, or 0 for an empty slice.
func MaxAbs(x []complex128) float64 {
	var m2 float64
	for _, c := range x {
		m2 = math.Max(m2, real(c)*real(c)+imag(c)*imag(c))
	}
	return math.Sqrt(m2)
}

// RelativeLambda converts a relative regularisation weight into the absolute
// λ that FISTA takes: λ = rel · max_i |(E^H y)_i|.
//
// λ multiplies R(x) in ½‖E x − y‖² + λ R(x). With an orthonormal encoding
// operator and an orthonormal sparsifying transform, R(x) and the data term
// are both in the units of the image intensity, so λ is an intensity: the
// soft threshold applied to the wavelet coefficients in each FISTA step is
// λ times the step. Expressing λ relative to the peak of the zero-filled
// image makes one value of rel meaningful across phantoms, matrix sizes and
// intensity scalings; rel of the order of 1e-3 … 1e-1 is the useful range
// for wavelet sparsity (common practice).
func RelativeLambda(rel float64, zeroFilled []complex128) float64 {
	return rel * MaxAbs(zeroFilled)
}

// FISTAOptions tunes FISTA. The zero value is usable: 100 iterations, no
// early stop, step from a power-iteration estimate, start at E^H y.
type FISTAOptions struct {
	// MaxIter caps the number of iterations; 0 means 100.
	MaxIter int
	// Tol stops the iteration once ‖x_k − x_{k−1}‖ ≤ Tol·‖x_k‖; 0 disables
	// the test and runs MaxIter iterations.
	Tol float64
	// Step is the gradient step 1/L. When 0 it is set to 1/L with L the
	// estimate of ‖E‖² from EstimateNormSq raised by 1% (the power iteration
	// approaches ‖E‖² from below). For a masked orthonormal FFT ‖E‖² = 1, so
	// a caller that knows this may pass Step = 1.
	Step float64
	// X0 is the warm start (length E.ImageLen()); nil starts from E^H y.
	// FISTA does not modify it.
	X0 []complex128
	// Monitor, when not nil, is called after every iteration k = 1, 2, …
	// with the current iterate, which it must neither keep nor modify.
	// Returning false stops the iteration.
	Monitor func(k int, x []complex128) bool
}

// FISTAInfo reports how a FISTA run ended.
type FISTAInfo struct {
	Iterations int     // iterations performed
	Objective  float64 // ½‖E x − y‖² + λ R(x) at the returned x
	Step       float64 // the step 1/L used
	RelChange  float64 // ‖x_k − x_{k−1}‖ / ‖x_k‖ of the last iteration
	Converged  bool    // the Tol test stopped the run
	Stopped    bool    // the Monitor stopped the run
}

// FISTA minimises ½‖E x − y‖² + λ R(x) for any linear operator E and any
// prior R given by its proximal map, with the fast iterative
// shrinkage-thresholding algorithm with constant step of Beck A, Teboulle M,
// "A fast iterative shrinkage-thresholding algorithm for linear inverse
// problems", SIAM J Imaging Sci 2009;2:183-202:
//
//	x_k     = prox_{λ/L·R}(z_k − (1/L)·E^H(E z_k − y))
//	t_{k+1} = (1 + √(1 + 4t_k²))/2
//	z_{k+1} = x_k + ((t_k − 1)/t_{k+1})·(x_k − x_{k−1})
//
// with z_1 = x_0 and t_1 = 1. Their Theorem 4.4 bounds the objective gap by
// 2L‖x_0 − x*‖²/(k+1)².
//
// λ is absolute (see RelativeLambda for a scale-free choice). prior may be
// nil when λ = 0. All buffers are allocated before the first iteration; the
// iterations allocate nothing as long as the operator and prior do not. The
// returned slice is new and owned by the caller. Errors report inconsistent
// sizes or invalid options; the operator and the prior are used from one
// goroutine only.
func FISTA(op simulate.Operator, y []complex128, prior Prior, lambda float64, opt FISTAOptions) ([]complex128, FISTAInfo, error) {
	var info FISTAInfo
	if err := checkFISTA(op, y, prior, lambda, opt); err != nil {
		return nil, info, err
	}
	s, err := startFISTA(op, y, lambda, opt)
	if err != nil {
		return nil, info, err
	}
	x, xPrev, z, g, r := s.x, s.xPrev, s.z, s.g, s.r
	step, thr, grad := s.step, s.thr, s.grad
	info.Step = step
	t := 1.0
	for k := 1; k <= s.maxIter; k++ {
		grad.apply(g, z, step) // g = z − step·E^H(E z − y)
		if prior != nil && lambda > 0 {
			prior.Prox(x, g, thr)
		} else {
			copy(x, g)
		}
		tNext := (1 + math.Sqrt(1+4*t*t)) / 2
		beta := (t - 1) / tNext
		var dn, xn float64
		for i := range x {
			d := x[i] - xPrev[i]
			dn += real(d)*real(d) + imag(d)*imag(d)
			xn += real(x[i])*real(x[i]) + imag(x[i])*imag(x[i])
			z[i] = x[i] + complex(beta*real(d), beta*imag(d))
		}
		t = tNext
		x, xPrev = xPrev, x // xPrev now holds x_k
		info.Iterations = k
		if xn > 0 {
			info.RelChange = math.Sqrt(dn / xn)
		} else {
			info.RelChange = math.Sqrt(dn)
		}
		if opt.Monitor != nil && !opt.Monitor(k, xPrev) {
			info.Stopped = true
			break
		}
		if opt.Tol > 0 && info.RelChange <= opt.Tol {
			info.Converged = true
			break
		}
	}
	if info.Iterations > 0 {
		x = xPrev
	}
	info.Objective = objective(op, y, prior, lambda, x, r)
	return x, info, nil
}

// Objective returns ½‖E x − y‖² + λ R(x), the quantity FISTA minimises
// (R is skipped when prior is nil). It allocates one data-sized buffer.
func Objective(op simulate.Operator, y []complex128, prior Prior, lambda float64, x []complex128) float64 {
	return objective(op, y, prior, lambda, x, make([]complex128, op.DataLen()))
}

func objective(op simulate.Operator, y []complex128, prior Prior, lambda float64, x, r []complex128) float64 {
	op.Forward(r, x)
	var s float64
	for i := range r {
		d := r[i] - y[i]
		s += real(d)*real(d) + imag(d)*imag(d)
	}
	f := s / 2
	if prior != nil && lambda != 0 {
		f += lambda * prior.Value(x)
	}
	return f
}

// EstimateNormSq estimates ‖E‖² = λ_max(E^H E), the Lipschitz constant of the
// gradient of ½‖E x − y‖², by the power method (Golub GH, Van Loan CF,
// Matrix Computations, 4th ed., 2013) from a seeded random start, stopping
// when the Rayleigh quotient changes by less than tol relative, or after
// maxIter iterations. The estimate approaches ‖E‖² from below.
func EstimateNormSq(op simulate.Operator, maxIter int, tol float64) float64 {
	n, m := op.ImageLen(), op.DataLen()
	return estimateNormSq(op, make([]complex128, n), make([]complex128, n), make([]complex128, m), maxIter, tol)
}

// estimateNormSq runs the power iteration in the caller's buffers u, v
// (image) and r (data).
func estimateNormSq(op simulate.Operator, u, v, r []complex128, maxIter int, tol float64) float64 {
	rng := rand.New(rand.NewPCG(0x9e3779b97f4a7c15, 0xf39cc0605cedc834))
	for i := range u {
		u[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	normalise := func(x []complex128) float64 {
		var s float64
		for _, c := range x {
			s += real(c)*real(c) + imag(c)*imag(c)
		}
		s = math.Sqrt(s)
		if s > 0 {
			for i := range x {
				x[i] = complex(real(x[i])/s, imag(x[i])/s)
			}
		}
		return s
	}
	normalise(u)
	est := 0.0
	for range max(maxIter, 1) {
		op.Forward(r, u)
		op.Adjoint(v, r)
		// Rayleigh quotient ⟨u, E^H E u⟩ with ‖u‖ = 1 is ‖E u‖².
		var q float64
		for _, c := range r {
			q += real(c)*real(c) + imag(c)*imag(c)
		}
		u, v = v, u
		if normalise(u) == 0 {
			return q
		}
		if math.Abs(q-est) <= tol*q {
			return q
		}
		est = q
	}
	return est
}

// fistaStart is the state FISTA and FISTARestart begin from: the buffers,
// the step and threshold, and x_0 = xPrev = z = x (the warm start or Eᴴy).
type fistaStart struct {
	x, xPrev, z, g []complex128 // image-sized
	r              []complex128 // data-sized
	step, thr      float64
	maxIter        int
	grad           *gradStep
}

// startFISTA allocates the buffers of one solve, chooses the step (see
// fistaStep) and sets the start.
func startFISTA(op simulate.Operator, y []complex128, lambda float64, opt FISTAOptions) (*fistaStart, error) {
	n, m := op.ImageLen(), op.DataLen()
	mk := func(k int) []complex128 { return make([]complex128, k) }
	s := &fistaStart{x: mk(n), xPrev: mk(n), z: mk(n), g: mk(n), r: mk(m), maxIter: opt.MaxIter}
	if s.maxIter == 0 {
		s.maxIter = 100
	}
	step, err := fistaStep(op, opt.Step, s.g, s.z, s.r)
	if err != nil {
		return nil, err
	}
	s.step, s.thr = step, lambda*step
	if opt.X0 != nil {
		copy(s.xPrev, opt.X0)
	} else {
		op.Adjoint(s.xPrev, y)
	}
	copy(s.z, s.xPrev)
	copy(s.x, s.xPrev) // returned as is when no iteration runs
	s.grad = newGradStep(op, s.r)
	s.grad.setData(y)
	return s, nil
}

// checkFISTA validates the arguments shared by FISTA and FISTARestart.
func checkFISTA(op simulate.Operator, y []complex128, prior Prior, lambda float64, opt FISTAOptions) error {
	if op == nil {
		return errors.New("priors: FISTA needs an operator")
	}
	n, m := op.ImageLen(), op.DataLen()
	switch {
	case len(y) != m:
		return fmt.Errorf("priors: FISTA data has %d samples, the operator measures %d", len(y), m)
	case math.IsNaN(lambda) || math.IsInf(lambda, 0) || lambda < 0:
		return fmt.Errorf("priors: FISTA λ = %g, want a finite value ≥ 0", lambda)
	case lambda > 0 && prior == nil:
		return fmt.Errorf("priors: FISTA λ = %g needs a prior", lambda)
	case opt.MaxIter < 0:
		return fmt.Errorf("priors: FISTA iteration cap %d is negative", opt.MaxIter)
	case math.IsNaN(opt.Tol) || opt.Tol < 0:
		return fmt.Errorf("priors: FISTA tolerance %g, want ≥ 0", opt.Tol)
	case math.IsNaN(opt.Step) || math.IsInf(opt.Step, 0) || opt.Step < 0:
		return fmt.Errorf("priors: FISTA step %g, want a finite value > 0 (or 0 to estimate it)", opt.Step)
	case opt.X0 != nil && len(opt.X0) != n:
		return fmt.Errorf("priors: FISTA warm start has %d pixels, the operator images %d", len(opt.X0), n)
	}
	return nil
}

// fistaStep returns the gradient step: the given one, or 1/(1.01·L) with L
// the power-iteration estimate of ‖E‖², using g, z (image) and r (data) as
// scratch.
func fistaStep(op simulate.Operator, step float64, g, z, r []complex128) (float64, error) {
	if step != 0 {
		return step, nil
	}
	L := estimateNormSq(op, g, z, r, 100, 1e-7)
	if !(L > 0) || math.IsInf(L, 0) {
		return 0, fmt.Errorf("priors: FISTA cannot estimate ‖E‖² (got %g): is the operator zero?", L)
	}
	return 1 / (1.01 * L), nil
}
