package priors

import (
	"fmt"
	"math"

	"accelplan/simulate"
)

// REDUpdate chooses the iteration RED.Solve uses.
type REDUpdate int

const (
	// REDFixedPoint solves, at each step, the data-consistent equation with
	// the denoiser frozen at the last iterate:
	//	(EᴴE + λI) x_{k+1} = Eᴴy + λ·D_σ(x_k)
	// by warm-started CG (Romano et al. 2017, §5.2, the fixed-point
	// strategy; section from memory). One denoising per iteration.
	REDFixedPoint REDUpdate = iota
	// REDSteepestDescent steps along the RED gradient
	// g = Eᴴ(Ex − y) + λ(x − D_σ(x)) with the step
	// μ = ‖g‖²/(‖Eg‖² + λ‖g‖²), exact on the quadratic model in which the
	// denoiser's Jacobian is dropped (Romano et al. 2017, §5.1, steepest
	// descent; the step rule is ours). One denoising and two applications of
	// E per iteration.
	REDSteepestDescent
)

// String returns "fixed-point" or "steepest-descent".
func (u REDUpdate) String() string {
	switch u {
	case REDFixedPoint:
		return "fixed-point"
	case REDSteepestDescent:
		return "steepest-descent"
	}
	return fmt.Sprintf("REDUpdate(%d)", int(u))
}

// ParseREDUpdate returns the update named "fixed-point" or
// "steepest-descent".
func ParseREDUpdate(name string) (REDUpdate, error) {
	for _, u := range []REDUpdate{REDFixedPoint, REDSteepestDescent} {
		if u.String() == name {
			return u, nil
		}
	}
	return 0, fmt.Errorf("priors: unknown RED update %q (valid: fixed-point, steepest-descent)", name)
}

// REDOptions tunes RED.Solve. The zero value is usable.
type REDOptions struct {
	// Update selects the fixed-point (default) or steepest-descent update.
	Update REDUpdate
	// MaxIter caps the iterations; 0 means 100.
	MaxIter int
	// Tol stops the run once ‖x_k − x_{k−1}‖ ≤ Tol·‖x_k‖; 0 disables the
	// test.
	Tol float64
	// CG controls the inner solve of the fixed-point update, warm-started
	// from the previous x; the zero value means at most 20 iterations to a
	// relative residual of 1e-6.
	CG CGOptions
	// Monitor, when not nil, is called after every iteration with x_k,
	// which it must neither keep nor modify. Returning false stops the run.
	Monitor func(k int, x []complex128) bool
}

// RED is regularisation by denoising (Romano Y, Elad M, Milanfar P, "The
// little engine that could: regularization by denoising (RED)", SIAM J
// Imaging Sci 2017;10:1804-1844). The prior is built from a denoiser D_σ as
//
//	ρ(x) = ½·Re⟨x, x − D_σ(x)⟩,
//
// and RED seeks a point where the gradient of ½‖Ex − y‖² + λρ(x) vanishes,
// which under the paper's conditions on D (local homogeneity and a symmetric
// Jacobian) is
//
//	Eᴴ(Ex − y) + λ(x − D_σ(x)) = 0.
//
// Both updates (REDUpdate) iterate towards such a point. λ weighs the prior
// (dimensionless: it multiplies a residual of the image) and σ is the
// denoiser's strength in image units. For a denoiser that is the proximal
// map of a convex prior (a ProxDenoiser), x − D(x) is the gradient of the
// Moreau envelope M(x) = min_u ½‖u − x‖² + g·σ·R(u), so RED then minimises
// the convex ½‖Ex − y‖² + λM(x) (Reehorst ET, Schniter P, IEEE Trans Comput
// Imaging 2019;5:52-67, from memory), and both updates decrease it
// monotonically (see the tests).
//
// A RED holds its work space and allocates nothing per iteration (provided
// the operator and the denoiser do not); make one per goroutine.
type RED struct {
	op  simulate.Operator
	den Denoiser
	cg  *CG

	ehy, rhs, dx, xold, g []complex128
	data, data2           []complex128
	normal                *pnpNormal
}

// NewRED returns a RED solver for operator op with denoiser d.
func NewRED(op simulate.Operator, d Denoiser) (*RED, error) {
	n, m, err := checkDenoiserSolver("RED", op, d)
	if err != nil {
		return nil, err
	}
	cg, err := NewCG(n)
	if err != nil {
		return nil, err
	}
	mk := func(k int) []complex128 { return make([]complex128, k) }
	r := &RED{op: op, den: d, cg: cg,
		ehy: mk(n), rhs: mk(n), dx: mk(n), xold: mk(n), g: mk(n), data: mk(m), data2: mk(m)}
	r.normal = &pnpNormal{op: op, data: r.data}
	return r, nil
}

// Solve writes the reconstruction into x, starting from the guess in x. y
// holds the measured samples, lambda > 0 weighs the prior and sigma > 0 is
// the denoising strength. If the denoiser has a Reset method it is called
// first.
func (r *RED) Solve(x, y []complex128, lambda, sigma float64, opt REDOptions) (PnPReport, error) {
	n, m := r.op.ImageLen(), r.op.DataLen()
	switch {
	case len(y) != m:
		return PnPReport{}, fmt.Errorf("priors: RED data has %d samples, the operator measures %d", len(y), m)
	case len(x) != n:
		return PnPReport{}, fmt.Errorf("priors: RED image has %d pixels, the operator images %d", len(x), n)
	case !(lambda > 0) || math.IsInf(lambda, 0):
		return PnPReport{}, fmt.Errorf("priors: RED λ = %v, want a finite number > 0", lambda)
	case !(sigma > 0) || math.IsInf(sigma, 0):
		return PnPReport{}, fmt.Errorf("priors: RED denoising strength σ = %v, want a finite number > 0", sigma)
	case opt.Update != REDFixedPoint && opt.Update != REDSteepestDescent:
		return PnPReport{}, fmt.Errorf("priors: unknown RED update %d (valid: fixed-point, steepest-descent)", int(opt.Update))
	case opt.MaxIter < 0:
		return PnPReport{}, fmt.Errorf("priors: RED iteration cap %d is negative", opt.MaxIter)
	case !finiteNonNeg(opt.Tol):
		return PnPReport{}, fmt.Errorf("priors: RED tolerance %v, want a finite number ≥ 0", opt.Tol)
	}
	maxIter := opt.MaxIter
	if maxIter == 0 {
		maxIter = 100
	}
	cgOpt := opt.CG
	if cgOpt == (CGOptions{}) {
		cgOpt = CGOptions{MaxIter: 20, Tol: 1e-6}
	}
	if err := cgOpt.validate(); err != nil {
		return PnPReport{}, err
	}
	resetIfStateful(r.den)
	r.op.Adjoint(r.ehy, y)
	ehyNorm := math.Sqrt(linSqNorm(r.ehy))
	lam := complex(lambda, 0)
	rep := PnPReport{Sigma: sigma}
	for k := 1; k <= maxIter; k++ {
		copy(r.xold, x)
		r.den.Denoise(r.dx, x, sigma)
		switch opt.Update {
		case REDFixedPoint:
			for i, v := range r.ehy {
				r.rhs[i] = v + lam*r.dx[i]
			}
			r.normal.rho = lambda
			cr, err := r.cg.Solve(r.normal, x, r.rhs, cgOpt)
			if err != nil {
				return rep, err
			}
			rep.CGIterations += cr.Iterations
		case REDSteepestDescent:
			// g = Eᴴ(Ex − y) + λ(x − D(x))
			r.op.Forward(r.data, x)
			for i := range r.data {
				r.data[i] -= y[i]
			}
			r.op.Adjoint(r.g, r.data)
			for i, v := range x {
				r.g[i] += lam * (v - r.dx[i])
			}
			g2 := linSqNorm(r.g)
			rep.Residual = relRatio(g2, ehyNorm*ehyNorm)
			if g2 == 0 {
				break
			}
			r.op.Forward(r.data2, r.g)
			mu := g2 / (linSqNorm(r.data2) + lambda*g2)
			for i, v := range r.g {
				x[i] -= complex(mu*real(v), mu*imag(v))
			}
		}
		rep.Iterations = k
		rep.RelChange = relRatio(linSqDist(x, r.xold), linSqNorm(x))
		if opt.Monitor != nil && !opt.Monitor(k, x) {
			rep.Stopped = true
			break
		}
		if opt.Tol > 0 && rep.RelChange <= opt.Tol {
			rep.Converged = true
			break
		}
	}
	return rep, nil
}
