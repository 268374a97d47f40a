package priors

import (
	"errors"
	"fmt"
	"math"

	"accelplan/simulate"
)

// ADMMOptions controls an ADMM solve.
type ADMMOptions struct {
	// MaxIter caps the number of outer iterations; it must be at least 1.
	MaxIter int
	// AbsTol and RelTol set the stopping thresholds of Boyd et al. 2011,
	// §3.3.1: the solve stops when ‖x − z‖ ≤ √n·AbsTol + RelTol·max(‖x‖, ‖z‖)
	// and ρ‖z − z_prev‖ ≤ √n·AbsTol + RelTol·ρ‖u‖ (both ≥ 0; both 0 runs all
	// MaxIter iterations).
	AbsTol, RelTol float64
	// Rho is the starting penalty ρ (> 0).
	Rho float64
	// Adaptive turns on residual balancing (Boyd et al. 2011, §3.4.1, with
	// their μ = 10, τ = 2): ρ is doubled or halved when one residual exceeds
	// the other tenfold.
	Adaptive bool
	// CG controls the inner conjugate-gradient solve of the x-update, which
	// is warm-started from the previous x.
	CG CGOptions
}

// DefaultADMMOptions returns the options used when a caller has no
// preference: 500 iterations at most, AbsTol 1e-6, RelTol 1e-4, ρ = 0.2
// (suited to an operator with ‖E‖ = 1 and images of order 1) with residual
// balancing, and an inner CG of at most 20 iterations to 1e-6.
func DefaultADMMOptions() ADMMOptions {
	return ADMMOptions{MaxIter: 500, AbsTol: 1e-6, RelTol: 1e-4, Rho: 0.2, Adaptive: true,
		CG: CGOptions{MaxIter: 20, Tol: 1e-6}}
}

func (o ADMMOptions) validate() error {
	if o.MaxIter < 1 {
		return fmt.Errorf("priors: ADMM: iterations must be at least 1, got %d", o.MaxIter)
	}
	if !(o.AbsTol >= 0) || math.IsInf(o.AbsTol, 0) || !(o.RelTol >= 0) || math.IsInf(o.RelTol, 0) {
		return fmt.Errorf("priors: ADMM: tolerances must be finite numbers ≥ 0, got %v and %v", o.AbsTol, o.RelTol)
	}
	if !(o.Rho > 0) || math.IsInf(o.Rho, 0) {
		return fmt.Errorf("priors: ADMM: penalty ρ must be a finite number > 0, got %v", o.Rho)
	}
	return o.CG.validate()
}

// ADMMReport says how an ADMM solve ended.
type ADMMReport struct {
	// Iterations is the number of outer iterations run.
	Iterations int
	// CGIterations is the total number of inner CG iterations.
	CGIterations int
	// Primal and Dual are the final residual norms ‖x − z‖ and ρ‖z − z_prev‖.
	Primal, Dual float64
	// Rho is the final penalty.
	Rho float64
	// Converged is true when both residuals fell to their thresholds.
	Converged bool
}

// ADMM solves min_x ½‖E x − y‖² + λ·R(x) for any encoding operator E and
// any Prior R by the alternating direction method of multipliers in its
// scaled form (Boyd S et al., Found Trends Mach Learn 2011;3:1-122, §3.1.1),
// with the splitting x = z:
//
//	x ← (EᴴE + ρI)⁻¹ (Eᴴy + ρ(z − u))     by warm-started CG
//	z ← prox_{(λ/ρ)R}(x + u)
//	u ← u + x − z
//
// Because R enters only through its proximal map, a denoiser with the Prior
// interface can stand in for it: that is plug-and-play ADMM (Venkatakrishnan
// SV, Bouman CA, Wohlberg B, IEEE GlobalSIP 2013). The returned image is z,
// the iterate on which the prior acts.
//
// An inexact prox limits the accuracy: a prox solved to an objective gap g
// is off by up to √(2g) in norm (its objective is 1-strongly convex), and ADMM
// settles at that level. With the TV prox solved to a relative gap of 1e-6
// the final objective came within 1e-6 (relative) of the primal-dual
// solution in the tests; TVSolver is the more accurate TV solver.
//
// An ADMM holds its work space and allocates nothing per solve (provided the
// prior's Prox does not); make one per goroutine.
type ADMM struct {
	op    simulate.Operator
	prior Prior
	cg    *CG
	rho   float64

	ehy, rhs, z, zold, u, v []complex128
	data                    []complex128
}

// NewADMM returns an ADMM solver for operator op and prior.
func NewADMM(op simulate.Operator, prior Prior) (*ADMM, error) {
	if op == nil {
		return nil, errors.New("priors: ADMM: no encoding operator")
	}
	if prior == nil {
		return nil, errors.New("priors: ADMM: no prior")
	}
	n, m := op.ImageLen(), op.DataLen()
	if m < 1 {
		return nil, errors.New("priors: ADMM: operator measures no sample")
	}
	cg, err := NewCG(n)
	if err != nil {
		return nil, err
	}
	mk := func(k int) []complex128 { return make([]complex128, k) }
	return &ADMM{op: op, prior: prior, cg: cg,
		ehy: mk(n), rhs: mk(n), z: mk(n), zold: mk(n), u: mk(n), v: mk(n), data: mk(m)}, nil
}

// admmNormal is the Hermitian map EᴴE + ρI.
type admmNormal struct{ a *ADMM }

func (h admmNormal) Len() int { return h.a.op.ImageLen() }
func (h admmNormal) Apply(dst, src []complex128) {
	a := h.a
	applyNormal(a.op, dst, src, a.data)
	r := complex(a.rho, 0)
	for i, v := range src {
		dst[i] += r * v
	}
}

// Solve writes the solution into x, starting from the guess in x (a warm
// start for x and z; the scaled dual u starts at zero). y holds the measured
// samples; λ must be finite and ≥ 0.
func (a *ADMM) Solve(x, y []complex128, lambda float64, opt ADMMOptions) (ADMMReport, error) {
	if len(y) != a.op.DataLen() {
		return ADMMReport{}, fmt.Errorf("priors: ADMM: %d samples given, operator measures %d", len(y), a.op.DataLen())
	}
	if len(x) != a.op.ImageLen() {
		return ADMMReport{}, fmt.Errorf("priors: ADMM: image has %d values, operator wants %d", len(x), a.op.ImageLen())
	}
	if !(lambda >= 0) || math.IsInf(lambda, 0) {
		return ADMMReport{}, fmt.Errorf("priors: ADMM: λ must be a finite number ≥ 0, got %v", lambda)
	}
	if err := opt.validate(); err != nil {
		return ADMMReport{}, err
	}
	a.rho = opt.Rho
	a.op.Adjoint(a.ehy, y)
	copy(a.z, x)
	clear(a.u)
	sqrtN := math.Sqrt(float64(len(x)))
	rep := ADMMReport{}
	for k := 1; k <= opt.MaxIter; k++ {
		rho := complex(a.rho, 0)
		for i, v := range a.ehy {
			a.rhs[i] = v + rho*(a.z[i]-a.u[i])
		}
		cr, err := a.cg.Solve(admmNormal{a}, x, a.rhs, opt.CG)
		if err != nil {
			return rep, err
		}
		rep.CGIterations += cr.Iterations
		copy(a.zold, a.z)
		for i, v := range x {
			a.v[i] = v + a.u[i]
		}
		a.prior.Prox(a.z, a.v, lambda/a.rho)
		var r2, s2, x2, z2, u2 float64
		for i, v := range x {
			d := v - a.z[i]
			a.u[i] += d
			r2 += real(d)*real(d) + imag(d)*imag(d)
			e := a.z[i] - a.zold[i]
			s2 += real(e)*real(e) + imag(e)*imag(e)
			x2 += real(v)*real(v) + imag(v)*imag(v)
			w := a.z[i]
			z2 += real(w)*real(w) + imag(w)*imag(w)
			w = a.u[i]
			u2 += real(w)*real(w) + imag(w)*imag(w)
		}
		rep.Iterations = k
		rep.Primal = math.Sqrt(r2)
		rep.Dual = a.rho * math.Sqrt(s2)
		epsPri := sqrtN*opt.AbsTol + opt.RelTol*math.Sqrt(max(x2, z2))
		epsDual := sqrtN*opt.AbsTol + opt.RelTol*a.rho*math.Sqrt(u2)
		if rep.Primal <= epsPri && rep.Dual <= epsDual && (opt.AbsTol > 0 || opt.RelTol > 0) {
			rep.Converged = true
			break
		}
		if opt.Adaptive {
			const mu, scale = 10, 2
			switch {
			case rep.Primal > mu*rep.Dual:
				a.rho *= scale
				linScale(a.u, 1/scale)
			case rep.Dual > mu*rep.Primal:
				a.rho /= scale
				linScale(a.u, scale)
			}
		}
	}
	rep.Rho = a.rho
	copy(x, a.z)
	return rep, nil
}
