package priors

import (
	"fmt"
	"math"
	"strings"

	"accelplan/priors/wavelet"
)

// Denoiser is an image denoiser used as a plug-in prior by the plug-and-play
// solvers (PnPADMM, PnPFISTA) and by regularisation by denoising (RED).
type Denoiser interface {
	// Denoise writes into dst an estimate of the clean image from src, which
	// is taken to carry white Gaussian noise of standard deviation sigma per
	// real and imaginary channel (in image intensity units). dst and src may
	// alias; σ = 0 returns src unchanged. Implementations allocate nothing.
	Denoise(dst, src []complex128, sigma float64)
}

// A denoiser or prior that keeps state between calls (a warm start, a random
// stream) has a Reset method that returns it to its freshly built state.
// PnPADMM, PnPFISTA, RED and FISTARestart call it at the start of every
// solve, so that a reconstruction never depends on what the same object did
// before.
type resetter interface{ Reset() }

func resetIfStateful(v any) {
	if r, ok := v.(resetter); ok {
		r.Reset()
	}
}

// ProxDenoiser turns a Prior into a denoiser through its proximal map:
// Denoise(dst, src, σ) = prox_{Gain·σ·R}(src), the minimiser of
// ½‖u − src‖² + Gain·σ·R(u). For the total variation this is the
// Rudin-Osher-Fatemi denoiser (Rudin LI, Osher S, Fatemi E, Physica D
// 1992;60:259-268), for wavelet L1 the soft-threshold shrinkage (Donoho DL,
// IEEE Trans Inf Theory 1995;41:613-627). The weight grows linearly with σ
// because for these priors R has the units of the image intensity, like σ.
//
// Used inside PnPADMM with penalty ρ, a ProxDenoiser makes PnP-ADMM the
// ordinary ADMM for ½‖Ex − y‖² + λR(x) with λ = ρ·Gain·σ.
type ProxDenoiser struct {
	// Prior is the regulariser whose proximal map denoises.
	Prior Prior
	// Gain is the prox weight per unit of σ (> 0).
	Gain float64
}

// TVDenoiserGain is the default Gain of NewTVDenoiser: the ROF weight
// t = 0.75·σ, the best of 0.5, 0.75, 1, 1.25, 1.5, 2 on the noisy phantom of
// the test fixture (64×80, σ = 5% of the peak; see TestDenoisersReduceError).
// It is a starting point: the plug-and-play solvers tune σ anyway.
const TVDenoiserGain = 0.75

// NewTVDenoiser returns the isotropic TV (ROF) denoiser for ny×nx images with
// boundary rule b and Gain TVDenoiserGain; the prox is priors.TV's fast
// gradient projection, warm-started from call to call (Reset clears it).
func NewTVDenoiser(ny, nx int, b Boundary) (*ProxDenoiser, error) {
	tv, err := NewTV(ny, nx, b)
	if err != nil {
		return nil, err
	}
	return &ProxDenoiser{Prior: tv, Gain: TVDenoiserGain}, nil
}

// Denoise writes prox_{Gain·σ·R}(src) into dst.
func (p *ProxDenoiser) Denoise(dst, src []complex128, sigma float64) {
	if !(sigma >= 0) || math.IsInf(sigma, 0) {
		panic(fmt.Sprintf("priors: denoising strength must be finite and ≥ 0, got %v", sigma))
	}
	if sigma == 0 {
		copy(dst, src)
		return
	}
	p.Prior.Prox(dst, src, p.Gain*sigma)
}

// Reset resets the prior if it keeps state between calls (TV keeps its dual
// variable as a warm start).
func (p *ProxDenoiser) Reset() { resetIfStateful(p.Prior) }

// WaveletDenoiserGain is the default Gain of NewWaveletDenoiser: the soft
// threshold 1·σ on the modulus of each detail coefficient, the best of 0.5,
// 0.75, 1, 1.25, 1.5 on the noisy phantom of the test fixture with and
// without cycle spinning (see TestDenoisersReduceError). The universal
// threshold σ√(2 ln n) of Donoho DL, Johnstone IM, Biometrika
// 1994;81:425-455 (4.1σ at 64×80) removes more of the phantom's small
// ellipses than noise there; the plug-and-play solvers tune σ anyway.
const WaveletDenoiserGain = 1.0

// WaveletDenoiser is soft-threshold wavelet shrinkage with threshold Gain·σ
// on the detail coefficients of an orthonormal periodic wavelet transform
// (Donoho DL, IEEE Trans Inf Theory 1995;41:613-627), optionally averaged
// over circular shifts — cycle spinning (Coifman RR, Donoho DL,
// "Translation-invariant de-noising", in Antoniadis A, Oppenheim G (eds),
// Wavelets and Statistics, Springer 1995, pp. 125-150): with spin period P it
// returns the mean over all shifts (a, b) ∈ [0, P)² of
// S₋ₐ,₋ᵦ·shrink(Sₐ,ᵦ·src), where S shifts circularly by a rows and b columns.
// Since the L-level periodic transform commutes with shifts by multiples of
// 2^L, P = 2^L already averages over every distinct shift (the fully
// translation-invariant denoiser); smaller P trade some of the gain against
// P² transforms per call.
//
// A WaveletDenoiser holds its work space: make one per goroutine. Denoise
// allocates nothing.
type WaveletDenoiser struct {
	// Gain is the threshold per unit of σ (> 0).
	Gain float64

	w         *wavelet.Transform
	spin      int
	coef, buf []complex128
	acc       []complex128
}

// NewWaveletDenoiser returns the shrinkage denoiser for ny×nx images with
// levels decomposition levels of the named Daubechies wavelet (see
// wavelet.New), Gain WaveletDenoiserGain, and spin period spin (1 for the
// plain transform, at most 2^levels).
func NewWaveletDenoiser(ny, nx, levels int, name string, spin int) (*WaveletDenoiser, error) {
	w, err := wavelet.New(ny, nx, levels, name)
	if err != nil {
		return nil, err
	}
	if spin < 1 || spin > 1<<levels {
		return nil, fmt.Errorf("priors: wavelet cycle-spinning period %d, want 1 … 2^levels = %d", spin, 1<<levels)
	}
	d := &WaveletDenoiser{Gain: WaveletDenoiserGain, w: w, spin: spin, coef: make([]complex128, w.Len())}
	if spin > 1 {
		d.buf = make([]complex128, w.Len())
		d.acc = make([]complex128, w.Len())
	}
	return d, nil
}

// Spin returns the cycle-spinning period (1 = none).
func (d *WaveletDenoiser) Spin() int { return d.spin }

// Transform returns the wavelet transform in use.
func (d *WaveletDenoiser) Transform() *wavelet.Transform { return d.w }

// Denoise writes the (cycle-spun) shrinkage of src into dst with threshold
// Gain·σ. dst and src may alias.
func (d *WaveletDenoiser) Denoise(dst, src []complex128, sigma float64) {
	n := d.w.Len()
	if len(dst) != n || len(src) != n {
		panic(fmt.Sprintf("priors: wavelet denoiser of %d pixels got %d and %d", n, len(dst), len(src)))
	}
	if !(sigma >= 0) || math.IsInf(sigma, 0) {
		panic(fmt.Sprintf("priors: denoising strength must be finite and ≥ 0, got %v", sigma))
	}
	t := d.Gain * sigma
	if sigma == 0 {
		copy(dst, src)
		return
	}
	if d.spin == 1 {
		d.shrink(dst, src, t)
		return
	}
	ny, nx := d.w.Ny(), d.w.Nx()
	clear(d.acc)
	for a := range d.spin {
		for b := range d.spin {
			circShift(d.buf, src, ny, nx, a, b)
			d.shrink(d.buf, d.buf, t)
			circShiftAdd(d.acc, d.buf, ny, nx, -a, -b)
		}
	}
	s := 1 / float64(d.spin*d.spin)
	for i, v := range d.acc {
		dst[i] = complex(s*real(v), s*imag(v))
	}
}

func (d *WaveletDenoiser) shrink(dst, src []complex128, t float64) {
	d.w.Forward(d.coef, src)
	SoftThresholdDetails(d.coef, d.w, t)
	d.w.Inverse(dst, d.coef)
}

// circShift writes src shifted circularly by a rows and b columns into dst:
// dst[(i+a) mod ny, (j+b) mod nx] = src[i, j] (numpy.roll). dst and src must
// not alias.
func circShift(dst, src []complex128, ny, nx, a, b int) {
	a, b = ((a%ny)+ny)%ny, ((b%nx)+nx)%nx
	for i := range ny {
		s := src[i*nx : (i+1)*nx]
		r := (i + a) % ny
		o := dst[r*nx : (r+1)*nx]
		copy(o[b:], s[:nx-b])
		copy(o[:b], s[nx-b:])
	}
}

// circShiftAdd adds src shifted as in circShift to dst.
func circShiftAdd(dst, src []complex128, ny, nx, a, b int) {
	a, b = ((a%ny)+ny)%ny, ((b%nx)+nx)%nx
	for i := range ny {
		s := src[i*nx : (i+1)*nx]
		r := (i + a) % ny
		o := dst[r*nx : (r+1)*nx]
		for j, v := range s[:nx-b] {
			o[b+j] += v
		}
		for j, v := range s[nx-b:] {
			o[j] += v
		}
	}
}

// DenoiserKinds lists the names NewDenoiser accepts.
func DenoiserKinds() []string { return []string{"tv", "wavelet", "wavelet-spin", "nlm"} }

// NewDenoiser returns a denoiser with its default settings by name, for the
// plan keys of the plug-and-play methods:
//
//	"tv"            ROF denoiser (NewTVDenoiser, Neumann boundary)
//	"wavelet"       db4 soft shrinkage, min(4, deepest allowed) levels
//	"wavelet-spin"  the same, cycle-spun over 4×4 shifts
//	"nlm"           non-local means, 7×7 patches in 11×11, complex mode
//
// The error of an unknown name lists the valid ones.
func NewDenoiser(kind string, ny, nx int) (Denoiser, error) {
	switch kind {
	case "tv":
		return NewTVDenoiser(ny, nx, BoundaryNeumann)
	case "wavelet", "wavelet-spin":
		levels := min(4, wavelet.MaxLevels(ny, 8), wavelet.MaxLevels(nx, 8))
		for levels > 1 && (ny%(1<<levels) != 0 || nx%(1<<levels) != 0) {
			levels--
		}
		spin := 1
		if kind == "wavelet-spin" {
			spin = min(4, 1<<max(levels, 0))
		}
		return NewWaveletDenoiser(ny, nx, levels, "db4", spin)
	case "nlm":
		return NewNLM(ny, nx, DefaultNLMOptions())
	}
	return nil, fmt.Errorf("priors: unknown denoiser %q (valid: %s)", kind, strings.Join(DenoiserKinds(), ", "))
}
