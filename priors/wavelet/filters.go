package wavelet

import (
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
	"strings"
)

// MaxMoments is the largest number of vanishing moments (the N of "dbN") that
// Filters builds. Up to this order the spectral factorisation below is exact
// to about 1e-14 in float64.
const MaxMoments = 10

// FilterBank holds the four taps of an orthogonal two-channel filter bank in
// the convention of the periodic transform of this package:
//
//	analysis:  a[k] = Σ_j DecLo[j]·x[(2k + L/2 − j) mod n],  d[k] likewise with DecHi,
//	synthesis: RecLo and RecHi are DecLo and DecHi reversed,
//
// where L is the filter length. This is the tap ordering of the
// "periodization" mode of the discrete wavelet transform in common use (the
// tests check it against PyWavelets). RecLo is the Daubechies scaling filter
// h_n normalised to Σ h_n = √2.
type FilterBank struct {
	Name         string    // canonical name, "db1" … "db10"
	Moments      int       // vanishing moments N; the filter length is 2N
	DecLo, DecHi []float64 // analysis (decomposition) low- and high-pass taps
	RecLo, RecHi []float64 // synthesis (reconstruction) low- and high-pass taps
}

// Len returns the number of taps of each filter.
func (f FilterBank) Len() int { return len(f.DecLo) }

// Names lists the wavelet names that Filters accepts, shortest filter first.
// "haar" is accepted too, as another name of "db1".
func Names() []string {
	out := make([]string, MaxMoments)
	for i := range out {
		out[i] = "db" + strconv.Itoa(i+1)
	}
	return out
}

// Filters returns the extremal-phase (minimum-phase) orthonormal Daubechies
// filter bank with the given name: "haar" or "db1" (2 taps) up to "db10"
// (20 taps). Names are case-insensitive.
//
// The taps are computed, not tabulated, by the construction of Daubechies I,
// "Orthonormal bases of compactly supported wavelets", Commun Pure Appl Math
// 1988;41:909-996, and Ten Lectures on Wavelets, SIAM 1992, §6.1: with
// y = sin²(ω/2), |m0(ω)|² = cos^{2N}(ω/2)·P(y) and
// P(y) = Σ_{k<N} C(N−1+k, k) yᵏ; every root y_k of P gives the pair of zeros
// z = 1 − 2y_k ± √((1 − 2y_k)² − 1) of which the one inside the unit circle is
// kept (extremal phase), so
// m0(z) ∝ ((1 + z⁻¹)/2)^N · Π_k (1 − z_k z⁻¹), normalised to m0(1) = √2.
// The resulting taps are those of Table 6.1 of the 1992 book.
func Filters(name string) (FilterBank, error) {
	n, err := parseName(name)
	if err != nil {
		return FilterBank{}, err
	}
	h, err := daubechies(n)
	if err != nil {
		return FilterBank{}, fmt.Errorf("wavelet %q: %w", name, err)
	}
	L := len(h)
	fb := FilterBank{
		Name:    "db" + strconv.Itoa(n),
		Moments: n,
		DecLo:   make([]float64, L),
		DecHi:   make([]float64, L),
		RecLo:   make([]float64, L),
		RecHi:   make([]float64, L),
	}
	copy(fb.RecLo, h)
	for i := range L {
		fb.DecLo[i] = h[L-1-i]
		// Quadrature mirror: g_n = (−1)^(n+1)·h_(L−1−n).
		s := 1.0
		if i%2 == 0 {
			s = -1
		}
		fb.DecHi[i] = s * h[i]
	}
	for i := range L {
		fb.RecHi[i] = fb.DecHi[L-1-i]
	}
	return fb, nil
}

func parseName(name string) (int, error) {
	s := strings.ToLower(strings.TrimSpace(name))
	if s == "haar" {
		return 1, nil
	}
	if !strings.HasPrefix(s, "db") {
		return 0, fmt.Errorf("unknown wavelet %q: want \"haar\" or \"db1\" … \"db%d\"", name, MaxMoments)
	}
	n, err := strconv.Atoi(s[2:])
	if err != nil || n < 1 || n > MaxMoments {
		return 0, fmt.Errorf("unknown wavelet %q: want \"haar\" or \"db1\" … \"db%d\"", name, MaxMoments)
	}
	return n, nil
}

// daubechies returns the minimum-phase scaling filter h_0 … h_{2N−1} with
// Σ h = √2 (Daubechies 1992, §6.1).
func daubechies(n int) ([]float64, error) {
	// P(y) = Σ_{k<N} C(N−1+k, k) y^k, ascending coefficients.
	p := make([]float64, n)
	for k := range n {
		p[k] = binomial(n-1+k, k)
	}
	roots, err := polyRoots(p)
	if err != nil {
		return nil, err
	}
	// Polynomial in w = z⁻¹, ascending: start with (1 + w)^N.
	poly := []complex128{1}
	for range n {
		poly = mulLinear(poly, 1)
	}
	for _, y := range roots {
		b := 1 - 2*y
		s := cmplx.Sqrt(b*b - 1)
		z := b + s
		if cmplx.Abs(z) >= 1 {
			z = b - s
		}
		// factor (1 − z·w)
		poly = mulLinear(poly, -z)
	}
	h := make([]float64, len(poly))
	var sum float64
	for i, c := range poly {
		h[i] = real(c)
		sum += h[i]
	}
	scale := math.Sqrt2 / sum
	for i := range h {
		h[i] *= scale
	}
	return h, nil
}

// mulLinear returns poly·(1 + c·w) for a polynomial in w with ascending
// coefficients.
func mulLinear(poly []complex128, c complex128) []complex128 {
	out := make([]complex128, len(poly)+1)
	for i, a := range poly {
		out[i] += a
		out[i+1] += c * a
	}
	return out
}

func binomial(n, k int) float64 {
	r := 1.0
	for i := 1; i <= k; i++ {
		r = r * float64(n-k+i) / float64(i)
	}
	return r
}

// polyRoots returns all complex roots of the real polynomial with ascending
// coefficients p, by the simultaneous (Weierstrass / Durand-Kerner)
// iteration followed by Newton polishing; see Press WH et al., Numerical
// Recipes, 3rd ed., CUP 2007, §9.5 (section from memory).
func polyRoots(p []float64) ([]complex128, error) {
	deg := len(p) - 1
	if deg < 1 {
		return nil, nil
	}
	lead := p[deg]
	a := make([]complex128, deg+1) // monic, ascending
	for i := range a {
		a[i] = complex(p[i]/lead, 0)
	}
	eval := func(z complex128) (v, dv complex128) {
		for i := deg; i >= 0; i-- {
			dv = dv*z + v
			v = v*z + a[i]
		}
		return v, dv
	}
	// Starting points on a circle whose radius bounds the roots (Cauchy).
	var rad float64
	for i := range deg {
		rad = math.Max(rad, cmplx.Abs(a[i]))
	}
	rad++
	z := make([]complex128, deg)
	for i := range z {
		z[i] = cmplx.Rect(rad, 2*math.Pi*float64(i)/float64(deg)+0.4)
	}
	converged := false
	for range 2000 {
		var maxStep float64
		for i := range z {
			v, _ := eval(z[i])
			den := complex(1, 0)
			for j := range z {
				if j != i {
					den *= z[i] - z[j]
				}
			}
			if den == 0 {
				den = complex(1e-300, 0)
			}
			step := v / den
			z[i] -= step
			maxStep = math.Max(maxStep, cmplx.Abs(step)/math.Max(1, cmplx.Abs(z[i])))
		}
		if maxStep < 1e-15 {
			converged = true
			break
		}
	}
	for i := range z {
		for range 3 {
			v, dv := eval(z[i])
			if dv == 0 {
				break
			}
			z[i] -= v / dv
		}
	}
	if !converged {
		// Accept when every root leaves a tiny residual after polishing.
		for i := range z {
			v, _ := eval(z[i])
			if cmplx.Abs(v) > 1e-9 {
				return nil, fmt.Errorf("polynomial root finding did not converge")
			}
		}
	}
	return z, nil
}
