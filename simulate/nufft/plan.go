package nufft

import (
	"fmt"
	"math"
	"slices"
	"sync/atomic"

	"accelplan/simulate/fft"
)

// Options tune a Plan. The zero value asks for the defaults.
type Options struct {
	// Oversampling is the grid oversampling factor α in [MinOversampling,
	// MaxOversampling]; 0 means 2. The oversampled grid has the smallest even
	// size with no prime factor above 5 that is at least α times the image.
	Oversampling float64
	// Width is the kernel width W in oversampled grid cells, in [MinWidth,
	// MaxWidth]; 0 means 4. With α = 2 the relative error falls about tenfold
	// per extra cell (measured against the NDFT: 6e-4 at W = 4, 8e-8 at
	// W = 8); with α = 1.25 about fourfold (7e-3 at W = 4, 2e-5 at W = 8).
	Width int
	// Workers is the number of goroutines that spread and interpolate; 0
	// means 1, because the sweep runner already runs one point per core. The
	// FFT of the grid runs on one goroutine. The result is bit-for-bit the
	// same for every worker count.
	Workers int
}

func (o Options) withDefaults() Options {
	if o.Oversampling == 0 {
		o.Oversampling = 2
	}
	if o.Width == 0 {
		o.Width = 4
	}
	if o.Workers == 0 {
		o.Workers = 1
	}
	return o
}

func (o Options) validate() error {
	if math.IsNaN(o.Oversampling) || o.Oversampling < MinOversampling || o.Oversampling > MaxOversampling {
		return fmt.Errorf("nufft: oversampling %g is outside the allowed range [%g, %g]", o.Oversampling, MinOversampling, MaxOversampling)
	}
	if o.Width < MinWidth || o.Width > MaxWidth {
		return fmt.Errorf("nufft: kernel width %d is outside the allowed range [%d, %d] grid cells", o.Width, MinWidth, MaxWidth)
	}
	if o.Workers < 1 {
		return fmt.Errorf("nufft: workers %d must be at least 1 (or 0 for the default)", o.Workers)
	}
	return nil
}

// sample is one k-space point as the hot loops see it: the first grid cell
// (ox, oy) its kernel touches and its position idx in the caller's data
// vector. wrap marks the points within W/2 cells of the band edge, whose
// kernel crosses the edge of the periodic grid. Its 2W kernel weights are
// kept apart, in Plan.weights.
type sample struct {
	ox, oy int32
	idx    int32
	wrap   bool
}

// Plan is a 2D NUFFT for one image size and one set of k-space points: a
// simulate.Operator whose Forward maps an ny×nx image to the samples and
// whose Adjoint is its exact adjoint. Build it once per trajectory and reuse
// it; a Plan holds scratch space and is not safe for concurrent use (use
// Clone for another goroutine). It keeps the oversampled grid (16 bytes per
// cell) and, per sample, 16 bytes of position plus its 2W kernel weights
// (8 bytes each), computed once when the plan is built: at 256², α = 2,
// W = 4 and 100k samples that is 4 MB of grid and 8 MB of tables.
//
// Forward is the type-2 NUFFT by gridding: deapodise and zero-pad the image
// onto a grid oversampled by α, take its DFT, and interpolate each sample from
// the W×W nearest grid values with a Kaiser-Bessel kernel. Adjoint is the
// transpose of each step in reverse (spread, inverse DFT, crop, deapodise).
// Sources: Jackson JI et al., IEEE TMI 1991;10:473-478 (gridding with
// Kaiser-Bessel kernels); Beatty PJ, Nishimura DG, Pauly JM, IEEE TMI
// 2005;24:799-808 (β for a given W and α).
type Plan struct {
	ny, nx   int
	my, mx   int
	cy, cx   int // ny/2, nx/2
	nsamples int
	opts     Options
	kern     *kernel
	dx, dy   []float64 // deapodisation, sign and scale per column / row
	samples  []sample  // sorted by (ox, oy, idx)
	// weights holds, for the i-th sorted sample, its W weights along x then
	// its W weights along y at [2W·i, 2W·(i+1)).
	weights []float64

	// Strips of grid rows for parallel spreading: strip s covers rows
	// [stripRow[s], stripRow[s+1]) and spreads the samples
	// stripList[stripStart[s]:stripStart[s+1]] (positions in samples, in
	// sorted order, so every grid cell sums its contributions in the same
	// order whatever the number of workers).
	stripRow, stripStart, stripList []int32

	// scratch, owned by this Plan
	grid    []complex128
	team    *team
	fft     *fft.Plan2D // orthonormal DFT of the oversampled grid
	next    atomic.Int64
	in, out []complex128 // the caller's slices during a call

	interpJob, spreadJob func(int)
}

// Plan has the method set of simulate.Operator (spelled out here, because
// package simulate may import this one).
var _ interface {
	Forward(dst, src []complex128)
	Adjoint(dst, src []complex128)
	ImageLen() int
	DataLen() int
} = (*Plan)(nil)

// New builds a NUFFT plan for an ny×nx image and the k-space points (kx[j],
// ky[j]) in cycles per FOV. Every point must lie in the band |kx| ≤ nx/2,
// |ky| ≤ ny/2. The slices are read, not kept.
func New(ny, nx int, kx, ky []float64, opts Options) (*Plan, error) {
	return newPlan(ny, nx, kx, ky, opts, 0)
}

// newPlan is New with the kernel shape beta given (0 means the Beatty value).
func newPlan(ny, nx int, kx, ky []float64, opts Options, beta float64) (*Plan, error) {
	opts = opts.withDefaults()
	if err := opts.validate(); err != nil {
		return nil, err
	}
	if ny < 2 || nx < 2 {
		return nil, fmt.Errorf("nufft: image %d×%d must be at least 2×2", ny, nx)
	}
	if len(kx) != len(ky) {
		return nil, fmt.Errorf("nufft: %d kx coordinates but %d ky coordinates", len(kx), len(ky))
	}
	if len(kx) == 0 {
		return nil, fmt.Errorf("nufft: the trajectory has no samples")
	}
	if len(kx) > math.MaxInt32 {
		return nil, fmt.Errorf("nufft: %d samples exceed the limit of %d", len(kx), math.MaxInt32)
	}
	hx, hy := float64(nx)/2, float64(ny)/2
	for j := range kx {
		if !(math.Abs(kx[j]) <= hx) {
			return nil, fmt.Errorf("nufft: sample %d has kx = %g cycles/FOV, outside the band |kx| ≤ %g of a %d-column image", j, kx[j], hx, nx)
		}
		if !(math.Abs(ky[j]) <= hy) {
			return nil, fmt.Errorf("nufft: sample %d has ky = %g cycles/FOV, outside the band |ky| ≤ %g of a %d-row image", j, ky[j], hy, ny)
		}
	}
	w := opts.Width
	p := &Plan{
		ny: ny, nx: nx, cy: ny / 2, cx: nx / 2,
		nsamples: len(kx),
		opts:     opts,
	}
	if beta == 0 {
		beta = KaiserBesselBeta(w, opts.Oversampling)
	}
	p.kern = newKernel(w, opts.Oversampling, beta)
	p.my = gridSize(ny, opts.Oversampling, w)
	p.mx = gridSize(nx, opts.Oversampling, w)
	p.dx = deapodisation(p.kern, nx, p.mx)
	p.dy = deapodisation(p.kern, ny, p.my)

	p.samples = make([]sample, len(kx))
	half := float64(w) / 2
	ux := func(j int) float64 { return kx[j]*float64(p.mx)/float64(nx) + float64(p.mx/2) - half }
	uy := func(j int) float64 { return ky[j]*float64(p.my)/float64(ny) + float64(p.my/2) - half }
	for j := range kx {
		s := sample{ox: int32(math.Ceil(ux(j))), oy: int32(math.Ceil(uy(j))), idx: int32(j)}
		s.wrap = s.ox < 0 || int(s.ox)+w > p.mx || s.oy < 0 || int(s.oy)+w > p.my
		p.samples[j] = s
	}
	p.samples = sortSamples(p.samples, w+1)
	p.weights = make([]float64, 2*w*len(kx))
	var buf [MaxWidth]float64
	for i, s := range p.samples {
		wt := p.weights[2*w*i : 2*w*(i+1)]
		p.kern.weights(float64(s.ox)-ux(int(s.idx)), &buf)
		copy(wt[:w], buf[:w])
		p.kern.weights(float64(s.oy)-uy(int(s.idx)), &buf)
		copy(wt[w:], buf[:w])
	}
	p.buildStrips()
	if err := p.init(nil); err != nil {
		return nil, err
	}
	return p, nil
}

// init allocates the scratch of a Plan whose read-only parts are set; proto,
// if not nil, lends its FFT tables.
func (p *Plan) init(proto *Plan) error {
	p.grid = make([]complex128, p.my*p.mx)
	p.team = newTeam(p.opts.Workers)
	if proto != nil {
		p.fft = proto.fft.Clone()
	} else {
		var err error
		if p.fft, err = fft.NewPlan2D(p.my, p.mx); err != nil {
			return fmt.Errorf("nufft: oversampled grid %d×%d: %w", p.my, p.mx, err)
		}
	}
	p.interpJob = p.interpWorker
	p.spreadJob = p.spreadWorker
	return nil
}

// Clone returns a Plan for the same image size and points that shares the
// read-only tables and has scratch of its own, for use in another goroutine.
func (p *Plan) Clone() *Plan {
	q := &Plan{
		ny: p.ny, nx: p.nx, my: p.my, mx: p.mx, cy: p.cy, cx: p.cx,
		nsamples: p.nsamples, opts: p.opts, kern: p.kern,
		dx: p.dx, dy: p.dy, samples: p.samples, weights: p.weights,
		stripRow: p.stripRow, stripStart: p.stripStart, stripList: p.stripList,
	}
	if err := q.init(p); err != nil {
		panic(err) // cannot happen: p was built with the same sizes
	}
	return q
}

// ImageLen returns ny·nx.
func (p *Plan) ImageLen() int { return p.ny * p.nx }

// DataLen returns the number of k-space samples.
func (p *Plan) DataLen() int { return p.nsamples }

// Options returns the options the plan was built with, defaults filled in.
func (p *Plan) Options() Options { return p.opts }

// GridSize returns the size my×mx of the oversampled grid.
func (p *Plan) GridSize() (my, mx int) { return p.my, p.mx }

// Beta returns the Kaiser-Bessel shape parameter in use (see
// KaiserBesselBeta).
func (p *Plan) Beta() float64 { return p.kern.beta }

// PredictedError returns the aliasing amplitude of the kernel, the ratio of
// its aliased replicas to its main lobe inside the field of view (Beatty
// 2005). It predicts the order of magnitude of the relative error of Forward
// against the exact NDFT; the tests report both side by side.
func (p *Plan) PredictedError() float64 { return p.kern.alias }

// gridSize returns the smallest even integer ≥ max(α·n, 2w) whose prime
// factors are 2, 3 and 5.
func gridSize(n int, alpha float64, w int) int {
	m := max(int(math.Ceil(alpha*float64(n)-1e-9)), 2*w)
	for ; ; m++ {
		if m%2 == 0 && smooth(m) {
			return m
		}
	}
}

func smooth(m int) bool {
	for _, f := range []int{2, 3, 5} {
		for m%f == 0 {
			m /= f
		}
	}
	return m == 1
}

// sortSamples returns the samples (given in index order) sorted by (ox, oy,
// idx), by two stable counting sorts, first on oy and then on ox. Every
// coordinate is at least −off.
func sortSamples(in []sample, off int) []sample {
	byKey := func(dst, src []sample, key func(*sample) int) {
		hi := 0
		for i := range src {
			hi = max(hi, key(&src[i])+off)
		}
		count := make([]int, hi+2)
		for i := range src {
			count[key(&src[i])+off+1]++
		}
		for k := 1; k < len(count); k++ {
			count[k] += count[k-1]
		}
		for i := range src {
			k := key(&src[i]) + off
			dst[count[k]] = src[i]
			count[k]++
		}
	}
	tmp := make([]sample, len(in))
	byKey(tmp, in, func(s *sample) int { return int(s.oy) })
	byKey(in, tmp, func(s *sample) int { return int(s.ox) })
	return in
}

// wrapIndex returns i mod m in [0, m).
func wrapIndex(i, m int) int {
	i %= m
	if i < 0 {
		i += m
	}
	return i
}

// deapodisation returns, for each of the n pixels along one axis, the factor
// that undoes the kernel's apodisation, (−1)^(l − n/2) / φ̂((l − n/2)/m), times
// (m/n)^(1/2), which turns the grid's orthonormal DFT of length m into the
// NDFT's normalisation n^(−1/2). The alternating sign moves the zero
// frequency of the grid's DFT to index m/2 (m is even).
func deapodisation(k *kernel, n, m int) []float64 {
	d := make([]float64, n)
	c := n / 2
	s := math.Sqrt(float64(m) / float64(n))
	for l := range d {
		v := s / k.phiHat(float64(l-c)/float64(m))
		if (l-c)%2 != 0 {
			v = -v
		}
		d[l] = v
	}
	return d
}

// buildStrips partitions the grid rows into strips for parallel spreading and
// lists, for each strip, the samples whose kernel touches it. With several
// workers there are about 8 strips per worker, cut so that each holds about
// the same number of samples (radial trajectories crowd the centre rows) and
// is at least W rows high; with one worker there is a single strip.
func (p *Plan) buildStrips() {
	w := p.opts.Width
	p.stripRow = []int32{0}
	if p.opts.Workers > 1 {
		perRow := make([]int, p.my)
		for i := range p.samples {
			perRow[wrapIndex(int(p.samples[i].oy)+w/2, p.my)]++
		}
		target := (len(p.samples) + 8*p.opts.Workers - 1) / (8 * p.opts.Workers)
		n, h := 0, 0
		for r, c := range perRow {
			n += c
			h++
			if n >= target && h >= w && p.my-r-1 >= w {
				p.stripRow = append(p.stripRow, int32(r+1))
				n, h = 0, 0
			}
		}
	}
	p.stripRow = append(p.stripRow, int32(p.my))
	nstrips := len(p.stripRow) - 1
	stripOf := make([]int, p.my)
	for st := range nstrips {
		for r := p.stripRow[st]; r < p.stripRow[st+1]; r++ {
			stripOf[r] = st
		}
	}
	p.stripStart = make([]int32, nstrips+1)
	// touched calls f once for each strip that sample s reaches.
	var seen [MaxWidth]int
	touched := func(s *sample, f func(strip int)) {
		n := 0
	rows:
		for q := range w {
			st := stripOf[wrapIndex(int(s.oy)+q, p.my)]
			for _, v := range seen[:n] {
				if v == st {
					continue rows
				}
			}
			seen[n] = st
			n++
			f(st)
		}
	}
	for i := range p.samples {
		touched(&p.samples[i], func(st int) { p.stripStart[st+1]++ })
	}
	for st := range nstrips {
		p.stripStart[st+1] += p.stripStart[st]
	}
	p.stripList = make([]int32, p.stripStart[nstrips])
	fill := slices.Clone(p.stripStart[:nstrips])
	for i := range p.samples {
		touched(&p.samples[i], func(st int) {
			p.stripList[fill[st]] = int32(i)
			fill[st]++
		})
	}
}

// Forward computes the samples dst = A·src of the image src (ny·nx values,
// row-major): dst[j] ≈ (nx·ny)^(−1/2) Σ src[i,l] exp(−2πi(kx_j·x_l + ky_j·y_i)).
// It panics if the lengths are not ImageLen and DataLen.
func (p *Plan) Forward(dst, src []complex128) {
	if len(src) != p.ImageLen() || len(dst) != p.DataLen() {
		panic(fmt.Sprintf("nufft: Forward with %d samples and %d pixels, want %d and %d", len(dst), len(src), p.DataLen(), p.ImageLen()))
	}
	clear(p.grid)
	mx := p.mx
	for i := range p.ny {
		row := p.grid[wrapIndex(i-p.cy, p.my)*mx:]
		line := src[i*p.nx : (i+1)*p.nx]
		dy := p.dy[i]
		// pixels l ≥ cx go to columns 0…, pixels l < cx wrap to the end.
		for l, v := range line {
			d := dy * p.dx[l]
			row[wrapIndex(l-p.cx, mx)] = complex(real(v)*d, imag(v)*d)
		}
	}
	p.fft.Forward(p.grid, p.grid)
	p.in, p.out = nil, dst
	p.team.run(p.interpJob)
	p.out = nil
}

// Adjoint computes the image dst = Aᴴ·src of the samples src (the exact
// adjoint of Forward, up to rounding). It panics if the lengths are not
// DataLen and ImageLen.
func (p *Plan) Adjoint(dst, src []complex128) {
	if len(src) != p.DataLen() || len(dst) != p.ImageLen() {
		panic(fmt.Sprintf("nufft: Adjoint with %d pixels and %d samples, want %d and %d", len(dst), len(src), p.ImageLen(), p.DataLen()))
	}
	clear(p.grid)
	p.in = src
	p.next.Store(0)
	p.team.run(p.spreadJob)
	p.in = nil
	p.fft.Inverse(p.grid, p.grid)
	mx := p.mx
	for i := range p.ny {
		row := p.grid[wrapIndex(i-p.cy, p.my)*mx:]
		line := dst[i*p.nx : (i+1)*p.nx]
		dy := p.dy[i]
		for l := range line {
			d := dy * p.dx[l]
			v := row[wrapIndex(l-p.cx, mx)]
			line[l] = complex(real(v)*d, imag(v)*d)
		}
	}
}

// interpWorker interpolates a contiguous share of the sorted samples.
func (p *Plan) interpWorker(worker int) {
	lo, hi := chunk(len(p.samples), worker, p.team.size())
	k := p.kern
	w := k.w
	mx := p.mx
	g := p.grid
	dst := p.out
	for i := lo; i < hi; i++ {
		s := &p.samples[i]
		wt := p.weights[2*w*i : 2*w*(i+1)]
		wx, wy := wt[:w], wt[w:]
		if s.wrap {
			dst[s.idx] = p.interpWrap(s, wx, wy)
			continue
		}
		var ar, ai float64
		base := int(s.oy)*mx + int(s.ox)
		for q := range w {
			row := g[base+q*mx : base+q*mx+w]
			var rr, ri float64
			for c, x := range wx {
				v := row[c]
				rr += real(v) * x
				ri += imag(v) * x
			}
			ar += rr * wy[q]
			ai += ri * wy[q]
		}
		dst[s.idx] = complex(ar, ai)
	}
}

// interpWrap interpolates a sample whose kernel crosses the grid's edge.
func (p *Plan) interpWrap(s *sample, wx, wy []float64) complex128 {
	w := p.kern.w
	var ar, ai float64
	for q := range w {
		row := p.grid[wrapIndex(int(s.oy)+q, p.my)*p.mx:]
		var rr, ri float64
		for c := range w {
			v := row[wrapIndex(int(s.ox)+c, p.mx)]
			rr += real(v) * wx[c]
			ri += imag(v) * wx[c]
		}
		ar += rr * wy[q]
		ai += ri * wy[q]
	}
	return complex(ar, ai)
}

// spreadWorker takes strips one at a time until none is left. Each strip is
// written by one worker only, and its cells sum their contributions in the
// fixed sorted order, so the grid is the same for any number of workers.
func (p *Plan) spreadWorker(int) {
	nstrips := int64(len(p.stripRow) - 1)
	for {
		st := p.next.Add(1) - 1
		if st >= nstrips {
			return
		}
		p.spreadStrip(int(st))
	}
}

func (p *Plan) spreadStrip(st int) {
	k := p.kern
	w := k.w
	mx := p.mx
	g := p.grid
	src := p.in
	r0, r1 := int(p.stripRow[st]), int(p.stripRow[st+1])
	for _, pos := range p.stripList[p.stripStart[st]:p.stripStart[st+1]] {
		s := &p.samples[pos]
		wt := p.weights[2*w*int(pos) : 2*w*int(pos+1)]
		wx, wy := wt[:w], wt[w:]
		v := src[s.idx]
		if s.wrap {
			p.spreadWrap(s, v, r0, r1, wx, wy)
			continue
		}
		oy := int(s.oy)
		q0, q1 := max(0, r0-oy), min(w, r1-oy)
		base := oy*mx + int(s.ox)
		vr, vi := real(v), imag(v)
		for q := q0; q < q1; q++ {
			ar, ai := vr*wy[q], vi*wy[q]
			row := g[base+q*mx : base+q*mx+w]
			for c, x := range wx {
				row[c] += complex(ar*x, ai*x)
			}
		}
	}
}

// spreadWrap spreads a sample whose kernel crosses the grid's edge, into the
// rows [r0, r1) only.
func (p *Plan) spreadWrap(s *sample, v complex128, r0, r1 int, wx, wy []float64) {
	w := p.kern.w
	for q := range w {
		r := wrapIndex(int(s.oy)+q, p.my)
		if r < r0 || r >= r1 {
			continue
		}
		ar, ai := real(v)*wy[q], imag(v)*wy[q]
		row := p.grid[r*p.mx:]
		for c := range w {
			row[wrapIndex(int(s.ox)+c, p.mx)] += complex(ar*wx[c], ai*wx[c])
		}
	}
}
