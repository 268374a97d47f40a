package priors

import (
	"fmt"
	"math"
)

// NLMMode says which values of a complex image the non-local means denoiser
// compares and averages.
type NLMMode int

const (
	// NLMComplex compares patches on both the real and the imaginary part
	// (two channels, the patch distance averaged over them) and averages the
	// complex values. This is the mode for complex MR images.
	NLMComplex NLMMode = iota
	// NLMReal compares patches on the real part only (one channel) and
	// averages the complex values with those weights. On a real image it is
	// the grey-level non-local means.
	NLMReal
	// NLMMagnitude compares and averages the magnitude |x| and writes the
	// denoised magnitude with the phase of the input (a zero input pixel
	// gets the real denoised magnitude).
	NLMMagnitude
)

// String returns "complex", "real" or "magnitude".
func (m NLMMode) String() string {
	switch m {
	case NLMComplex:
		return "complex"
	case NLMReal:
		return "real"
	case NLMMagnitude:
		return "magnitude"
	}
	return fmt.Sprintf("NLMMode(%d)", int(m))
}

// ParseNLMMode returns the mode named "complex", "real" or "magnitude".
func ParseNLMMode(name string) (NLMMode, error) {
	for _, m := range []NLMMode{NLMComplex, NLMReal, NLMMagnitude} {
		if m.String() == name {
			return m, nil
		}
	}
	return 0, fmt.Errorf("priors: unknown non-local means mode %q (valid: complex, real, magnitude)", name)
}

// NLMOptions sets up a non-local means denoiser. The zero value of each field
// selects its default.
type NLMOptions struct {
	// PatchRadius f: patches are (2f+1)×(2f+1) pixels. 0 means 3 (7×7).
	PatchRadius int
	// SearchRadius s: candidates come from the (2s+1)×(2s+1) window around
	// each pixel. 0 means 5 (11×11).
	SearchRadius int
	// HFactor sets the filtering parameter h = HFactor·σ for a denoising
	// strength σ. 0 means 1.2, near the NRMSE optimum (1.2–1.4) for 7×7
	// patches on the test phantom (see the tests). For comparison,
	// scikit-image documents 0.8σ as a starting point for its fast variant,
	// whose patch distance is summed over (P−1)² pixels and divided by P²,
	// so that its h corresponds to h·P/(P−1) here (0.93σ for P = 7).
	HFactor float64
	// Mode chooses complex, real-part or magnitude comparison.
	Mode NLMMode
}

// DefaultNLMOptions returns 7×7 patches, an 11×11 search window, h = 1.2σ
// and complex comparison.
func DefaultNLMOptions() NLMOptions {
	return NLMOptions{PatchRadius: 3, SearchRadius: 5, HFactor: 1.2, Mode: NLMComplex}
}

func (o NLMOptions) withDefaults() NLMOptions {
	d := DefaultNLMOptions()
	if o.PatchRadius == 0 {
		o.PatchRadius = d.PatchRadius
	}
	if o.SearchRadius == 0 {
		o.SearchRadius = d.SearchRadius
	}
	if o.HFactor == 0 {
		o.HFactor = d.HFactor
	}
	return o
}

func (o NLMOptions) validate() error {
	switch {
	case o.PatchRadius < 0 || o.PatchRadius > 16:
		return fmt.Errorf("priors: non-local means patch radius %d, want 1 … 16 (0 for the default 3)", o.PatchRadius)
	case o.SearchRadius < 0 || o.SearchRadius > 32:
		return fmt.Errorf("priors: non-local means search radius %d, want 1 … 32 (0 for the default 5)", o.SearchRadius)
	case !(o.HFactor >= 0) || math.IsInf(o.HFactor, 0):
		return fmt.Errorf("priors: non-local means h factor %v, want a finite number > 0 (0 for the default 1.2)", o.HFactor)
	case o.Mode != NLMComplex && o.Mode != NLMReal && o.Mode != NLMMagnitude:
		return fmt.Errorf("priors: unknown non-local means mode %d (valid: complex, real, magnitude)", int(o.Mode))
	}
	return nil
}

// NLM is the non-local means denoiser of Buades A, Coll B, Morel JM, "A
// non-local algorithm for image denoising", IEEE CVPR 2005;2:60-65: every
// pixel p becomes the weighted mean of the pixels q of a search window
// around it,
//
//	NL(x)(p) = Σ_q w(p,q)·x(q) / Σ_q w(p,q),
//	w(p,q)   = exp(−max(d²(p,q) − 2σ², 0) / h²),
//
// where d²(p,q) is the mean squared difference of the (2f+1)² patches centred
// on p and q (averaged over the channels as well), σ the noise standard
// deviation per channel and h = HFactor·σ. Subtracting the expected noise
// distance 2σ² is the refinement of Buades A, Coll B, Morel JM, "Non-local
// means denoising", Image Processing On Line 2011;1:208-212; the pixel itself
// gets the weight 1 that the formula gives it.
//
// The patch distances are computed one offset at a time as box sums of the
// squared difference image with its shifted copy (the integral-image idea of
// Darbon J et al., IEEE ISBI 2008:1331-1334, here as separable running sums),
// and each offset serves both pixels of a pair since w(p,q) = w(q,p). The cost
// is then of order n·(2s+1)²/2 exponentials and a few additions per pixel
// and offset, independent of the patch size. The patches are uniform (every
// patch pixel counts the same), the image is extended by mirror reflection
// at its borders (numpy's "reflect" padding), and the result is
// deterministic.
//
// An NLM holds its work space (a padded copy of the image and three
// image-sized accumulators): make one per goroutine. Denoise allocates
// nothing.
type NLM struct {
	opt    NLMOptions
	ny, nx int
	py, px int // padded size: ny + 2R, nx + 2R with R = s + f

	pv       []complex128 // padded image (complex and real modes)
	pm       []float64    // padded magnitude (magnitude mode)
	ring     []float64    // 2f+1 rows of horizontal box sums, width nx + s
	colsum   []float64    // vertical running sum, width nx + s
	wrow     []float64    // weights of one row of centres
	diff     []float64    // squared differences of one padded row
	acc      []complex128 // weighted sums over the image (complex and real modes)
	accm     []float64    // weighted sums of the magnitude (magnitude mode)
	wsum     []float64    // sums of the weights over the image
	rowIndex []int        // reflection table for rows
	colIndex []int        // and columns
}

// NewNLM returns a non-local means denoiser for ny×nx images. Zero fields of
// opt take their defaults.
func NewNLM(ny, nx int, opt NLMOptions) (*NLM, error) {
	if ny < 1 || nx < 1 {
		return nil, fmt.Errorf("priors: non-local means image %d×%d must be at least 1×1", ny, nx)
	}
	if err := opt.validate(); err != nil {
		return nil, err
	}
	opt = opt.withDefaults()
	f, s := opt.PatchRadius, opt.SearchRadius
	R := f + s
	d := &NLM{opt: opt, ny: ny, nx: nx, py: ny + 2*R, px: nx + 2*R}
	np := d.py * d.px
	n := ny * nx
	w := nx + s
	mk := func(k int) []float64 { return make([]float64, k) }
	if opt.Mode == NLMMagnitude {
		d.pm, d.accm = mk(np), mk(n)
	} else {
		d.pv, d.acc = make([]complex128, np), make([]complex128, n)
	}
	d.ring = mk((2*f + 1) * w)
	d.colsum = mk(w)
	d.wrow = mk(w)
	d.diff = mk(d.px)
	d.wsum = mk(n)
	d.rowIndex = reflectTable(ny, R)
	d.colIndex = reflectTable(nx, R)
	return d, nil
}

// Options returns the options in use, with defaults filled in.
func (d *NLM) Options() NLMOptions { return d.opt }

// Shape returns the image grid, rows then columns.
func (d *NLM) Shape() (ny, nx int) { return d.ny, d.nx }

// reflectTable maps the padded index i ∈ [0, n+2R) to the source index of
// numpy's "reflect" padding (mirror about the edge pixel, edge not repeated),
// repeated as often as needed for small n.
func reflectTable(n, R int) []int {
	t := make([]int, n+2*R)
	for i := range t {
		k := i - R
		if n == 1 {
			t[i] = 0
			continue
		}
		p := 2 * (n - 1)
		k %= p
		if k < 0 {
			k += p
		}
		if k >= n {
			k = p - k
		}
		t[i] = k
	}
	return t
}

// Denoise writes the non-local means estimate of src into dst for noise of
// standard deviation sigma per real and imaginary channel (h = HFactor·σ).
// dst and src may alias. σ = 0 copies src. It panics when the lengths are not
// ny·nx or σ is negative or not finite (programming errors: solvers validate
// their strength first).
func (d *NLM) Denoise(dst, src []complex128, sigma float64) {
	n := d.ny * d.nx
	if len(dst) != n || len(src) != n {
		panic(fmt.Sprintf("priors: NLM of a %d×%d grid got %d and %d values", d.ny, d.nx, len(dst), len(src)))
	}
	if !(sigma >= 0) || math.IsInf(sigma, 0) {
		panic(fmt.Sprintf("priors: NLM strength must be finite and ≥ 0, got %v", sigma))
	}
	if sigma == 0 {
		copy(dst, src)
		return
	}
	d.pad(src)
	h := d.opt.HFactor * sigma
	f, s := d.opt.PatchRadius, d.opt.SearchRadius
	nch := 1.0
	if d.opt.Mode == NLMComplex {
		nch = 2
	}
	k := weightKernel{
		norm:  1 / (float64((2*f+1)*(2*f+1)) * nch),
		noise: 2 * sigma * sigma,
		invH2: 1 / (h * h),
	}
	// The zero offset: every pixel with weight 1.
	R := f + s
	for i := range d.ny {
		row := (i+R)*d.px + R
		if d.pm != nil {
			copy(d.accm[i*d.nx:(i+1)*d.nx], d.pm[row:row+d.nx])
		} else {
			copy(d.acc[i*d.nx:(i+1)*d.nx], d.pv[row:row+d.nx])
		}
	}
	for i := range d.wsum {
		d.wsum[i] = 1
	}
	// Half of the other offsets; each serves both pixels of a pair.
	for dy := 0; dy <= s; dy++ {
		dx0 := -s
		if dy == 0 {
			dx0 = 1
		}
		for dx := dx0; dx <= s; dx++ {
			d.offset(dy, dx, k)
		}
	}
	d.finish(dst, src)
}

// weightKernel holds the constants of w = exp(−max(S·norm − noise, 0)·invH2).
type weightKernel struct{ norm, noise, invH2 float64 }

// pad fills the padded channels from src.
func (d *NLM) pad(src []complex128) {
	nx := d.nx
	for pi, si := range d.rowIndex {
		row := src[si*nx : (si+1)*nx]
		o := pi * d.px
		if d.pm != nil {
			pm := d.pm[o : o+d.px]
			for pj, sj := range d.colIndex {
				c := row[sj]
				pm[pj] = math.Hypot(real(c), imag(c))
			}
			continue
		}
		pv := d.pv[o : o+d.px]
		for pj, sj := range d.colIndex {
			pv[pj] = row[sj]
		}
	}
}

// offset adds the contributions of the pixel pairs (q, q+δ), δ = (dy, dx),
// dy ≥ 0, for every centre q of which q or q+δ lies in the image.
func (d *NLM) offset(dy, dx int, k weightKernel) {
	f, s := d.opt.PatchRadius, d.opt.SearchRadius
	R := f + s
	ny, nx, px := d.ny, d.nx, d.px
	// Centres q (image coordinates): rows [−dy, ny), columns [qj0, qj0+w).
	qj0 := min(0, -dx)
	w := nx + iabs(dx)
	stride := nx + s
	P := 2*f + 1
	clear(d.colsum[:w])
	clear(d.ring)
	// Centre row qi needs box rows qi−f … qi+f; prime the ring with the
	// first 2f rows, then add one row per centre row (it takes the slot
	// of row qi−f−1, which leaves the window).
	qi0 := -dy
	for r := qi0 - f; r < qi0+f; r++ {
		d.boxRow(d.ring[((r-qi0+f)%P)*stride:][:w], r+R, qj0+R, w, dy, dx)
	}
	for qi := qi0; qi < ny; qi++ {
		r := qi + f
		d.boxRow(d.ring[((r-qi0+f)%P)*stride:][:w], r+R, qj0+R, w, dy, dx)
		// Weights of the centres of this row.
		wr := d.wrow[:w]
		for j, sum := range d.colsum[:w] {
			e := (sum*k.norm - k.noise) * k.invH2
			switch {
			case e <= 0:
				wr[j] = 1
			case e > nlmCutoff:
				wr[j] = 0
			default:
				wr[j] = math.Exp(-e)
			}
		}
		// q in the image: gather x(q+δ) into q.
		if qi >= 0 {
			pr := (qi+dy+R)*px + R + dx // padded row of q+δ at column 0
			o := qi * nx
			w0 := wr[-qj0 : -qj0+nx]
			d.gather(o, pr, w0)
		}
		// q+δ in the image: gather x(q) into q+δ.
		if ti := qi + dy; ti < ny && ti >= 0 {
			pr := (qi+R)*px + R - dx // padded row of q at the column of image column 0 − δx
			o := ti * nx
			w1 := wr[-qj0-dx : -qj0-dx+nx]
			d.gather(o, pr, w1)
		}
	}
}

// gather adds wt[j]·v(pr+j) to the accumulators of image pixel o+j.
func (d *NLM) gather(o, pr int, wt []float64) {
	nx := d.nx
	ws := d.wsum[o : o+nx]
	wt = wt[:nx]
	if d.pm != nil {
		a := d.accm[o : o+nx]
		v := d.pm[pr : pr+nx]
		for j, w := range wt {
			ws[j] += w
			a[j] += w * v[j]
		}
		return
	}
	a := d.acc[o : o+nx]
	v := d.pv[pr : pr+nx]
	for j, w := range wt {
		ws[j] += w
		c := v[j]
		a[j] += complex(w*real(c), w*imag(c))
	}
}

// boxRow writes into slot[j], j < w, the sum over the 2f+1 columns around
// padded column c0+j of the squared channel differences between padded row r
// and padded row r+dy shifted by dx, and adds to the vertical running sum the
// change from the row that held the slot before.
func (d *NLM) boxRow(slot []float64, r, c0, w, dy, dx int) {
	f := d.opt.PatchRadius
	px := d.px
	lo := c0 - f // first padded column needed
	m := w + 2*f
	diff := d.diff[:m]
	switch d.opt.Mode {
	case NLMMagnitude:
		a := d.pm[r*px+lo:][:m]
		b := d.pm[(r+dy)*px+lo+dx:][:m]
		for j := range diff {
			t := a[j] - b[j]
			diff[j] = t * t
		}
	case NLMReal:
		a := d.pv[r*px+lo:][:m]
		b := d.pv[(r+dy)*px+lo+dx:][:m]
		for j := range diff {
			t := real(a[j]) - real(b[j])
			diff[j] = t * t
		}
	default:
		a := d.pv[r*px+lo:][:m]
		b := d.pv[(r+dy)*px+lo+dx:][:m]
		for j := range diff {
			t := a[j] - b[j]
			diff[j] = real(t)*real(t) + imag(t)*imag(t)
		}
	}
	var sum float64
	for _, v := range diff[:2*f+1] {
		sum += v
	}
	cs := d.colsum[:w]
	slot = slot[:w]
	cs[0] += sum - slot[0]
	slot[0] = sum
	for j := 1; j < w; j++ {
		sum += diff[j+2*f] - diff[j-1]
		cs[j] += sum - slot[j]
		slot[j] = sum
	}
}

// finish normalises the accumulators into dst.
func (d *NLM) finish(dst, src []complex128) {
	switch d.opt.Mode {
	case NLMMagnitude:
		for i, ws := range d.wsum {
			m := d.accm[i] / ws
			c := src[i]
			a := math.Hypot(real(c), imag(c))
			if a == 0 {
				dst[i] = complex(m, 0)
				continue
			}
			s := m / a
			dst[i] = complex(s*real(c), s*imag(c))
		}
	default:
		for i, ws := range d.wsum {
			c, r := d.acc[i], 1/ws
			dst[i] = complex(r*real(c), r*imag(c))
		}
	}
}

func iabs(n int) int {
	if n < 0 {
		return -n
	}
	return n
}

// nlmCutoff is the exponent beyond which a weight is taken as zero: e⁻⁴⁰ is
// 4e-18 of the weight 1 that every pixel gives itself, below the rounding of
// the normalised sum.
const nlmCutoff = 40.0
