package priors

import (
	"fmt"
	"math"

	"accelplan/priors/wavelet"
)

// WaveletL1 is the sparsity prior R(x) = Σ_i |(W x)_i| over the detail
// coefficients of an orthonormal 2D wavelet transform W (package wavelet);
// the coarse approximation is not penalised. For complex images |·| is the
// complex modulus, so real and imaginary parts shrink together.
//
// Because W is orthonormal, the proximal map is exact and costs one forward
// and one inverse transform (fused in wavelet.Transform.Shrink): prox_{tR}(v) = W^H soft_t(W v), with the complex
// soft threshold soft_t(c) = c·max(0, 1 − t/|c|) (Donoho DL, "De-noising by
// soft-thresholding", IEEE Trans Inf Theory 1995;41:613-627; for the prox of
// a norm composed with an orthogonal map see Combettes PL, Wajs VR, Multiscale
// Model Simul 2005;4:1168-1200, and Parikh N, Boyd S, Found Trends Optim
// 2014;1:127-239, §6.5, section from memory).
//
// A WaveletL1 holds scratch space: it is not safe for concurrent use; make one
// per goroutine with Clone. Prox and Value allocate nothing.
type WaveletL1 struct {
	w    *wavelet.Transform
	coef []complex128
}

// NewWaveletL1 returns the prior for ny×nx images, levels decomposition
// levels and the named Daubechies wavelet ("haar", "db1" … "db10"); see
// wavelet.New for the size rules.
func NewWaveletL1(ny, nx, levels int, name string) (*WaveletL1, error) {
	w, err := wavelet.New(ny, nx, levels, name)
	if err != nil {
		return nil, err
	}
	return &WaveletL1{w: w, coef: make([]complex128, w.Len())}, nil
}

// Clone returns an independent copy with its own scratch space.
func (p *WaveletL1) Clone() *WaveletL1 {
	return &WaveletL1{w: p.w.Clone(), coef: make([]complex128, len(p.coef))}
}

// Transform returns the wavelet transform in use (shared; see
// wavelet.Transform for its concurrency rules).
func (p *WaveletL1) Transform() *wavelet.Transform { return p.w }

// Prox writes W^H soft_t(W src) into dst, thresholding the detail
// coefficients only. dst and src may alias. It panics if t is negative or
// the lengths differ from ny·nx (programming errors).
func (p *WaveletL1) Prox(dst, src []complex128, t float64) {
	if t < 0 || math.IsNaN(t) {
		panic(fmt.Sprintf("priors: WaveletL1.Prox with threshold %g", t))
	}
	p.w.Shrink(dst, src, t)
}

// Value returns Σ |(W x)_i| over the detail coefficients.
func (p *WaveletL1) Value(x []complex128) float64 {
	p.w.Forward(p.coef, x)
	nx := p.w.Nx()
	ar, ac := p.w.ApproxSize()
	var s float64
	for r := range p.w.Ny() {
		row := p.coef[r*nx : (r+1)*nx]
		if r < ar {
			row = row[ac:]
		}
		for _, c := range row {
			s += math.Sqrt(real(c)*real(c) + imag(c)*imag(c))
		}
	}
	return s
}

// SoftThresholdDetails applies the complex soft threshold
// c ← c·max(0, 1 − t/|c|) in place to every coefficient of the Mallat array
// coef of transform w except those of the coarse approximation block.
func SoftThresholdDetails(coef []complex128, w *wavelet.Transform, t float64) {
	nx := w.Nx()
	ar, ac := w.ApproxSize()
	for r := range w.Ny() {
		row := coef[r*nx : (r+1)*nx]
		if r < ar {
			row = row[ac:]
		}
		softThreshold(row, t)
	}
}

// softThreshold applies c ← c·max(0, 1 − t/|c|) to every element.
func softThreshold(x []complex128, t float64) {
	t2 := t * t
	for i, c := range x {
		re, im := real(c), imag(c)
		m2 := re*re + im*im
		if m2 <= t2 {
			x[i] = 0
			continue
		}
		s := 1 - t/math.Sqrt(m2)
		x[i] = complex(s*re, s*im)
	}
}
