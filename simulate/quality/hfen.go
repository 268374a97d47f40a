package quality

import (
	"fmt"
	"math"
)

// HFEN filter constants: a 15×15 Laplacian-of-Gaussian with σ = 1.5 pixels,
// as chosen by Ravishankar S, Bresler Y, "MR image reconstruction from highly
// undersampled k-space data by dictionary learning", IEEE Trans Med Imaging
// 2011;30:1028-1041 (from memory).
const (
	HFENSigma  = 1.5
	HFENRadius = 7 // 15×15 taps
)

// HFENPlan computes the high-frequency error norm for images of one size and
// holds all scratch space, so its methods allocate nothing. It is not safe for
// concurrent use.
//
// The Laplacian-of-Gaussian kernel (Ravishankar & Bresler 2011, from memory)
// is, for integer offsets |x|, |y| ≤ 7,
//
//	h(x, y) = g(x, y)·(x² + y² − 2σ²) / (σ⁴·Σg) − mean,  g = exp(−(x²+y²)/(2σ²)),
//
// shifted by its mean so that it sums to zero (a constant image has no high
// frequencies). It is applied as three separable passes: with b = g₁/Σg₁ and
// a = b·(t² − σ²)/σ⁴ along one axis, h = a⊗b + b⊗a − mean·1⊗1. Outside the
// image the filter sees zeros (our choice: reconstructions are scored on
// objects surrounded by background, where the border rule does not matter).
type HFENPlan struct {
	ny, nx int
	a, b   [2*HFENRadius + 1]float64
	mean   float64
	diff   []float64
	fa, fb []float64 // horizontal passes with a and b
	fc     []float64 // horizontal box sums
	out    []float64
	rowBuf []float64 // zero-padded row
}

// NewHFENPlan makes a plan for ny×nx images.
func NewHFENPlan(ny, nx int) (*HFENPlan, error) {
	if ny < 1 || nx < 1 {
		return nil, fmt.Errorf("quality: HFEN image size %d×%d is not positive", ny, nx)
	}
	n := ny * nx
	p := &HFENPlan{ny: ny, nx: nx,
		diff: make([]float64, n), fa: make([]float64, n), fb: make([]float64, n),
		fc: make([]float64, n), out: make([]float64, n),
		rowBuf: make([]float64, nx+2*HFENRadius),
	}
	s2 := HFENSigma * HFENSigma
	sum := 0.0
	for k := range p.b {
		t := float64(k - HFENRadius)
		p.b[k] = math.Exp(-t * t / (2 * s2))
		sum += p.b[k]
	}
	suma := 0.0
	for k := range p.b {
		t := float64(k - HFENRadius)
		p.b[k] /= sum
		p.a[k] = p.b[k] * (t*t - s2) / (s2 * s2)
		suma += p.a[k]
	}
	// Σ(a⊗b + b⊗a) = 2·Σa·Σb with Σb = 1.
	const taps = (2*HFENRadius + 1) * (2*HFENRadius + 1)
	p.mean = 2 * suma / taps
	return p, nil
}

// Kernel returns the 15×15 LoG kernel, row-major, as the plan applies it.
func (p *HFENPlan) Kernel() []float64 {
	const w = 2*HFENRadius + 1
	k := make([]float64, w*w)
	for i := range w {
		for j := range w {
			k[i*w+j] = p.a[i]*p.b[j] + p.b[i]*p.a[j] - p.mean
		}
	}
	return k
}

// LoG writes the LoG-filtered src into dst (both ny×nx; they may be the same
// slice). The kernel is symmetric, so correlation and convolution agree.
func (p *HFENPlan) LoG(dst, src []float64) error {
	if err := checkImage("image", src, p.ny, p.nx); err != nil {
		return err
	}
	if err := checkImage("LoG output", dst, p.ny, p.nx); err != nil {
		return err
	}
	p.filter(dst, src)
	return nil
}

func (p *HFENPlan) filter(dst, src []float64) {
	const r = HFENRadius
	ny, nx := p.ny, p.nx
	buf := p.rowBuf
	for i := range ny {
		copy(buf[r:r+nx], src[i*nx:(i+1)*nx])
		fa, fb, fc := p.fa[i*nx:(i+1)*nx], p.fb[i*nx:(i+1)*nx], p.fc[i*nx:(i+1)*nx]
		for j := range fa {
			seg := buf[j : j+2*r+1]
			var sa, sb, sc float64
			for k, v := range seg {
				sa += p.a[k] * v
				sb += p.b[k] * v
				sc += v
			}
			fa[j], fb[j], fc[j] = sa, sb, sc
		}
	}
	// Vertical: out = b_y * fa + a_y * fb − mean · box_y * fc.
	for i := range ny {
		o := dst[i*nx : (i+1)*nx]
		clear(o)
		for k := -r; k <= r; k++ {
			s := i + k
			if s < 0 || s >= ny {
				continue
			}
			wa, wb := p.b[k+r], p.a[k+r]
			fa, fb, fc := p.fa[s*nx:(s+1)*nx], p.fb[s*nx:(s+1)*nx], p.fc[s*nx:(s+1)*nx]
			fb, fc = fb[:len(fa)], fc[:len(fa)]
			o := o[:len(fa)]
			m := p.mean
			for j, v := range fa {
				o[j] += wa*v + wb*fb[j] - m*fc[j]
			}
		}
	}
}

// Value returns HFEN = ‖LoG(x − ref)‖₂ / ‖LoG(ref)‖₂ with both norms taken
// over the pixels of roi (nil = all), the filtering done on the whole image.
// It is 0 for identical images and +Inf when LoG(ref) vanishes on the roi but
// the error does not.
func (p *HFENPlan) Value(x, ref []float64, roi []bool) (float64, error) {
	if err := checkImage("image", x, p.ny, p.nx); err != nil {
		return math.NaN(), err
	}
	if err := checkImage("reference", ref, p.ny, p.nx); err != nil {
		return math.NaN(), err
	}
	if err := checkROI(roi, p.ny*p.nx); err != nil {
		return math.NaN(), err
	}
	for i := range p.diff {
		p.diff[i] = x[i] - ref[i]
	}
	p.filter(p.diff, p.diff)
	p.filter(p.out, ref)
	var num, den float64
	for i, e := range p.diff {
		if roi != nil && !roi[i] {
			continue
		}
		num += e * e
		den += p.out[i] * p.out[i]
	}
	if num == 0 {
		return 0, nil
	}
	return math.Sqrt(num / den), nil
}

// HFEN returns the high-frequency error norm of x against ref, ny×nx images,
// over roi (nil = all); see HFENPlan. Bad input gives NaN.
func HFEN(x, ref []float64, ny, nx int, roi []bool) float64 {
	p, err := NewHFENPlan(ny, nx)
	if err != nil {
		return math.NaN()
	}
	v, err := p.Value(x, ref, roi)
	if err != nil {
		return math.NaN()
	}
	return v
}
