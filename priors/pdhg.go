package priors

import (
	"errors"
	"fmt"
	"math"

	"accelplan/simulate"
)

// PDHGOptions controls a primal-dual hybrid gradient solve.
type PDHGOptions struct {
	// MaxIter caps the number of iterations; it must be at least 1.
	MaxIter int
	// Tol stops the solve when the partial primal-dual gap falls to Tol
	// times the primal objective (0 disables this rule).
	Tol float64
	// ChangeTol stops the solve when the relative change of the image in one
	// iteration, ‖xₙ₊₁ − xₙ‖/‖xₙ₊₁‖, falls to ChangeTol (0 disables it).
	ChangeTol float64
	// GapEvery is the number of iterations between evaluations of the gap,
	// each of which costs one extra forward operator (≤ 0: never; then only
	// ChangeTol and MaxIter stop the solve).
	GapEvery int
	// WarmDual keeps the dual variables of the previous Solve as the
	// starting point instead of zeroing them (useful along a λ sweep, with x
	// warm-started too).
	WarmDual bool
}

// DefaultPDHGOptions returns the options used when a caller has no
// preference: at most 1000 iterations, stopping at a relative gap of 1e-4,
// evaluated every 10 iterations.
func DefaultPDHGOptions() PDHGOptions {
	return PDHGOptions{MaxIter: 1000, Tol: 1e-4, GapEvery: 10}
}

func (o PDHGOptions) validate() error {
	if o.MaxIter < 1 {
		return fmt.Errorf("priors: primal-dual: iterations must be at least 1, got %d", o.MaxIter)
	}
	if !(o.Tol >= 0) || math.IsInf(o.Tol, 0) {
		return fmt.Errorf("priors: primal-dual: gap tolerance must be a finite number ≥ 0, got %v", o.Tol)
	}
	if !(o.ChangeTol >= 0) || math.IsInf(o.ChangeTol, 0) {
		return fmt.Errorf("priors: primal-dual: change tolerance must be a finite number ≥ 0, got %v", o.ChangeTol)
	}
	return nil
}

// PDHGReport says how a primal-dual solve ended.
type PDHGReport struct {
	// Iterations is the number of iterations run.
	Iterations int
	// Objective is the primal objective ½‖E x − y‖² + λ·TV(x) at the last
	// gap evaluation (NaN if none was made).
	Objective float64
	// Gap is the last partial primal-dual gap (NaN if none was made); see
	// TVSolver for its definition.
	Gap float64
	// Change is the relative change of the image in the last iteration.
	Change float64
	// Converged is true when a stopping rule other than MaxIter fired.
	Converged bool
}

// TVSolver solves min_x ½‖E x − y‖² + λ·TV(x), with TV the isotropic total
// variation of type TV, for any encoding operator E by the primal-dual hybrid
// gradient method of Chambolle A, Pock T, J Math Imaging Vis 2011;40:120-145
// (their Algorithm 1 with θ = 1). Both terms are dualised through the stacked
// operator K = [E; ∇], so only E and Eᴴ are needed:
//
//	q ← (q + σ(E x̄ − y)) / (1 + σ)
//	p ← proj_{|p|≤λ}(p + σ ∇x̄)
//	x⁺ ← x − τ (Eᴴq + ∇ᵀp),   x̄ ← 2x⁺ − x
//
// with τ = σ = 1/L, L² = 1.01·‖E‖² + 8 ≥ ‖K‖², ‖E‖² estimated by NormalNorm
// and ‖∇‖² ≤ 8 (Chambolle 2004), so that στ‖K‖² < 1 as their Theorem 1
// requires.
//
// The stopping rule is the partial primal-dual gap that Chambolle & Pock 2011
// define in their §3 (recalled from memory), taken over a ball B of radius
// ‖x‖ about the current x in the primal and over the whole dual domain: for
// the iterate (x; q, p),
//
//	gap = ½‖E x − y − q‖² + (λ·TV(x) − Re⟨p, ∇x⟩) + ‖x‖·‖Eᴴq + ∇ᵀp‖,
//
// a sum of three non-negative terms that vanishes exactly at a saddle point
// and bounds the objective's excess over its minimum whenever the minimiser
// lies in B, as it does near convergence.
//
// A TVSolver holds its work space and the dual variables between calls; it
// allocates nothing per solve. Make one per goroutine.
type TVSolver struct {
	op     simulate.Operator
	d      diff2
	normE2 float64
	tau    float64
	sigma  float64

	q, ex              []complex128 // data length
	px, py, gx, gy     []complex128 // image length
	xold, xbar, ea, da []complex128
}

// NewTVSolver returns a TV solver for operator op on an ny-by-nx image grid
// with boundary rule b. It estimates ‖E‖² once, by 100 power iterations at
// most (seed 1).
func NewTVSolver(op simulate.Operator, ny, nx int, b Boundary) (*TVSolver, error) {
	if op == nil {
		return nil, errors.New("priors: TV primal-dual: no encoding operator")
	}
	d, err := newDiff2(ny, nx, b)
	if err != nil {
		return nil, err
	}
	n := ny * nx
	if op.ImageLen() != n {
		return nil, fmt.Errorf("priors: TV primal-dual: grid %d×%d has %d values, operator image %d", ny, nx, n, op.ImageLen())
	}
	normE2, err := NormalNorm(op, 100, 1e-6, 1)
	if err != nil {
		return nil, err
	}
	m := op.DataLen()
	mk := func(k int) []complex128 { return make([]complex128, k) }
	s := &TVSolver{op: op, d: d, normE2: normE2,
		q: mk(m), ex: mk(m),
		px: mk(n), py: mk(n), gx: mk(n), gy: mk(n),
		xold: mk(n), xbar: mk(n), ea: mk(n), da: mk(n)}
	L := math.Sqrt(1.01*normE2 + GradNormSqBound)
	s.tau, s.sigma = 1/L, 1/L
	return s, nil
}

// OperatorNormSq returns the estimate of ‖E‖² the step sizes were made from.
func (s *TVSolver) OperatorNormSq() float64 { return s.normE2 }

// Steps returns the primal and dual step sizes τ and σ.
func (s *TVSolver) Steps() (tau, sigma float64) { return s.tau, s.sigma }

// Solve writes the minimiser of ½‖E x − y‖² + λ·TV(x) into x, starting from
// the guess in x (a warm start; Eᴴy or zero for a cold one). y holds the
// measured samples; λ must be finite and ≥ 0.
func (s *TVSolver) Solve(x, y []complex128, lambda float64, opt PDHGOptions) (PDHGReport, error) {
	if len(y) != s.op.DataLen() {
		return PDHGReport{}, fmt.Errorf("priors: TV primal-dual: %d samples given, operator measures %d", len(y), s.op.DataLen())
	}
	if len(x) != s.op.ImageLen() {
		return PDHGReport{}, fmt.Errorf("priors: TV primal-dual: image has %d values, operator wants %d", len(x), s.op.ImageLen())
	}
	if !(lambda >= 0) || math.IsInf(lambda, 0) {
		return PDHGReport{}, fmt.Errorf("priors: TV primal-dual: λ must be a finite number ≥ 0, got %v", lambda)
	}
	if err := opt.validate(); err != nil {
		return PDHGReport{}, err
	}
	if !opt.WarmDual {
		clear(s.q)
		clear(s.px)
		clear(s.py)
	}
	tau, sigma := s.tau, s.sigma
	cs := complex(sigma, 0)
	shrink := complex(1/(1+sigma), 0)
	copy(s.xbar, x)
	rep := PDHGReport{Objective: math.NaN(), Gap: math.NaN()}
	for k := 1; k <= opt.MaxIter; k++ {
		// Dual step on the data term.
		s.op.Forward(s.ex, s.xbar)
		for i, v := range s.ex {
			s.q[i] = (s.q[i] + cs*(v-y[i])) * shrink
		}
		// Dual step on TV: projection onto the ball of radius λ.
		s.d.grad(s.gx, s.gy, s.xbar)
		projectBall(s.px, s.py, s.gx, s.gy, sigma, lambda)
		// Primal step and extrapolation.
		s.op.Adjoint(s.ea, s.q)
		s.d.adj(s.da, s.px, s.py)
		var dx2, x2 float64
		ct := complex(tau, 0)
		for i, v := range x {
			nv := v - ct*(s.ea[i]+s.da[i])
			dv := nv - v
			dx2 += real(dv)*real(dv) + imag(dv)*imag(dv)
			x2 += real(nv)*real(nv) + imag(nv)*imag(nv)
			x[i] = nv
			s.xbar[i] = nv + dv
		}
		rep.Iterations = k
		if x2 > 0 {
			rep.Change = math.Sqrt(dx2 / x2)
		} else {
			rep.Change = 0
		}
		if opt.ChangeTol > 0 && rep.Change <= opt.ChangeTol {
			rep.Converged = true
			break
		}
		if opt.GapEvery > 0 && (k%opt.GapEvery == 0 || k == opt.MaxIter) {
			rep.Gap, rep.Objective = s.gap(x, y, lambda)
			if opt.Tol > 0 && rep.Gap <= opt.Tol*rep.Objective {
				rep.Converged = true
				break
			}
		}
	}
	return rep, nil
}

// projectBall sets (px, py) ← proj_{|p|≤r}(p + σ·g) per pixel, with |p| the
// joint modulus of the two complex components.
func projectBall(px, py, gx, gy []complex128, sigma, r float64) {
	cs := complex(sigma, 0)
	r2 := r * r
	for i := range px {
		a := px[i] + cs*gx[i]
		c := py[i] + cs*gy[i]
		m := real(a)*real(a) + imag(a)*imag(a) + real(c)*real(c) + imag(c)*imag(c)
		if m > r2 {
			f := complex(r/math.Sqrt(m), 0)
			a *= f
			c *= f
		}
		px[i], py[i] = a, c
	}
}

// gap returns the partial primal-dual gap and the primal objective at x with
// the current duals. It relies on ea and da holding Eᴴq and ∇ᵀp of the
// current duals, as they do right after a primal step.
func (s *TVSolver) gap(x, y []complex128, lambda float64) (gap, obj float64) {
	s.op.Forward(s.ex, x)
	var fit, mis float64
	for i, v := range s.ex {
		r := v - y[i]
		fit += real(r)*real(r) + imag(r)*imag(r)
		e := r - s.q[i]
		mis += real(e)*real(e) + imag(e)*imag(e)
	}
	s.d.grad(s.gx, s.gy, x)
	var tvx, inner float64
	for i, a := range s.gx {
		c := s.gy[i]
		tvx += math.Sqrt(real(a)*real(a) + imag(a)*imag(a) + real(c)*real(c) + imag(c)*imag(c))
		p, q := s.px[i], s.py[i]
		inner += real(a)*real(p) + imag(a)*imag(p) + real(c)*real(q) + imag(c)*imag(q)
	}
	var kt2 float64
	for i, v := range s.ea {
		w := v + s.da[i]
		kt2 += real(w)*real(w) + imag(w)*imag(w)
	}
	tvGap := lambda*tvx - inner
	if tvGap < 0 { // rounding: |p| ≤ λ makes the exact value ≥ 0
		tvGap = 0
	}
	gap = 0.5*mis + tvGap + linNorm(x)*math.Sqrt(kt2)
	return gap, 0.5*fit + lambda*tvx
}
