package priors

import (
	"errors"
	"fmt"
	"math"

	"accelplan/simulate"
)

// TikhonovKind selects the linear map D of a Tikhonov regulariser ½‖D x‖².
type TikhonovKind int

const (
	// TikhonovIdentity is D = I: the regulariser ½‖x‖² (ridge regression,
	// minimum-norm damping).
	TikhonovIdentity TikhonovKind = iota
	// TikhonovGradient is D = ∇, the 2D forward-difference gradient: the
	// regulariser ½‖∇x‖², which penalises roughness.
	TikhonovGradient
)

// String returns "identity" or "gradient".
func (k TikhonovKind) String() string {
	switch k {
	case TikhonovIdentity:
		return "identity"
	case TikhonovGradient:
		return "gradient"
	}
	return fmt.Sprintf("TikhonovKind(%d)", int(k))
}

// ParseTikhonovKind returns the kind named "identity" or "gradient".
func ParseTikhonovKind(name string) (TikhonovKind, error) {
	switch name {
	case "identity":
		return TikhonovIdentity, nil
	case "gradient":
		return TikhonovGradient, nil
	}
	return 0, fmt.Errorf("priors: unknown Tikhonov regulariser %q (valid: identity, gradient)", name)
}

// Tikhonov is the quadratic regulariser R(x) = ½‖D x‖² of Tikhonov AN, Soviet
// Math Dokl 1963;4:1035-1038, with D the identity or the forward-difference
// gradient (see Hansen PC, Rank-Deficient and Discrete Ill-Posed Problems,
// SIAM 1998, ch. 5). With the factor ½, the problem
// min ½‖E x − y‖² + λ·R(x) has the normal equations (EᴴE + λ DᴴD) x = Eᴴy,
// which TikhonovSolver solves by conjugate gradients.
//
// Tikhonov also implements Prior: Prox for the identity is the closed form
// src/(1+t); for the gradient it solves (I + t DᴴD) u = src by conjugate
// gradients to a relative residual of 1e-10 (the matrix has condition number
// at most 1 + 8t). A Tikhonov holds work space: one per goroutine.
type Tikhonov struct {
	kind   TikhonovKind
	d      diff2
	gx, gy []complex128
	cg     *CG
	b      []complex128
	t      float64
}

// NewTikhonov returns the regulariser of the given kind for ny-by-nx images.
// The boundary rule matters only for TikhonovGradient.
func NewTikhonov(kind TikhonovKind, ny, nx int, b Boundary) (*Tikhonov, error) {
	if kind != TikhonovIdentity && kind != TikhonovGradient {
		return nil, fmt.Errorf("priors: unknown Tikhonov kind %d (valid: identity, gradient)", int(kind))
	}
	d, err := newDiff2(ny, nx, b)
	if err != nil {
		return nil, err
	}
	r := &Tikhonov{kind: kind, d: d}
	if kind == TikhonovGradient {
		n := ny * nx
		r.gx, r.gy, r.b = make([]complex128, n), make([]complex128, n), make([]complex128, n)
		if r.cg, err = NewCG(n); err != nil {
			return nil, err
		}
	}
	return r, nil
}

// Kind returns the regulariser's kind.
func (r *Tikhonov) Kind() TikhonovKind { return r.kind }

// Len returns the number of image values, ny·nx.
func (r *Tikhonov) Len() int { return r.d.ny * r.d.nx }

func (r *Tikhonov) check(x []complex128) {
	if len(x) != r.Len() {
		panic(fmt.Sprintf("priors: Tikhonov regulariser of a %d×%d grid got %d values", r.d.ny, r.d.nx, len(x)))
	}
}

// Value returns ½‖D x‖².
func (r *Tikhonov) Value(x []complex128) float64 {
	r.check(x)
	if r.kind == TikhonovIdentity {
		return 0.5 * linSqNorm(x)
	}
	r.d.grad(r.gx, r.gy, x)
	return 0.5 * (linSqNorm(r.gx) + linSqNorm(r.gy))
}

// Apply writes DᴴD·src into dst, making Tikhonov a Hermitian map.
func (r *Tikhonov) Apply(dst, src []complex128) {
	r.check(dst)
	r.check(src)
	if r.kind == TikhonovIdentity {
		copy(dst, src)
		return
	}
	r.d.grad(r.gx, r.gy, src)
	r.d.adj(dst, r.gx, r.gy)
}

// shifted is the Hermitian map I + t·DᴴD.
type shifted struct{ r *Tikhonov }

func (s shifted) Len() int { return s.r.Len() }
func (s shifted) Apply(dst, src []complex128) {
	s.r.Apply(dst, src)
	t := complex(s.r.t, 0)
	for i, v := range src {
		dst[i] = v + t*dst[i]
	}
}

// Prox writes argmin_u ½‖u − src‖² + t·½‖D u‖² = (I + t DᴴD)⁻¹ src into
// dst. dst and src may alias. t must be finite and ≥ 0 (a bad t is a
// programming error and panics).
func (r *Tikhonov) Prox(dst, src []complex128, t float64) {
	r.check(dst)
	r.check(src)
	if !(t >= 0) || math.IsInf(t, 0) {
		panic(fmt.Sprintf("priors: Tikhonov prox weight must be finite and ≥ 0, got %v", t))
	}
	if r.kind == TikhonovIdentity {
		s := 1 / (1 + t)
		for i, v := range src {
			dst[i] = complex(s*real(v), s*imag(v))
		}
		return
	}
	copy(r.b, src)
	copy(dst, src)
	if t == 0 {
		return
	}
	r.t = t
	// The options are valid constants, so Solve cannot fail here.
	_, _ = r.cg.Solve(shifted{r}, dst, r.b, CGOptions{MaxIter: 500, Tol: 1e-10})
}

// TikhonovSolver solves min_x ½‖E x − y‖² + λ·½‖D x‖² for any encoding
// operator E by conjugate gradients on the normal equations
// (EᴴE + λ DᴴD) x = Eᴴy (Hestenes & Stiefel 1952; for MR reconstruction,
// Pruessmann KP et al., MRM 2001;46:638-651). With λ = 0 it is the
// unregularised least-squares (CG-SENSE) solution reached from the starting
// guess. It holds its work space and allocates nothing per solve; one per
// goroutine.
type TikhonovSolver struct {
	op     simulate.Operator
	reg    *Tikhonov
	lambda float64
	cg     *CG
	rhs    []complex128
	data   []complex128
	tmp    []complex128
}

// NewTikhonovSolver returns a solver for operator op and regulariser reg at
// weight lambda (finite, ≥ 0).
func NewTikhonovSolver(op simulate.Operator, reg *Tikhonov, lambda float64) (*TikhonovSolver, error) {
	if op == nil {
		return nil, errors.New("priors: Tikhonov: no encoding operator")
	}
	if reg == nil {
		return nil, errors.New("priors: Tikhonov: no regulariser")
	}
	n := op.ImageLen()
	if reg.Len() != n {
		return nil, fmt.Errorf("priors: Tikhonov: regulariser grid has %d values, operator image %d", reg.Len(), n)
	}
	if op.DataLen() < 1 {
		return nil, errors.New("priors: Tikhonov: operator measures no sample")
	}
	cg, err := NewCG(n)
	if err != nil {
		return nil, err
	}
	s := &TikhonovSolver{op: op, reg: reg, cg: cg,
		rhs: make([]complex128, n), data: make([]complex128, op.DataLen()), tmp: make([]complex128, n)}
	if err := s.SetLambda(lambda); err != nil {
		return nil, err
	}
	return s, nil
}

// SetLambda changes the regularisation weight.
func (s *TikhonovSolver) SetLambda(lambda float64) error {
	if !(lambda >= 0) || math.IsInf(lambda, 0) {
		return fmt.Errorf("priors: Tikhonov: λ must be a finite number ≥ 0, got %v", lambda)
	}
	s.lambda = lambda
	return nil
}

// Lambda returns the regularisation weight.
func (s *TikhonovSolver) Lambda() float64 { return s.lambda }

// Len returns the number of image values.
func (s *TikhonovSolver) Len() int { return s.op.ImageLen() }

// Apply writes (EᴴE + λ DᴴD)·src into dst, the normal operator.
func (s *TikhonovSolver) Apply(dst, src []complex128) {
	applyNormal(s.op, dst, src, s.data)
	if s.lambda == 0 {
		return
	}
	s.reg.Apply(s.tmp, src)
	l := complex(s.lambda, 0)
	for i, v := range s.tmp {
		dst[i] += l * v
	}
}

// Solve writes the regularised solution into x, starting from the guess in
// x (a warm start; zero it for a cold start). y holds the measured samples.
func (s *TikhonovSolver) Solve(x, y []complex128, opt CGOptions) (CGReport, error) {
	if len(y) != s.op.DataLen() {
		return CGReport{}, fmt.Errorf("priors: Tikhonov: %d samples given, operator measures %d", len(y), s.op.DataLen())
	}
	if len(x) != s.op.ImageLen() {
		return CGReport{}, fmt.Errorf("priors: Tikhonov: image has %d values, operator wants %d", len(x), s.op.ImageLen())
	}
	s.op.Adjoint(s.rhs, y)
	return s.cg.Solve(s, x, s.rhs, opt)
}

// Objective returns ½‖E x − y‖² + λ·½‖D x‖².
func (s *TikhonovSolver) Objective(x, y []complex128) float64 {
	s.op.Forward(s.data, x)
	return 0.5*linSqDist(s.data, y) + s.lambda*s.reg.Value(x)
}
