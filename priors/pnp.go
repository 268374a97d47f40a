package priors

import (
	"fmt"
	"math"

	"accelplan/simulate"
)

// PnPReport says how a plug-and-play or RED solve ended.
type PnPReport struct {
	// Iterations is the number of outer iterations run.
	Iterations int
	// CGIterations is the total number of inner conjugate-gradient
	// iterations (PnP-ADMM and the RED fixed-point update; 0 otherwise).
	CGIterations int
	// RelChange is ‖x_k − x_{k−1}‖/‖x_k‖ of the returned iterate at the last
	// iteration.
	RelChange float64
	// Residual is, for PnP-ADMM, the relative primal residual ‖x − z‖/‖z‖;
	// for RED, the relative size ‖∇‖/‖Eᴴy‖ of the RED gradient
	// Eᴴ(Ex − y) + λ(x − D(x)) at the last point where it was formed
	// (steepest descent only; 0 for the fixed-point update); 0 for PnP-FISTA.
	Residual float64
	// Rho is the final ADMM penalty (PnP-ADMM only).
	Rho float64
	// Sigma is the denoising strength used in the last iteration.
	Sigma float64
	// Converged is true when the Tol test stopped the run.
	Converged bool
	// Stopped is true when the Monitor stopped the run.
	Stopped bool
}

// PnPADMMOptions tunes PnPADMM.Solve. The zero value is usable.
type PnPADMMOptions struct {
	// MaxIter caps the outer iterations; 0 means 100.
	MaxIter int
	// Tol stops the run once both ‖z_k − z_{k−1}‖ ≤ Tol·‖z_k‖ and
	// ‖x_k − z_k‖ ≤ Tol·‖z_k‖; 0 disables the test and runs MaxIter
	// iterations.
	Tol float64
	// Rho is the penalty ρ > 0 of the splitting x = z; 0 means 0.2·‖E‖²
	// (‖E‖² by power iteration, once per PnPADMM): in units of the
	// curvature of the data term, 0.2 did better than 1 for every denoiser
	// on the undersampled test problem (R ≈ 4.6, σ tuned for each).
	Rho float64
	// RhoGrowth γ ≥ 1 turns on the continuation of Chan SH, Wang X, Elgendy
	// OA, "Plug-and-play ADMM for image restoration: fixed-point convergence
	// and applications", IEEE Trans Comput Imaging 2017;3:84-98: after an
	// iteration in which the combined change Δ_k = (‖x_k − x_{k−1}‖ +
	// ‖z_k − z_{k−1}‖ + ‖u_k − u_{k−1}‖)/√n did not fall below
	// RhoShrink·Δ_{k−1}, ρ is multiplied by γ. The strength then falls as
	// σ_k = σ·√(ρ₀/ρ_k), keeping λ = ρσ² of the MAP reading fixed, and the
	// iteration converges for any bounded denoiser (their Theorem 1). 0 or 1
	// keeps ρ and σ fixed.
	RhoGrowth float64
	// RhoShrink η ∈ (0, 1) of the continuation test; 0 means 0.9.
	RhoShrink float64
	// CG controls the inner conjugate-gradient solve of the x-update,
	// warm-started from the previous x. The zero value means at most 20
	// iterations to a relative residual of 1e-6.
	CG CGOptions
	// Monitor, when not nil, is called after every iteration with the
	// current image z, which it must neither keep nor modify. Returning
	// false stops the run.
	Monitor func(k int, z []complex128) bool
}

func (o PnPADMMOptions) withDefaults() (PnPADMMOptions, error) {
	switch {
	case o.MaxIter < 0:
		return o, fmt.Errorf("priors: PnP-ADMM iteration cap %d is negative", o.MaxIter)
	case !finiteNonNeg(o.Tol):
		return o, fmt.Errorf("priors: PnP-ADMM tolerance %v, want a finite number ≥ 0", o.Tol)
	case !finiteNonNeg(o.Rho):
		return o, fmt.Errorf("priors: PnP-ADMM penalty ρ = %v, want a finite number > 0 (or 0 for 0.2·‖E‖²)", o.Rho)
	case !finiteNonNeg(o.RhoGrowth) || (o.RhoGrowth != 0 && o.RhoGrowth < 1):
		return o, fmt.Errorf("priors: PnP-ADMM ρ growth %v, want 1 or more (0 or 1 for a fixed ρ)", o.RhoGrowth)
	case !finiteNonNeg(o.RhoShrink) || o.RhoShrink >= 1:
		return o, fmt.Errorf("priors: PnP-ADMM ρ continuation factor η = %v, want 0 < η < 1 (0 for 0.9)", o.RhoShrink)
	}
	if o.MaxIter == 0 {
		o.MaxIter = 100
	}
	if o.RhoGrowth == 0 {
		o.RhoGrowth = 1
	}
	if o.RhoShrink == 0 {
		o.RhoShrink = 0.9
	}
	if o.CG == (CGOptions{}) {
		o.CG = CGOptions{MaxIter: 20, Tol: 1e-6}
	}
	return o, o.CG.validate()
}

// PnPADMM is plug-and-play ADMM (Venkatakrishnan SV, Bouman CA, Wohlberg B,
// "Plug-and-play priors for model based reconstruction", IEEE GlobalSIP
// 2013:945-948): the scaled ADMM of Boyd S et al., Found Trends Mach Learn
// 2011;3:1-122, §3.1.1, for ½‖E x − y‖² + (prior) with the splitting x = z,
// in which the proximal map of the prior is replaced by a denoiser D_σ:
//
//	x ← (EᴴE + ρI)⁻¹ (Eᴴy + ρ(z − u))     by warm-started CG
//	z ← D_σ(x + u)
//	u ← u + x − z
//
// The denoising strength σ plays the part of λ: in the MAP reading of the
// paper, prox_{(λ/ρ)R} is the MAP denoiser for noise of variance λ/ρ, so
// σ = √(λ/ρ). Here σ is given directly, in image intensity units, because
// that is what a denoiser understands; RelativeLambda gives a scale-free
// way to choose it. With a ProxDenoiser of gain g the iteration is exactly
// ADMM with the prior at λ = ρ·g·σ.
//
// The returned image is z, the denoiser's output. The solver works for any
// encoding operator; for a masked Cartesian FFT, EᴴE + ρI has two distinct
// eigenvalues and CG solves the x-update in two iterations.
//
// A PnPADMM holds its work space and allocates nothing per iteration
// (provided the operator and the denoiser do not); make one per goroutine.
type PnPADMM struct {
	op     simulate.Operator
	den    Denoiser
	cg     *CG
	rho    float64
	normE  float64 // ‖E‖², estimated on first need
	normal *pnpNormal

	ehy, rhs, z, zold, xold, u, v []complex128
	data                          []complex128
}

// NewPnPADMM returns a plug-and-play ADMM solver for operator op with
// denoiser d.
func NewPnPADMM(op simulate.Operator, d Denoiser) (*PnPADMM, error) {
	n, m, err := checkDenoiserSolver("PnP-ADMM", op, d)
	if err != nil {
		return nil, err
	}
	cg, err := NewCG(n)
	if err != nil {
		return nil, err
	}
	mk := func(k int) []complex128 { return make([]complex128, k) }
	p := &PnPADMM{op: op, den: d, cg: cg,
		ehy: mk(n), rhs: mk(n), z: mk(n), zold: mk(n), xold: mk(n), u: mk(n), v: mk(n), data: mk(m)}
	p.normal = &pnpNormal{op: op, data: p.data}
	return p, nil
}

// pnpNormal is the Hermitian map EᴴE + ρI of the x-update.
type pnpNormal struct {
	op   simulate.Operator
	data []complex128
	rho  float64
}

func (h *pnpNormal) Len() int { return h.op.ImageLen() }
func (h *pnpNormal) Apply(dst, src []complex128) {
	applyNormal(h.op, dst, src, h.data)
	for i, v := range src {
		dst[i] += complex(h.rho*real(v), h.rho*imag(v))
	}
}

// normSq returns ‖E‖², estimating it once.
func (p *PnPADMM) normSq() (float64, error) {
	if p.normE == 0 {
		L := estimateNormSq(p.op, p.rhs, p.v, p.data, 100, 1e-7)
		if !(L > 0) || math.IsInf(L, 0) {
			return 0, fmt.Errorf("priors: PnP-ADMM cannot estimate ‖E‖² (got %g): is the operator zero?", L)
		}
		p.normE = L
	}
	return p.normE, nil
}

// Solve writes the reconstruction into x, starting from the guess in x (a
// warm start for x and z; the scaled dual u starts at zero). y holds the
// measured samples and sigma > 0 is the denoising strength (noise standard
// deviation per channel, image units). If the denoiser has a Reset method it
// is called first.
func (p *PnPADMM) Solve(x, y []complex128, sigma float64, opt PnPADMMOptions) (PnPReport, error) {
	n, m := p.op.ImageLen(), p.op.DataLen()
	switch {
	case len(y) != m:
		return PnPReport{}, fmt.Errorf("priors: PnP-ADMM data has %d samples, the operator measures %d", len(y), m)
	case len(x) != n:
		return PnPReport{}, fmt.Errorf("priors: PnP-ADMM image has %d pixels, the operator images %d", len(x), n)
	case !(sigma > 0) || math.IsInf(sigma, 0):
		return PnPReport{}, fmt.Errorf("priors: PnP-ADMM denoising strength σ = %v, want a finite number > 0", sigma)
	}
	opt, err := opt.withDefaults()
	if err != nil {
		return PnPReport{}, err
	}
	rho0 := opt.Rho
	if rho0 == 0 {
		L, err := p.normSq()
		if err != nil {
			return PnPReport{}, err
		}
		rho0 = 0.2 * L
	}
	resetIfStateful(p.den)
	p.rho = rho0
	p.op.Adjoint(p.ehy, y)
	copy(p.z, x)
	clear(p.u)
	sqrtN := math.Sqrt(float64(n))
	rep := PnPReport{}
	deltaPrev := math.Inf(1)
	for k := 1; k <= opt.MaxIter; k++ {
		s := sigma * math.Sqrt(rho0/p.rho)
		rho := p.rho
		for i, v := range p.ehy {
			w := p.z[i] - p.u[i]
			p.rhs[i] = v + complex(rho*real(w), rho*imag(w))
		}
		copy(p.xold, x)
		p.normal.rho = rho
		cr, err := p.cg.Solve(p.normal, x, p.rhs, opt.CG)
		if err != nil {
			return rep, err
		}
		rep.CGIterations += cr.Iterations
		copy(p.zold, p.z)
		for i, v := range x {
			p.v[i] = v + p.u[i]
		}
		p.den.Denoise(p.z, p.v, s)
		var r2, dz2, z2, dx2, du2 float64
		for i, v := range x {
			d := v - p.z[i]
			p.u[i] += d
			r2 += real(d)*real(d) + imag(d)*imag(d)
			e := p.z[i] - p.zold[i]
			dz2 += real(e)*real(e) + imag(e)*imag(e)
			w := p.z[i]
			z2 += real(w)*real(w) + imag(w)*imag(w)
			e = v - p.xold[i]
			dx2 += real(e)*real(e) + imag(e)*imag(e)
		}
		// u_k − u_{k−1} = x_k − z_k.
		du2 = r2
		rep.Iterations = k
		rep.Sigma = s
		rep.RelChange = relRatio(dz2, z2)
		rep.Residual = relRatio(r2, z2)
		if opt.Monitor != nil && !opt.Monitor(k, p.z) {
			rep.Stopped = true
			break
		}
		if opt.Tol > 0 && rep.RelChange <= opt.Tol && rep.Residual <= opt.Tol {
			rep.Converged = true
			break
		}
		if opt.RhoGrowth > 1 {
			delta := (math.Sqrt(dx2) + math.Sqrt(dz2) + math.Sqrt(du2)) / sqrtN
			if delta >= opt.RhoShrink*deltaPrev {
				// Scaled dual: u = y_dual/ρ, so it shrinks as ρ grows.
				p.rho *= opt.RhoGrowth
				linScale(p.u, 1/opt.RhoGrowth)
			}
			deltaPrev = delta
		}
	}
	rep.Rho = p.rho
	copy(x, p.z)
	return rep, nil
}

// relRatio returns √(a/b), or √a when b is 0.
func relRatio(a, b float64) float64 {
	if b > 0 {
		return math.Sqrt(a / b)
	}
	return math.Sqrt(a)
}

// finiteNonNeg reports whether v is a finite number ≥ 0.
func finiteNonNeg(v float64) bool { return v >= 0 && !math.IsInf(v, 0) }

// PnPFISTAOptions tunes PnPFISTA.Solve. The zero value is usable.
type PnPFISTAOptions struct {
	// MaxIter caps the iterations; 0 means 100.
	MaxIter int
	// Tol stops the run once ‖x_k − x_{k−1}‖ ≤ Tol·‖x_k‖; 0 disables the
	// test.
	Tol float64
	// Step is the gradient step 1/L; 0 means 1/(1.01·‖E‖²) with ‖E‖² from
	// a power iteration, once per PnPFISTA.
	Step float64
	// NoMomentum drops the extrapolation: the iteration is then
	// plug-and-play ISTA (proximal gradient with the denoiser), slower but
	// a fixed-point iteration of an averaged map for non-expansive
	// denoisers.
	NoMomentum bool
	// Monitor, when not nil, is called after every iteration with x_k,
	// which it must neither keep nor modify. Returning false stops the run.
	Monitor func(k int, x []complex128) bool
}

// PnPFISTA is plug-and-play FISTA: the accelerated proximal gradient method
// of Beck A, Teboulle M, SIAM J Imaging Sci 2009;2:183-202 with the proximal
// map replaced by a denoiser, the plug-and-play substitution of
// Venkatakrishnan SV, Bouman CA, Wohlberg B, IEEE GlobalSIP 2013:945-948
// (in this proximal-gradient form: Kamilov US, Mansour H, Wohlberg B, IEEE
// Signal Process Lett 2017;24:1872-1876, citation from memory):
//
//	x_k     = D_σ(z_k − (1/L)·Eᴴ(E z_k − y))
//	t_{k+1} = (1 + √(1 + 4t_k²))/2
//	z_{k+1} = x_k + ((t_k − 1)/t_{k+1})·(x_k − x_{k−1})
//
// σ is the denoising strength (image units; σ² = λ/L in the MAP reading).
// With a ProxDenoiser of gain g it is FISTA with the prior at λ = g·σ·L.
// The momentum assumes a proximal map; with non-local means it made the
// iteration oscillate on the test problem for some σ, where the plain
// iteration (NoMomentum, plug-and-play ISTA) settled.
//
// A PnPFISTA holds its work space and allocates nothing per iteration
// (provided the operator and the denoiser do not); make one per goroutine.
type PnPFISTA struct {
	op    simulate.Operator
	den   Denoiser
	normE float64

	xp, z, g []complex128
	r        []complex128
	grad     *gradStep
}

// NewPnPFISTA returns a plug-and-play FISTA solver for operator op with
// denoiser d.
func NewPnPFISTA(op simulate.Operator, d Denoiser) (*PnPFISTA, error) {
	n, m, err := checkDenoiserSolver("PnP-FISTA", op, d)
	if err != nil {
		return nil, err
	}
	mk := func(k int) []complex128 { return make([]complex128, k) }
	r := mk(m)
	return &PnPFISTA{op: op, den: d, xp: mk(n), z: mk(n), g: mk(n), r: r, grad: newGradStep(op, r)}, nil
}

// Solve writes the reconstruction into x, starting from the guess in x. y
// holds the measured samples and sigma > 0 is the denoising strength. If the
// denoiser has a Reset method it is called first.
func (p *PnPFISTA) Solve(x, y []complex128, sigma float64, opt PnPFISTAOptions) (PnPReport, error) {
	n, m := p.op.ImageLen(), p.op.DataLen()
	switch {
	case len(y) != m:
		return PnPReport{}, fmt.Errorf("priors: PnP-FISTA data has %d samples, the operator measures %d", len(y), m)
	case len(x) != n:
		return PnPReport{}, fmt.Errorf("priors: PnP-FISTA image has %d pixels, the operator images %d", len(x), n)
	case !(sigma > 0) || math.IsInf(sigma, 0):
		return PnPReport{}, fmt.Errorf("priors: PnP-FISTA denoising strength σ = %v, want a finite number > 0", sigma)
	case opt.MaxIter < 0:
		return PnPReport{}, fmt.Errorf("priors: PnP-FISTA iteration cap %d is negative", opt.MaxIter)
	case !finiteNonNeg(opt.Tol):
		return PnPReport{}, fmt.Errorf("priors: PnP-FISTA tolerance %v, want a finite number ≥ 0", opt.Tol)
	case !finiteNonNeg(opt.Step):
		return PnPReport{}, fmt.Errorf("priors: PnP-FISTA step %v, want a finite number > 0 (or 0 to estimate it)", opt.Step)
	}
	maxIter := opt.MaxIter
	if maxIter == 0 {
		maxIter = 100
	}
	step := opt.Step
	if step == 0 {
		if p.normE == 0 {
			L := estimateNormSq(p.op, p.g, p.z, p.r, 100, 1e-7)
			if !(L > 0) || math.IsInf(L, 0) {
				return PnPReport{}, fmt.Errorf("priors: PnP-FISTA cannot estimate ‖E‖² (got %g): is the operator zero?", L)
			}
			p.normE = L
		}
		step = 1 / (1.01 * p.normE)
	}
	resetIfStateful(p.den)
	copy(p.xp, x) // x_{k−1}
	copy(p.z, x)
	t := 1.0
	rep := PnPReport{Sigma: sigma}
	p.grad.setData(y)
	for k := 1; k <= maxIter; k++ {
		p.grad.apply(p.g, p.z, step) // g = z − step·Eᴴ(E z − y)
		p.den.Denoise(x, p.g, sigma)
		beta := 0.0
		if !opt.NoMomentum {
			tNext := (1 + math.Sqrt(1+4*t*t)) / 2
			beta = (t - 1) / tNext
			t = tNext
		}
		var dn, xn float64
		for i, v := range x {
			d := v - p.xp[i]
			dn += real(d)*real(d) + imag(d)*imag(d)
			xn += real(v)*real(v) + imag(v)*imag(v)
			p.z[i] = v + complex(beta*real(d), beta*imag(d))
			p.xp[i] = v
		}
		rep.Iterations = k
		rep.RelChange = relRatio(dn, xn)
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

// checkDenoiserSolver validates the operator and denoiser of the
// plug-and-play and RED solvers and returns the image and data lengths.
func checkDenoiserSolver(name string, op simulate.Operator, d Denoiser) (n, m int, err error) {
	if op == nil {
		return 0, 0, fmt.Errorf("priors: %s needs an encoding operator", name)
	}
	if d == nil {
		return 0, 0, fmt.Errorf("priors: %s needs a denoiser", name)
	}
	n, m = op.ImageLen(), op.DataLen()
	if n < 1 || m < 1 {
		return 0, 0, fmt.Errorf("priors: %s operator maps %d pixels to %d samples", name, n, m)
	}
	return n, m, nil
}
