package nufft

import "math"

// MinWidth and MaxWidth bound the kernel width W, in oversampled grid cells.
const (
	MinWidth = 2
	MaxWidth = 8
)

// MinOversampling and MaxOversampling bound the grid oversampling factor α.
const (
	MinOversampling = 1.25
	MaxOversampling = 2.0
)

// maxDegree bounds the degree of the piecewise polynomials that replace the
// kernel; 16 reaches double precision for every admissible (W, α).
const maxDegree = 16

// KaiserBesselBeta returns the shape parameter of the Kaiser-Bessel gridding
// kernel of width w grid cells on a grid oversampled by alpha:
//
//	β = π·√((w/α)²(α−½)² − 0.8)
//
// Source: Beatty PJ, Nishimura DG, Pauly JM, IEEE TMI 2005;24:799-808
// (written down from memory; the tests confirm it against the exact NDFT by showing that it
// sits near the error minimum over β). It returns 0 when the radicand is not
// positive, which no admissible (w, alpha) produces.
func KaiserBesselBeta(w int, alpha float64) float64 {
	r := float64(w) / alpha * (alpha - 0.5)
	r = r*r - 0.8
	if r <= 0 {
		return 0
	}
	return math.Pi * math.Sqrt(r)
}

// besselI0 is the modified Bessel function of the first kind of order zero,
// I₀(z) = Σ_k (z²/4)^k / (k!)², summed until the terms no longer change the
// sum (Abramowitz M, Stegun IA, Handbook of Mathematical Functions, 1964,
// eq. 9.6.12). All terms are positive, so the series is accurate to a few
// ulps for the arguments used here (|z| ≤ 20).
func besselI0(z float64) float64 {
	q := z * z / 4
	sum, term := 1.0, 1.0
	for k := 1; k < 500; k++ {
		term *= q / float64(k*k)
		sum += term
		if term < 1e-17*sum {
			break
		}
	}
	return sum
}

// kernel is a Kaiser-Bessel kernel φ(t) = I₀(β√(1−(2t/W)²))/I₀(β) on
// |t| ≤ W/2 (t in oversampled grid cells), zero outside, together with a
// piecewise polynomial replacement used in the hot loops.
//
// For a sample at continuous grid position u, the W grid points it touches are
// g = g0 … g0+W−1 with g0 = ⌈u − W/2⌉, and their distances g − u are
// −W/2 + q + f for q = 0 … W−1 and f = g0 − (u − W/2) ∈ [0, 1). Piece q is a
// polynomial in s = 2f − 1 ∈ [−1, 1] of degree deg, with coef[d*W+q] the
// coefficient of s^d, fitted by Chebyshev interpolation.
type kernel struct {
	w     int
	alpha float64
	beta  float64
	i0b   float64 // I₀(β), the normalisation
	deg   int
	coef  []float64
	// fitErr is the largest deviation of the polynomials from φ measured on a
	// fine grid, relative to φ(0) = 1; alias is the predicted aliasing
	// amplitude of the kernel (see aliasAmplitude).
	fitErr, alias float64
}

// newKernel builds the kernel for width w, oversampling alpha and shape beta;
// all must already be validated.
func newKernel(w int, alpha, beta float64) *kernel {
	k := &kernel{w: w, alpha: alpha, beta: beta}
	k.i0b = besselI0(k.beta)
	k.alias = k.aliasAmplitude()
	// The polynomials need only be well below the gridding error itself.
	tol := max(k.alias*1e-3, 1e-14)
	for d := 2; d <= maxDegree; d++ {
		k.fit(d)
		if k.fitErr <= tol {
			break
		}
	}
	return k
}

// phi evaluates the kernel exactly at distance t (grid cells).
func (k *kernel) phi(t float64) float64 {
	r := 2 * t / float64(k.w)
	r = 1 - r*r
	if r < 0 {
		return 0
	}
	return besselI0(k.beta*math.Sqrt(r)) / k.i0b
}

// phiHat is the Fourier transform ∫ φ(t) exp(2πi t ξ) dt of the kernel, with
// ξ in cycles per grid cell:
//
//	φ̂(ξ) = W·sinh(√(β² − (πWξ)²)) / (√(β² − (πWξ)²)·I₀(β)),
//
// continued as sin(√((πWξ)² − β²))/√((πWξ)² − β²) past the zero of the
// radicand (Jackson JI et al., IEEE TMI 1991;10:473-478, table of kernels;
// from memory, confirmed in the tests by numerical quadrature and scipy).
func (k *kernel) phiHat(xi float64) float64 {
	w := float64(k.w)
	a := math.Pi * w * xi
	r := k.beta*k.beta - a*a
	var v float64
	switch {
	case r > 1e-8:
		s := math.Sqrt(r)
		v = math.Sinh(s) / s
	case r < -1e-8:
		s := math.Sqrt(-r)
		v = math.Sin(s) / s
	default: // sinh(s)/s ≈ 1 + r/6 near the zero of the radicand
		v = 1 + r/6
	}
	return w * v / k.i0b
}

// aliasAmplitude returns max over |x| ≤ ½ (FOV units) of
// √(Σ_{r≠0} φ̂(x/α + r)²) / φ̂(x/α): the amplitude of the kernel's aliased
// replicas relative to the main lobe inside the field of view, a standard
// figure of merit of gridding kernels (Beatty 2005). It predicts the order of
// magnitude of the transform's relative error.
func (k *kernel) aliasAmplitude() float64 {
	worst := 0.0
	const nx = 64
	for i := 0; i <= nx; i++ {
		xi := (float64(i)/nx - 0.5) / k.alpha
		s := 0.0
		for r := 1; r <= 200; r++ {
			a, b := k.phiHat(xi+float64(r)), k.phiHat(xi-float64(r))
			s += a*a + b*b
		}
		worst = max(worst, math.Sqrt(s)/math.Abs(k.phiHat(xi)))
	}
	return worst
}

// fit replaces each of the W unit pieces of φ by its Chebyshev interpolant of
// degree deg, written in powers of s = 2f − 1, and records the fit error.
func (k *kernel) fit(deg int) {
	w := k.w
	n := deg + 1
	k.deg = deg
	k.coef = make([]float64, n*w)
	cheb := make([]float64, n)
	vals := make([]float64, n)
	// Power-basis coefficients of T_0 … T_deg, row j holds T_j.
	tp := make([][]float64, n)
	for j := range tp {
		tp[j] = make([]float64, n)
	}
	tp[0][0] = 1
	if n > 1 {
		tp[1][1] = 1
	}
	for j := 2; j < n; j++ {
		for d := 0; d < n; d++ {
			v := -tp[j-2][d]
			if d > 0 {
				v += 2 * tp[j-1][d-1]
			}
			tp[j][d] = v
		}
	}
	for q := 0; q < w; q++ {
		for i := 0; i < n; i++ {
			s := math.Cos(math.Pi * (float64(i) + 0.5) / float64(n))
			vals[i] = k.phi(-float64(w)/2 + float64(q) + (s+1)/2)
		}
		for j := 0; j < n; j++ {
			c := 0.0
			for i := 0; i < n; i++ {
				c += vals[i] * math.Cos(math.Pi*float64(j)*(float64(i)+0.5)/float64(n))
			}
			cheb[j] = 2 * c / float64(n)
		}
		cheb[0] /= 2
		for j := 0; j < n; j++ {
			for d := 0; d < n; d++ {
				k.coef[d*w+q] += cheb[j] * tp[j][d]
			}
		}
	}
	var buf [MaxWidth]float64
	worst := 0.0
	const checks = 200
	for i := 0; i <= checks; i++ {
		f := float64(i) / checks * (1 - 1e-12)
		k.weights(f, &buf)
		for q := 0; q < w; q++ {
			worst = max(worst, math.Abs(buf[q]-k.phi(-float64(w)/2+float64(q)+f)))
		}
	}
	k.fitErr = worst
}

// weights writes φ(−W/2 + q + f) for q = 0 … W−1 into out, f ∈ [0, 1).
func (k *kernel) weights(f float64, out *[MaxWidth]float64) {
	w := k.w
	s := 2*f - 1
	c := k.coef
	top := c[k.deg*w : k.deg*w+w]
	o := out[:w]
	copy(o, top)
	for d := k.deg - 1; d >= 0; d-- {
		cd := c[d*w : d*w+w]
		for q := range o {
			o[q] = o[q]*s + cd[q]
		}
	}
}
