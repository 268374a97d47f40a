package odt

import (
	"fmt"
	"math"
)

// Box is the indicator of the set of real images with every pixel in
// [Lo, Hi], used as a prior: its proximal map is the projection onto the set
// (whatever the step t) and its value is 0 inside and +Inf outside. With it,
// FISTA becomes projected gradient descent with momentum on a box-constrained
// least-squares problem (Beck A, Teboulle M, SIAM J Imaging Sci
// 2009;2:183-202, where the indicator of a closed convex set is a valid
// non-smooth term). Lo = 0, Hi = +Inf is the non-negativity constraint.
// It has the method set of priors.Prior.
type Box struct {
	// Lo and Hi bound the real part of every pixel; Lo may be −Inf and Hi
	// +Inf.
	Lo, Hi float64
}

// BoxProjection returns the box [lo, hi]. It fails when lo > hi or either is
// NaN.
func BoxProjection(lo, hi float64) (Box, error) {
	if math.IsNaN(lo) || math.IsNaN(hi) || lo > hi || math.IsInf(lo, 1) || math.IsInf(hi, -1) {
		return Box{}, fmt.Errorf("odt: box [%g, %g]: need lo ≤ hi, lo < +Inf and hi > −Inf", lo, hi)
	}
	return Box{Lo: lo, Hi: hi}, nil
}

// Prox writes the projection of src onto the box into dst: the real part
// clamped to [Lo, Hi] and the imaginary part set to 0. t is ignored (the
// proximal map of an indicator is the projection for every t > 0). dst and
// src may alias.
func (b Box) Prox(dst, src []complex128, t float64) {
	for i, v := range src {
		dst[i] = complex(min(max(real(v), b.Lo), b.Hi), 0)
	}
}

// Value returns 0 when every pixel of x is real and within [Lo, Hi] and +Inf
// otherwise. A relative slack of 1e-12 of the bounds' scale absorbs rounding.
func (b Box) Value(x []complex128) float64 {
	scale := 1.0
	for _, v := range [...]float64{b.Lo, b.Hi} {
		if !math.IsInf(v, 0) {
			scale = max(scale, math.Abs(v))
		}
	}
	tol := 1e-12 * scale
	for _, v := range x {
		if math.Abs(imag(v)) > tol || real(v) < b.Lo-tol || real(v) > b.Hi+tol || math.IsNaN(real(v)) {
			return math.Inf(1)
		}
	}
	return 0
}
