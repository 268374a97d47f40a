package quality

import (
	"fmt"
	"math"
)

// Constants of the structural similarity index as published by Wang Z, Bovik
// AC, Sheikh HR, Simoncelli EP, "Image quality assessment: from error
// visibility to structural similarity", IEEE Trans Image Process
// 2004;13:600-612: a circular-symmetric Gaussian window of standard deviation
// 1.5 pixels on an 11×11 support, K1 = 0.01, K2 = 0.03.
const (
	SSIMK1     = 0.01
	SSIMK2     = 0.03
	SSIMSigma  = 1.5
	SSIMRadius = 5 // window half-width: 11×11 taps (scikit-image: int(3.5·σ+0.5))
)

// Average selects which pixels of an SSIM map enter the mean SSIM.
type Average int

const (
	// AverageInterior drops SSIMRadius (= (11−1)/2) pixels along every border,
	// where the window reaches past the image. This is what scikit-image 0.19
	// structural_similarity averages (crop(S, pad) in its source), so with a
	// nil roi it reproduces that function's mean. It needs images of at least
	// 11×11.
	AverageInterior Average = iota
	// AverageAll averages every pixel (of the roi, if one is given); pixels
	// near a border use the mirrored extension described at SSIMPlan.
	AverageAll
)

// SSIMPlan computes SSIM maps and means for images of one size and data range
// and holds all scratch space, so its methods allocate nothing. A plan is not
// safe for concurrent use; make one per goroutine.
//
// Method (Wang et al. 2004): local means μ, variances σ² and covariance σxy
// are Gaussian-weighted (σ = 1.5, 11×11, weights normalised to sum 1,
// population moments, i.e. no N/(N−1) factor), and
//
//	SSIM = (2μxμy + C1)(2σxy + C2) / ((μx² + μy² + C1)(σx² + σy² + C2)),
//	C1 = (K1·L)², C2 = (K2·L)², L = data range.
//
// The separable filter extends the image past its borders by half-sample
// symmetric mirroring (d c b a | a b c d | d c b a), the "reflect" mode that
// scikit-image 0.19 passes to scipy.ndimage.gaussian_filter; moments are
// formed as E[xy] − E[x]E[y] in the same order as scikit-image, so maps agree
// with it to rounding.
type SSIMPlan struct {
	ny, nx int
	c1, c2 float64
	w      [SSIMRadius + 1]float64 // w[k]: weight at offset ±k
	rowIdx []int                   // rowIdx[i+SSIMRadius]: source row of (possibly outside) row i
	colIdx []int                   // colIdx[m]: source column of padded position m
	pad    [5][]float64            // vertically filtered rows, padded by SSIMRadius each side
	hor    [5][]float64            // horizontally filtered rows
	srow   []float64               // one row of the SSIM map
}

// NewSSIMPlan makes a plan for ny×nx images whose values span dataRange (the
// L of C1 = (K1·L)²; e.g. 1 for images scaled to [0, 1]).
func NewSSIMPlan(ny, nx int, dataRange float64) (*SSIMPlan, error) {
	if ny < 1 || nx < 1 {
		return nil, fmt.Errorf("quality: SSIM image size %d×%d is not positive", ny, nx)
	}
	if !(dataRange > 0) || math.IsInf(dataRange, 1) {
		return nil, fmt.Errorf("quality: SSIM data range %v is not a positive finite number", dataRange)
	}
	const r = SSIMRadius
	p := &SSIMPlan{
		ny: ny, nx: nx,
		c1:     (SSIMK1 * dataRange) * (SSIMK1 * dataRange),
		c2:     (SSIMK2 * dataRange) * (SSIMK2 * dataRange),
		rowIdx: make([]int, ny+2*r),
		colIdx: make([]int, nx+2*r),
		srow:   make([]float64, nx),
	}
	p.w = gaussianHalf(SSIMSigma)
	for i := range p.rowIdx {
		p.rowIdx[i] = reflectIndex(i-r, ny)
	}
	for m := range p.colIdx {
		p.colIdx[m] = reflectIndex(m-r, nx)
	}
	for q := range p.pad {
		p.pad[q] = make([]float64, nx+2*r)
		p.hor[q] = make([]float64, nx)
	}
	return p, nil
}

// gaussianHalf returns the weights at offsets 0..SSIMRadius of a sampled
// Gaussian of standard deviation sigma normalised to sum 1 over −R..R, as
// scipy.ndimage's gaussian kernel: exp(−½x²/σ²)/Σ.
func gaussianHalf(sigma float64) [SSIMRadius + 1]float64 {
	var w [SSIMRadius + 1]float64
	a := -0.5 / (sigma * sigma)
	sum := 0.0
	for k := range w {
		w[k] = math.Exp(a * float64(k*k))
		if k == 0 {
			sum += w[k]
		} else {
			sum += 2 * w[k]
		}
	}
	for k := range w {
		w[k] /= sum
	}
	return w
}

// reflectIndex maps an index of the infinite half-sample symmetric extension
// of a length-n signal back to 0..n−1 (period 2n).
func reflectIndex(i, n int) int {
	p := 2 * n
	i %= p
	if i < 0 {
		i += p
	}
	if i >= n {
		i = p - 1 - i
	}
	return i
}

// Size returns the image size the plan was made for.
func (p *SSIMPlan) Size() (ny, nx int) { return p.ny, p.nx }

// Map writes the SSIM map of x against ref into dst; all three hold ny×nx
// values. The map is symmetric in x and ref and is 1 where they agree.
func (p *SSIMPlan) Map(dst, x, ref []float64) error {
	if err := p.check(x, ref); err != nil {
		return err
	}
	if err := checkImage("SSIM map", dst, p.ny, p.nx); err != nil {
		return err
	}
	for i := range p.ny {
		p.row(i, x, ref, dst[i*p.nx:(i+1)*p.nx])
	}
	return nil
}

// Mean returns the mean SSIM of x against ref over the pixels selected by roi
// (nil = all) and by avg: with AverageInterior only pixels at least
// SSIMRadius from every border count (with a nil roi this is exactly
// scikit-image's mean); with AverageAll every roi pixel counts. It is an error
// if no pixel is selected.
func (p *SSIMPlan) Mean(x, ref []float64, roi []bool, avg Average) (float64, error) {
	if err := p.check(x, ref); err != nil {
		return math.NaN(), err
	}
	if err := checkROI(roi, p.ny*p.nx); err != nil {
		return math.NaN(), err
	}
	i0, i1, j0, j1 := 0, p.ny, 0, p.nx
	switch avg {
	case AverageAll:
	case AverageInterior:
		if p.ny <= 2*SSIMRadius || p.nx <= 2*SSIMRadius {
			return math.NaN(), fmt.Errorf("quality: SSIM interior average needs images of at least %d×%d, have %d×%d",
				2*SSIMRadius+1, 2*SSIMRadius+1, p.ny, p.nx)
		}
		i0, i1, j0, j1 = SSIMRadius, p.ny-SSIMRadius, SSIMRadius, p.nx-SSIMRadius
	default:
		return math.NaN(), fmt.Errorf("quality: unknown SSIM average mode %d", int(avg))
	}
	sum := 0.0
	n := 0
	for i := i0; i < i1; i++ {
		if roi != nil && !anyTrue(roi[i*p.nx+j0:i*p.nx+j1]) {
			continue
		}
		p.row(i, x, ref, p.srow)
		for j := j0; j < j1; j++ {
			if roi == nil || roi[i*p.nx+j] {
				sum += p.srow[j]
				n++
			}
		}
	}
	if n == 0 {
		return math.NaN(), fmt.Errorf("quality: roi selects no pixel inside the SSIM averaging region")
	}
	return sum / float64(n), nil
}

func anyTrue(b []bool) bool {
	for _, v := range b {
		if v {
			return true
		}
	}
	return false
}

func (p *SSIMPlan) check(x, ref []float64) error {
	if err := checkImage("image", x, p.ny, p.nx); err != nil {
		return err
	}
	return checkImage("reference", ref, p.ny, p.nx)
}

// row computes row i of the SSIM map into out (length nx).
func (p *SSIMPlan) row(i int, x, y, out []float64) {
	const r = SSIMRadius
	nx := p.nx
	w := &p.w
	// Vertical pass for the five moments, written at offset r of the padded
	// rows; centre tap first, then the pairs from the outermost inwards.
	ux, uy := p.pad[0][r:r+nx], p.pad[1][r:r+nx]
	uxx, uyy, uxy := p.pad[2][r:r+nx], p.pad[3][r:r+nx], p.pad[4][r:r+nx]
	xc := x[i*nx : (i+1)*nx]
	yc := y[i*nx : (i+1)*nx]
	w0 := w[0]
	for j := range ux {
		a, b := xc[j], yc[j]
		ux[j] = a * w0
		uy[j] = b * w0
		uxx[j] = (a * a) * w0
		uyy[j] = (b * b) * w0
		uxy[j] = (a * b) * w0
	}
	for k := r; k >= 1; k-- {
		ra, rb := p.rowIdx[i+r-k], p.rowIdx[i+r+k]
		xa, xb := x[ra*nx:(ra+1)*nx], x[rb*nx:(rb+1)*nx]
		ya, yb := y[ra*nx:(ra+1)*nx], y[rb*nx:(rb+1)*nx]
		wk := w[k]
		xb, ya, yb = xb[:len(xa)], ya[:len(xa)], yb[:len(xa)]
		ux, uy, uxx, uyy, uxy := ux[:len(xa)], uy[:len(xa)], uxx[:len(xa)], uyy[:len(xa)], uxy[:len(xa)]
		for j, a1 := range xa {
			a2, b1, b2 := xb[j], ya[j], yb[j]
			ux[j] += (a1 + a2) * wk
			uy[j] += (b1 + b2) * wk
			uxx[j] += (a1*a1 + a2*a2) * wk
			uyy[j] += (b1*b1 + b2*b2) * wk
			uxy[j] += (a1*b1 + a2*b2) * wk
		}
	}
	// Mirror the borders of the padded rows, then the horizontal pass.
	for q := range p.pad {
		buf := p.pad[q]
		for m := 0; m < r; m++ {
			buf[m] = buf[r+p.colIdx[m]]
			buf[r+nx+m] = buf[r+p.colIdx[r+nx+m]]
		}
		h := p.hor[q][:nx]
		c := buf[r : r+nx]
		for j := range h {
			h[j] = c[j] * w0
		}
		for k := r; k >= 1; k-- {
			lo, hi := buf[r-k:r-k+nx], buf[r+k:r+k+nx]
			wk := w[k]
			hi = hi[:len(lo)]
			h := h[:len(lo)]
			for j, v := range lo {
				h[j] += (v + hi[j]) * wk
			}
		}
	}
	// Combine, in the order of scikit-image 0.19.
	mx, my, mxx, myy, mxy := p.hor[0][:nx], p.hor[1][:nx], p.hor[2][:nx], p.hor[3][:nx], p.hor[4][:nx]
	out = out[:nx]
	c1, c2 := p.c1, p.c2
	for j := range out {
		ax, ay := mx[j], my[j]
		vx := mxx[j] - ax*ax
		vy := myy[j] - ay*ay
		vxy := mxy[j] - ax*ay
		a1 := 2*ax*ay + c1
		a2 := 2*vxy + c2
		b1 := ax*ax + ay*ay + c1
		b2 := vx + vy + c2
		out[j] = (a1 * a2) / (b1 * b2)
	}
}

// SSIM returns the mean structural similarity of x against ref, ny×nx images
// with data range dataRange (see SSIMPlan for the method). With a nil roi it
// averages the interior (AverageInterior), reproducing scikit-image 0.19
// structural_similarity(x, ref, gaussian_weights=True, sigma=1.5,
// use_sample_covariance=False, data_range=dataRange). With a roi it averages
// the map over exactly the roi pixels (AverageAll): the roi is the caller's
// explicit choice of what is scored, so no border pixel of it is dropped.
// Bad input gives NaN; use SSIMPlan to learn why and to avoid allocation.
func SSIM(x, ref []float64, ny, nx int, roi []bool, dataRange float64) float64 {
	p, err := NewSSIMPlan(ny, nx, dataRange)
	if err != nil {
		return math.NaN()
	}
	avg := AverageInterior
	if roi != nil {
		avg = AverageAll
	}
	v, err := p.Mean(x, ref, roi, avg)
	if err != nil {
		return math.NaN()
	}
	return v
}

// SSIMMap returns the ny×nx SSIM map of x against ref (see SSIMPlan), or nil
// for bad input.
func SSIMMap(x, ref []float64, ny, nx int, dataRange float64) []float64 {
	p, err := NewSSIMPlan(ny, nx, dataRange)
	if err != nil {
		return nil
	}
	dst := make([]float64, ny*nx)
	if p.Map(dst, x, ref) != nil {
		return nil
	}
	return dst
}
