package wavelet

import "math"

// Shrink writes W^H soft_thr(W src) into dst: the wavelet shrinkage that is
// the proximal map of thr·Σ|c| over the detail coefficients c of W src
// (Donoho DL, "De-noising by soft-thresholding", IEEE Trans Inf Theory
// 1995;41:613-627), the coarse approximation left as it is. The result equals
// Forward, SoftThreshold on every detail band, then Inverse, to rounding; on
// the lifting path it skips the subband scalings, whose effect it folds into
// one threshold per band. dst and src may be the same slice; thr must be ≥ 0.
func (t *Transform) Shrink(dst, src []complex128, thr float64) {
	t.check(dst, src)
	if t.lift == nil {
		t.Forward(dst, src)
		for _, b := range t.bands {
			if b.Kind == Approx {
				continue
			}
			for r := b.Row0; r < b.Row0+b.Rows; r++ {
				SoftThreshold(dst[r*t.nx+b.Col0:r*t.nx+b.Col0+b.Cols], thr)
			}
		}
		t.Inverse(dst, dst)
		return
	}
	t.liftAnalyseShrink(floats(src), 2*t.nx, thr)
	t.liftSynthesise()
	t.copyImage(dst)
}

// SoftThreshold applies the complex soft threshold c ← c·max(0, 1 − thr/|c|)
// to every element of x in place (Donoho 1995), so that the modulus shrinks
// by thr and the phase is kept.
func SoftThreshold(x []complex128, thr float64) {
	t2 := thr * thr
	for i, c := range x {
		re, im := real(c), imag(c)
		m2 := re*re + im*im
		if m2 <= t2 {
			x[i] = 0
			continue
		}
		s := 1 - thr/math.Sqrt(m2)
		x[i] = complex(s*re, s*im)
	}
}
