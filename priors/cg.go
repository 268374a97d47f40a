package priors

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"

	"accelplan/simulate"
)

// Hermitian is a Hermitian positive semidefinite linear map A acting on
// vectors of Len values, such as the normal operator EᴴE + λ DᴴD of a
// regularised least-squares problem. Apply writes A·src into dst; dst and src
// never alias.
type Hermitian interface {
	Apply(dst, src []complex128)
	Len() int
}

// CGOptions controls a conjugate-gradient solve.
type CGOptions struct {
	// MaxIter caps the number of iterations; it must be at least 1.
	MaxIter int
	// Tol is the relative residual ‖b − A·x‖/‖b‖ at which the solve stops;
	// it must be ≥ 0 (0 runs all MaxIter iterations unless the residual
	// vanishes).
	Tol float64
}

// DefaultCGOptions returns the options used when a caller has no preference:
// 100 iterations at most, stopping at a relative residual of 1e-6.
func DefaultCGOptions() CGOptions { return CGOptions{MaxIter: 100, Tol: 1e-6} }

func (o CGOptions) validate() error {
	if o.MaxIter < 1 {
		return fmt.Errorf("priors: conjugate gradients: iterations must be at least 1, got %d", o.MaxIter)
	}
	if !(o.Tol >= 0) || math.IsInf(o.Tol, 0) {
		return fmt.Errorf("priors: conjugate gradients: tolerance must be a finite number ≥ 0, got %v", o.Tol)
	}
	return nil
}

// CGReport says how a conjugate-gradient solve ended.
type CGReport struct {
	// Iterations is the number of iterations run (each applies A once).
	Iterations int
	// Residual is the final relative residual ‖b − A·x‖/‖b‖, tracked by the
	// recurrence of the method.
	Residual float64
	// Converged is true when Residual fell to the tolerance.
	Converged bool
}

// CG solves A·x = b for a Hermitian positive semidefinite A by the method of
// conjugate gradients (Hestenes MR, Stiefel E, J Res Natl Bur Stand
// 1952;49:409-436), as used for regularised and SENSE reconstruction by
// Pruessmann KP et al., MRM 2001;46:638-651. It holds the three work vectors
// of the method, so that a solve allocates nothing; make one per goroutine.
type CG struct {
	r, p, ap []complex128
}

// NewCG returns a solver for vectors of n values, n ≥ 1.
func NewCG(n int) (*CG, error) {
	if n < 1 {
		return nil, fmt.Errorf("priors: conjugate gradients need at least one unknown, got %d", n)
	}
	return &CG{r: make([]complex128, n), p: make([]complex128, n), ap: make([]complex128, n)}, nil
}

// Solve runs conjugate gradients on A·x = b. On entry x holds the starting
// guess (a warm start; zero it for a cold start); on return it holds the
// solution. The iteration stops when the recursively updated residual falls
// to opt.Tol·‖b‖, after opt.MaxIter iterations, or when A shows no positive
// curvature along the search direction (b outside the range of a singular A).
func (c *CG) Solve(a Hermitian, x, b []complex128, opt CGOptions) (CGReport, error) {
	n := len(c.r)
	if a.Len() != n || len(x) != n || len(b) != n {
		return CGReport{}, fmt.Errorf("priors: conjugate gradients: solver for %d values got operator %d, x %d, b %d", n, a.Len(), len(x), len(b))
	}
	if err := opt.validate(); err != nil {
		return CGReport{}, err
	}
	bn := linNorm(b)
	if bn == 0 {
		clear(x)
		return CGReport{Converged: true}, nil
	}
	r, p, ap := c.r, c.p, c.ap
	a.Apply(ap, x)
	for i := range r {
		r[i] = b[i] - ap[i]
	}
	copy(p, r)
	rs := linSqNorm(r)
	stop := opt.Tol * bn
	rep := CGReport{Residual: math.Sqrt(rs) / bn}
	if math.Sqrt(rs) <= stop {
		rep.Converged = true
		return rep, nil
	}
	for rep.Iterations < opt.MaxIter {
		a.Apply(ap, p)
		pap := linRealDot(p, ap)
		if !(pap > 0) {
			break
		}
		alpha := rs / pap
		rep.Iterations++
		rsNew := 0.0
		for i := range x {
			x[i] += complex(alpha, 0) * p[i]
			v := r[i] - complex(alpha, 0)*ap[i]
			r[i] = v
			rsNew += real(v)*real(v) + imag(v)*imag(v)
		}
		rep.Residual = math.Sqrt(rsNew) / bn
		if math.Sqrt(rsNew) <= stop {
			rep.Converged = true
			break
		}
		beta := complex(rsNew/rs, 0)
		for i := range p {
			p[i] = r[i] + beta*p[i]
		}
		rs = rsNew
	}
	return rep, nil
}

// NormalNorm estimates ‖EᴴE‖ = ‖E‖², the largest eigenvalue of the normal
// operator of op, by power iteration (von Mises R, Pollaczek-Geiringer H, Z
// Angew Math Mech 1929;9:58-77; Golub GH, Van Loan CF, Matrix Computations,
// 4th ed., 2013, §8.2.1) from a random start drawn with
// rand.NewPCG(seed, 0x9e3779b97f4a7c15). The estimate is the Rayleigh
// quotient ‖E v‖²/‖v‖², which approaches ‖E‖² from below; iterations stop
// when it changes by less than tol relative, or after maxIter. Step sizes of
// first-order solvers derived from it should keep a small margin.
//
// It allocates one image and one data vector; it is meant to run once per
// operator, not inside a solver's loop.
func NormalNorm(op simulate.Operator, maxIter int, tol float64, seed uint64) (float64, error) {
	if op == nil {
		return 0, errors.New("priors: operator norm: no operator")
	}
	n, m := op.ImageLen(), op.DataLen()
	if n < 1 || m < 1 {
		return 0, fmt.Errorf("priors: operator norm: operator maps %d image values to %d samples", n, m)
	}
	if maxIter < 1 {
		return 0, fmt.Errorf("priors: operator norm: iterations must be at least 1, got %d", maxIter)
	}
	if !(tol >= 0) || math.IsInf(tol, 0) {
		return 0, fmt.Errorf("priors: operator norm: tolerance must be a finite number ≥ 0, got %v", tol)
	}
	rng := rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15))
	v := make([]complex128, n)
	d := make([]complex128, m)
	for i := range v {
		v[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	est := 0.0
	for k := 0; k < maxIter; k++ {
		vn := linNorm(v)
		if vn == 0 {
			break
		}
		linScale(v, 1/vn)
		op.Forward(d, v)
		next := linSqNorm(d) // Rayleigh quotient with ‖v‖ = 1
		op.Adjoint(v, d)
		done := k > 0 && math.Abs(next-est) <= tol*next
		est = next
		if done {
			break
		}
	}
	return est, nil
}

// linSqNorm returns ‖x‖².
func linSqNorm(x []complex128) float64 {
	s := 0.0
	for _, v := range x {
		s += real(v)*real(v) + imag(v)*imag(v)
	}
	return s
}

// linNorm returns ‖x‖.
func linNorm(x []complex128) float64 { return math.Sqrt(linSqNorm(x)) }

// linRealDot returns Re⟨a, b⟩ = Re Σ conj(a)·b.
func linRealDot(a, b []complex128) float64 {
	s := 0.0
	for i, v := range a {
		w := b[i]
		s += real(v)*real(w) + imag(v)*imag(w)
	}
	return s
}

// linScale multiplies x by the real factor s.
func linScale(x []complex128, s float64) {
	for i, v := range x {
		x[i] = complex(s*real(v), s*imag(v))
	}
}

// linSqDist returns ‖a − b‖².
func linSqDist(a, b []complex128) float64 {
	s := 0.0
	for i, v := range a {
		d := v - b[i]
		s += real(d)*real(d) + imag(d)*imag(d)
	}
	return s
}
