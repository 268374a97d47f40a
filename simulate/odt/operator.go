package odt

import (
	"fmt"
	"math"
	"math/cmplx"

	"accelplan/simulate"
	"accelplan/simulate/nufft"
)

// Operator is the first-Born encoding operator of an illumination set: it
// maps an N×N image of the Born index contrast c (rows z, columns x,
// row-major, real in the physics but complex in the interface) to the data of
// every illumination, datum k = Factor[k]·NUFFT(c)(KX[k], KZ[k]) (see NewArcs
// for the factor and package nufft for the transform). Adjoint is its exact
// adjoint. It satisfies simulate.Operator; it holds scratch space and is not
// safe for concurrent use (use Clone).
type Operator struct {
	plan   *nufft.Plan
	factor []complex128
	buf    []complex128
}

var _ simulate.Operator = (*Operator)(nil)

// NewOperator builds the operator of the arcs a on their setup's grid, with
// NUFFT options opts (the zero value: oversampling 2, kernel width 4). It
// fails when the grid is too coarse for the arcs, naming the grid needed.
func NewOperator(a *Arcs, opts nufft.Options) (*Operator, error) {
	if a == nil || a.Len() == 0 {
		return nil, fmt.Errorf("odt: illuminations = 0: must be at least 1")
	}
	s := a.Setup
	n := s.Grid
	kx, kz := a.Reach()
	if kx > float64(n)/2 || kz > float64(n)/2 {
		return nil, fmt.Errorf("odt: grid = %d over fov_um = %g is too coarse: the arcs reach %.4g cycles/FOV but the grid's band ends at %d; grid must be at least %d (pixel ≤ λ/(2(NA_ill + NA_det)) = %.4g µm)",
			n, s.FOV, math.Max(kx, kz), n/2, s.MinGrid(), s.Wavelength/(2*(s.NAIllumination+s.NADetection)))
	}
	plan, err := nufft.New(n, n, a.KX, a.KZ, opts)
	if err != nil {
		return nil, fmt.Errorf("odt: %w", err)
	}
	return &Operator{plan: plan, factor: a.Factor, buf: make([]complex128, a.Len())}, nil
}

// Clone returns an operator for the same arcs with scratch of its own, for
// use in another goroutine.
func (o *Operator) Clone() *Operator {
	return &Operator{plan: o.plan.Clone(), factor: o.factor, buf: make([]complex128, len(o.buf))}
}

// ImageLen returns N·N.
func (o *Operator) ImageLen() int { return o.plan.ImageLen() }

// DataLen returns the number of samples, illuminations × PerShot.
func (o *Operator) DataLen() int { return o.plan.DataLen() }

// Forward computes the data dst of the image src.
func (o *Operator) Forward(dst, src []complex128) {
	o.plan.Forward(dst, src)
	for k, f := range o.factor {
		dst[k] *= f
	}
}

// Adjoint computes the image dst = Eᴴ·src of the data src.
func (o *Operator) Adjoint(dst, src []complex128) {
	for k, f := range o.factor {
		o.buf[k] = cmplx.Conj(f) * src[k]
	}
	o.plan.Adjoint(dst, o.buf)
}

// BornData returns the noiseless first-Born data of specimen sp for the arcs
// a, drawn from the exact spectrum of its Born index contrast at the arc
// points (no inverse crime): datum k = Factor[k]·N·Ĉ(KX[k], KZ[k]), where Ĉ
// is the continuous Fourier transform in FOV units (simulate.Phantom) and
// N·Ĉ is what the orthonormal NUFFT of a fine image of c would approach.
func BornData(a *Arcs, sp Specimen) ([]complex128, error) {
	pot, err := sp.Potential(a.Setup.FOV)
	if err != nil {
		return nil, err
	}
	n := float64(a.Setup.Grid)
	out := make([]complex128, a.Len())
	for k := range out {
		out[k] = a.Factor[k] * complex(n, 0) * pot.Spectrum(a.KX[k], a.KZ[k])
	}
	return out, nil
}

// NoiseSigma returns the noise standard deviation per detector pixel (and so
// per datum), per real and imaginary channel, for a field SNR snr: the
// incident amplitude 1 over σ, so σ = 1/snr.
func NoiseSigma(snr float64) (float64, error) {
	if !(snr > 0) || !finite(snr) {
		return 0, fmt.Errorf("odt: field snr = %g: must be finite and > 0", snr)
	}
	return 1 / snr, nil
}
