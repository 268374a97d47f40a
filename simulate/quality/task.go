package quality

// Task-based quality: what an observer can still do with a reconstruction
// (see a faint disc, separate fine bars, locate an edge) rather than how far it
// is from the truth pixel by pixel.
//
// Geometry conventions (those of package simulate): pixel (i, j) of an ny×nx
// image has its centre at x = (j − nx/2)/nx, y = (i − ny/2)/ny in units of the
// field of view (FOV), x to the right and y downwards; the FOV is square, so
// both axes span FOVmm millimetres and one FOV unit is the same physical
// length in x and y. Positions below are in FOV units, sizes in millimetres,
// spatial frequencies in cycles per millimetre. Any other length unit (µm for
// a microscope) works the same way when FOVmm is given in it; results are then
// in that unit.

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// Grid says how an image is laid over the field of view.
type Grid struct {
	// Nx is the number of columns, Ny the number of rows.
	Nx, Ny int
	// FOVmm is the side of the square field of view in millimetres; the
	// pixels are FOVmm/Nx wide and FOVmm/Ny tall.
	FOVmm float64
}

// Validate reports a grid that has no pixels or no positive finite FOV.
func (g Grid) Validate() error {
	if g.Nx < 1 || g.Ny < 1 {
		return fmt.Errorf("quality: grid %d×%d (columns × rows); both must be ≥ 1", g.Nx, g.Ny)
	}
	if !(g.FOVmm > 0) || math.IsInf(g.FOVmm, 0) {
		return fmt.Errorf("quality: field of view %v mm; it must be a positive finite length", g.FOVmm)
	}
	return nil
}

// PixelMM returns the pixel width (along x) and height (along y) in mm.
func (g Grid) PixelMM() (dx, dy float64) {
	return g.FOVmm / float64(g.Nx), g.FOVmm / float64(g.Ny)
}

// Centre returns the centre of pixel (i, j) (row, column) in FOV units.
func (g Grid) Centre(i, j int) (x, y float64) {
	return float64(j-g.Nx/2) / float64(g.Nx), float64(i-g.Ny/2) / float64(g.Ny)
}

// CircleMask returns, row-major, which pixels have their centre within
// radiusMM millimetres of (x0, y0) (FOV units), boundary included. It returns
// nil for an invalid grid.
func (g Grid) CircleMask(x0, y0, radiusMM float64) []bool {
	if g.Validate() != nil {
		return nil
	}
	m := make([]bool, g.Nx*g.Ny)
	r2 := radiusMM * radiusMM
	for i := range g.Ny {
		for j := range g.Nx {
			x, y := g.Centre(i, j)
			dx, dy := (x-x0)*g.FOVmm, (y-y0)*g.FOVmm
			m[i*g.Nx+j] = dx*dx+dy*dy <= r2
		}
	}
	return m
}

// checkGridImage reports an image whose length does not match the grid or that
// holds a value that is not finite.
func checkGridImage(img []float64, g Grid) error {
	if err := g.Validate(); err != nil {
		return err
	}
	if len(img) != g.Nx*g.Ny {
		return fmt.Errorf("quality: image has %d values, want %d (%d×%d)", len(img), g.Nx*g.Ny, g.Ny, g.Nx)
	}
	for k, v := range img {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("quality: pixel %d (row %d, column %d) is %v", k, k/g.Nx, k%g.Nx, v)
		}
	}
	return nil
}

func allFinite(vs ...float64) bool {
	for _, v := range vs {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}

// ---------------------------------------------------------------------------
// Low-contrast detectability

// Disc is one low-contrast target: a filled disc on a uniform background.
type Disc struct {
	// X0, Y0 locate the centre (FOV units).
	X0, Y0 float64
	// DiameterMM is the diameter in millimetres (> 0).
	DiameterMM float64
	// Contrast is the nominal contrast that labels the target, as a fraction
	// of the background (0.02 for "2 %"); targets of one contrast row share
	// it exactly.
	Contrast float64
	// Delta is the true intensity inside minus the background intensity. Its
	// sign says which way the disc departs from the background; 0 marks a
	// null target (no disc), whose measured contrast is taken as positive.
	Delta float64
}

// DetectRule selects the figure a disc is detected by.
type DetectRule int

const (
	// RuleRose detects a disc when its Rose signal-to-noise ratio
	//
	//	SNR_Rose = CNR·√(A/a),
	//
	// A the disc area and a the pixel area, reaches the threshold; this is
	// the signal-to-noise ratio of the disc's summed excess signal against
	// white noise, which grows with the disc's size as the eye's detection
	// does. Rose A, "The sensitivity performance of the human eye on an
	// absolute scale", J Opt Soc Am 1948;38:196-208 (from memory), found
	// that a threshold k of about 5 is needed for reliable detection; that is
	// the default threshold for this rule. The √(A/a) gain assumes white
	// noise; regularised reconstructions correlate their noise, for which
	// the figure is optimistic.
	RuleRose DetectRule = iota
	// RulePixelCNR detects a disc when its contrast-to-noise ratio per pixel,
	// CNR = (mean inside − mean of the annulus)/σ, reaches the threshold,
	// which must then be given (there is no single accepted value; common
	// practice).
	RulePixelCNR
)

// String names the rule as plans and reports write it.
func (r DetectRule) String() string {
	switch r {
	case RuleRose:
		return "rose"
	case RulePixelCNR:
		return "pixel-cnr"
	}
	return fmt.Sprintf("rule(%d)", int(r))
}

// RoseThreshold is the default threshold k of RuleRose (Rose 1948, from
// memory).
const RoseThreshold = 5.0

// DetectOptions says how discs are detected.
type DetectOptions struct {
	// Rule is the detection figure; the zero value is RuleRose.
	Rule DetectRule
	// Threshold is the value the figure must reach; 0 means RoseThreshold
	// for RuleRose and is an error for RulePixelCNR.
	Threshold float64
	// Sigma is the noise standard deviation per pixel, for instance measured
	// across repeated noise draws. When 0 it is measured in NoiseROI of the
	// image itself (sample standard deviation, divisor n − 1).
	Sigma float64
	// NoiseROI marks a uniform background region free of targets (true =
	// used), needed when Sigma is 0.
	NoiseROI []bool
}

// DiscScore is what was measured on one disc.
type DiscScore struct {
	Disc Disc
	// Inside and Annulus count the pixels averaged inside the disc and in the
	// surrounding annulus.
	Inside, Annulus int
	// MeanInside and MeanAnnulus are the two averages; Contrast is their
	// difference (intensity units).
	MeanInside, MeanAnnulus, Contrast float64
	// CNR is Contrast/σ, signed so that a disc seen with its true polarity
	// has CNR > 0.
	CNR float64
	// RoseSNR is CNR·√(A/a), A the disc area and a the pixel area.
	RoseSNR float64
	// Detected says whether the rule's figure reached the threshold.
	Detected bool
}

// Detection is the outcome of DetectDiscs.
type Detection struct {
	Rule      DetectRule
	Threshold float64
	// Sigma is the noise standard deviation used; NoisePixels is how many
	// pixels it was measured on (0 when it was given).
	Sigma       float64
	NoisePixels int
	// Discs are in the order of the input.
	Discs []DiscScore
}

// Annulus geometry of DetectDiscs, in pixels (the larger of the pixel width
// and height): the annulus starts AnnulusGapPixels outside the disc's edge,
// to keep partial-volume pixels and some blur out of it, and is at least
// AnnulusMinPixels wide (and at least the disc's radius). Our choice.
const (
	AnnulusGapPixels = 2.0
	AnnulusMinPixels = 3.0
)

// annulusRadii returns the inner and outer annulus radii in mm of a disc of
// radius r mm on pixels of size p mm.
func annulusRadii(r, p float64) (inner, outer float64) {
	inner = r + AnnulusGapPixels*p
	return inner, inner + max(AnnulusMinPixels*p, r)
}

// DetectDiscs measures, for each disc, the mean inside (pixels whose centre
// lies within the disc; the one pixel holding the centre when none does) and
// in an annulus around it (see AnnulusGapPixels), their difference, the
// contrast-to-noise ratio CNR = (mean inside − mean annulus)/σ and the Rose
// signal-to-noise ratio, and decides detection by opt.Rule. This is the
// contrast-to-noise definition in common use for low-contrast detectability
// (common practice); the Rose figure follows Rose 1948 (see RuleRose).
//
// It returns an error for an image that does not fit the grid, a disc that is
// not finite or has no positive diameter, an annulus that reaches another
// disc (grid too coarse for the layout), a missing or degenerate noise
// estimate, or a bad threshold.
func DetectDiscs(img []float64, g Grid, discs []Disc, opt DetectOptions) (Detection, error) {
	if err := checkGridImage(img, g); err != nil {
		return Detection{}, err
	}
	if len(discs) == 0 {
		return Detection{}, errors.New("quality: no disc to detect")
	}
	thr := opt.Threshold
	switch opt.Rule {
	case RuleRose:
		if thr == 0 {
			thr = RoseThreshold
		}
	case RulePixelCNR:
		if thr == 0 {
			return Detection{}, errors.New("quality: the pixel-CNR rule needs a threshold (there is no default)")
		}
	default:
		return Detection{}, fmt.Errorf("quality: unknown detection rule %d", int(opt.Rule))
	}
	if !(thr > 0) || math.IsInf(thr, 0) {
		return Detection{}, fmt.Errorf("quality: detection threshold %v; it must be a positive finite number", opt.Threshold)
	}
	dx, dy := g.PixelMM()
	pix := max(dx, dy)
	for k, d := range discs {
		if !allFinite(d.X0, d.Y0, d.DiameterMM, d.Contrast, d.Delta) {
			return Detection{}, fmt.Errorf("quality: disc %d has a value that is not finite", k)
		}
		if !(d.DiameterMM > 0) {
			return Detection{}, fmt.Errorf("quality: disc %d has diameter %v mm; it must be > 0", k, d.DiameterMM)
		}
	}
	for a, da := range discs {
		_, outer := annulusRadii(da.DiameterMM/2, pix)
		for b, db := range discs {
			if a == b {
				continue
			}
			dist := math.Hypot(da.X0-db.X0, da.Y0-db.Y0) * g.FOVmm
			if dist < outer+db.DiameterMM/2 {
				return Detection{}, fmt.Errorf("quality: the background annulus of disc %d (%.3g mm) reaches disc %d (%.3g mm), %.3g mm away; on %.3g mm pixels the discs must be at least %.3g mm apart",
					a, da.DiameterMM, b, db.DiameterMM, dist, pix, outer+db.DiameterMM/2)
			}
		}
	}
	sigma, nNoise := opt.Sigma, 0
	switch {
	case sigma < 0 || math.IsNaN(sigma) || math.IsInf(sigma, 0):
		return Detection{}, fmt.Errorf("quality: noise σ %v; give a positive finite value or 0 to measure it", sigma)
	case sigma == 0:
		if len(opt.NoiseROI) != len(img) {
			return Detection{}, fmt.Errorf("quality: noise ROI has %d entries, want %d (one per pixel), to measure σ", len(opt.NoiseROI), len(img))
		}
		var s, s2 float64
		var ref float64
		first := true
		for k, in := range opt.NoiseROI {
			if !in {
				continue
			}
			if first {
				ref, first = img[k], false // shift for a stable sum of squares
			}
			v := img[k] - ref
			s += v
			s2 += v * v
			nNoise++
		}
		if nNoise < 10 {
			return Detection{}, fmt.Errorf("quality: noise ROI has %d pixels; at least 10 are needed to measure σ", nNoise)
		}
		n := float64(nNoise)
		sigma = math.Sqrt(max(0, (s2-s*s/n)/(n-1)))
		if !(sigma > 0) {
			return Detection{}, errors.New("quality: the noise ROI is perfectly flat (σ = 0); give σ measured across noise draws instead")
		}
	}
	out := Detection{Rule: opt.Rule, Threshold: thr, Sigma: sigma, NoisePixels: nNoise, Discs: make([]DiscScore, len(discs))}
	for k, d := range discs {
		sc, err := scoreDisc(img, g, d, pix)
		if err != nil {
			return Detection{}, fmt.Errorf("quality: disc %d: %w", k, err)
		}
		sign := 1.0
		if d.Delta < 0 {
			sign = -1
		}
		sc.CNR = sign * sc.Contrast / sigma
		r := d.DiameterMM / 2
		sc.RoseSNR = sc.CNR * math.Sqrt(math.Pi*r*r/(dx*dy))
		fig := sc.RoseSNR
		if opt.Rule == RulePixelCNR {
			fig = sc.CNR
		}
		sc.Detected = fig >= thr
		out.Discs[k] = sc
	}
	return out, nil
}

// scoreDisc averages the pixels inside disc d and in its annulus.
func scoreDisc(img []float64, g Grid, d Disc, pix float64) (DiscScore, error) {
	r := d.DiameterMM / 2
	inner, outer := annulusRadii(r, pix)
	sc := DiscScore{Disc: d}
	if h := g.FOVmm / 2; math.Abs(d.X0*g.FOVmm)+outer > h || math.Abs(d.Y0*g.FOVmm)+outer > h {
		return sc, fmt.Errorf("its annulus (outer radius %.3g mm) reaches past the image border", outer)
	}
	var sIn, sAnn float64
	// Pixel index bounds of the annulus' bounding box.
	fx, fy := float64(g.Nx), float64(g.Ny)
	ro := outer / g.FOVmm
	j0 := max(0, int(math.Floor((d.X0-ro)*fx+fx/2))-1)
	j1 := min(g.Nx-1, int(math.Ceil((d.X0+ro)*fx+fx/2))+1)
	i0 := max(0, int(math.Floor((d.Y0-ro)*fy+fy/2))-1)
	i1 := min(g.Ny-1, int(math.Ceil((d.Y0+ro)*fy+fy/2))+1)
	nearest, best := -1, math.Inf(1)
	for i := i0; i <= i1; i++ {
		for j := j0; j <= j1; j++ {
			x, y := g.Centre(i, j)
			dist := math.Hypot(x-d.X0, y-d.Y0) * g.FOVmm
			v := img[i*g.Nx+j]
			switch {
			case dist <= r:
				sIn += v
				sc.Inside++
			case dist >= inner && dist <= outer:
				sAnn += v
				sc.Annulus++
			}
			if dist < best {
				best, nearest = dist, i*g.Nx+j
			}
		}
	}
	if sc.Inside == 0 {
		if nearest < 0 || best > pix {
			return sc, fmt.Errorf("centre (%.4g, %.4g) lies outside the image", d.X0, d.Y0)
		}
		sIn, sc.Inside = img[nearest], 1
	}
	if sc.Annulus < 8 {
		return sc, fmt.Errorf("annulus holds %d pixels inside the image; at least 8 are needed", sc.Annulus)
	}
	sc.MeanInside = sIn / float64(sc.Inside)
	sc.MeanAnnulus = sAnn / float64(sc.Annulus)
	sc.Contrast = sc.MeanInside - sc.MeanAnnulus
	return sc, nil
}

// Contrasts returns the distinct nominal contrasts of the scored discs in the
// order they first appear.
func (d Detection) Contrasts() []float64 {
	var cs []float64
	for _, s := range d.Discs {
		found := false
		for _, c := range cs {
			if c == s.Disc.Contrast {
				found = true
				break
			}
		}
		if !found {
			cs = append(cs, s.Disc.Contrast)
		}
	}
	return cs
}

// Smallest returns the smallest diameter (mm) at the given nominal contrast
// down to which detection is unbroken: every disc of that contrast with a
// diameter at least as large is detected. Requiring the run to be unbroken
// keeps a small disc that crossed the threshold by a chance noise pattern
// from counting while a larger one is missed. ok is false when the largest
// disc of that contrast is not detected; an error says that no disc has that
// contrast.
func (d Detection) Smallest(contrast float64) (diameterMM float64, ok bool, err error) {
	var row []DiscScore
	for _, s := range d.Discs {
		if s.Disc.Contrast == contrast {
			row = append(row, s)
		}
	}
	if len(row) == 0 {
		return 0, false, fmt.Errorf("quality: no disc has contrast %v (the contrasts are %v)", contrast, d.Contrasts())
	}
	sort.SliceStable(row, func(a, b int) bool { return row[a].Disc.DiameterMM > row[b].Disc.DiameterMM })
	for k, s := range row {
		if !s.Detected {
			break
		}
		// Discs of equal diameter must all be detected before the size counts.
		if k+1 < len(row) && row[k+1].Disc.DiameterMM == s.Disc.DiameterMM {
			continue
		}
		diameterMM, ok = s.Disc.DiameterMM, true
	}
	return diameterMM, ok, nil
}

// ---------------------------------------------------------------------------
// Edge response: ESF → LSF → MTF

// Edge is a straight stretch of edge between two uniform regions, measured by
// the slanted-edge method.
type Edge struct {
	// X0, Y0 is a point on the edge line at the middle of the measured
	// stretch (FOV units).
	X0, Y0 float64
	// NormalDeg is the direction of the edge normal in degrees from +x
	// towards +y (y grows downwards). The edge response measures resolution
	// along this direction. It should lie a few degrees off the pixel axes
	// (see EdgeResponse).
	NormalDeg float64
	// HalfLengthMM is how far along the edge, on either side of (X0, Y0),
	// pixels are used; HalfWidthMM how far across it. Both in mm and > 0.
	HalfLengthMM, HalfWidthMM float64
}

// EdgeOptions tunes EdgeResponse; the zero value is the default.
type EdgeOptions struct {
	// BinsPerPixel is the oversampling of the edge-spread function: bins are
	// 1/BinsPerPixel of the pixel pitch across the edge. 0 means 4, the
	// customary choice of the slanted-edge method (common practice).
	BinsPerPixel int
}

// EdgeResult is the outcome of EdgeResponse. Positions are signed distances
// across the edge in mm, growing from the darker side to the brighter one.
type EdgeResult struct {
	// MTF50 is the spatial frequency (cycles/mm) at which the modulation
	// transfer function first falls to 0.5.
	MTF50 float64
	// Width1090 is the distance (mm) over which the normalised edge rises
	// from 10 % to 90 % of the step.
	Width1090 float64
	// Low and High are the plateau levels on the dark and bright side
	// (intensity units), measured as the mean of the edge-spread function
	// beyond half the half-width.
	Low, High float64
	// BinMM is the bin width of the edge-spread function; PixelMM the pixel
	// pitch across the edge (|cos φ|·dx + |sin φ|·dy).
	BinMM, PixelMM float64
	// Samples is the number of pixels binned.
	Samples int
	// Position, ESF and LSF sample the binned edge-spread function and its
	// derivative, the line-spread function (normalised to unit area), at
	// the bin centres.
	Position, ESF, LSF []float64
	// Freq (cycles/mm) and MTF sample the modulation transfer function from
	// 0 to 1/PixelMM (twice the pixel Nyquist frequency).
	Freq, MTF []float64
}

// EdgeResponse measures the edge-spread function (ESF) of a straight edge in
// img, differentiates it into the line-spread function (LSF) and Fourier
// transforms that into the modulation transfer function (MTF), and reports
// MTF50 and the 10–90 % edge width. This is the slanted-edge method of ISO
// 12233 (common practice); the details below are our own implementation:
//
//   - The position of the edge is taken from e (known from the phantom), not
//     fitted to the image, so noise cannot bias it.
//   - Every pixel whose centre lies within e's rectangle is binned by its
//     signed distance to the edge into bins of 1/BinsPerPixel of the pixel
//     pitch across the edge. Because the edge is slanted against the pixel
//     rows, successive rows sample different sub-pixel distances and the bins
//     fill; an edge along a pixel axis leaves bins empty and is refused.
//     Isolated empty bins are filled by linear interpolation. Because the
//     pixels of a bin need not be spread evenly over it, each bin's mean is
//     moved from the samples' mean distance to the bin centre along the
//     local slope of the ESF (a first-order correction, our addition; it
//     brings the MTF50 of a pixel-averaged ideal edge from within about 1.5 %
//     to within 0.6 % of the pixel aperture's).
//   - The plateaus are the mean ESF beyond half the half-width on either
//     side, so the half-width should be at least about six times the blur's
//     standard deviation (three standard deviations of plateau).
//   - The ESF is oriented from its lower plateau to its higher one, its LSF
//     formed by central differences and normalised to unit area, tapered by a
//     window that is flat over the central half and falls as a raised cosine
//     to zero at the ends (a Tukey window, our choice, so that an edge of
//     normal sharpness is not altered and noise in the tails is damped), and
//     transformed by a direct Fourier sum at any frequency.
//   - The MTF is divided by the two known transfer functions the measurement
//     itself introduces: sinc(f·b) of averaging within a bin of width b and
//     sinc(2f·b) of the central difference (sinc(u) = sin(πu)/(πu)).
//   - MTF50 is the first frequency, scanning up from 0 to 1/PixelMM, where
//     the MTF falls below 0.5, refined by bisection. The 10 % and 90 %
//     crossings of the normalised ESF are the ones met first when walking
//     out from the 50 % crossing nearest the edge, so ringing far from the
//     edge does not count; each is interpolated linearly between bins.
//
// Errors name bad input: an image that does not fit the grid, a non-finite
// or non-positive size, an edge without contrast, too few pixels, empty bins
// (an edge not slanted against the pixels), or an MTF that never reaches 0.5
// in the measured band.
func EdgeResponse(img []float64, g Grid, e Edge, opt EdgeOptions) (EdgeResult, error) {
	if err := checkGridImage(img, g); err != nil {
		return EdgeResult{}, err
	}
	if !allFinite(e.X0, e.Y0, e.NormalDeg, e.HalfLengthMM, e.HalfWidthMM) {
		return EdgeResult{}, errors.New("quality: edge has a value that is not finite")
	}
	if !(e.HalfLengthMM > 0) || !(e.HalfWidthMM > 0) {
		return EdgeResult{}, fmt.Errorf("quality: edge half-length %v mm and half-width %v mm must both be > 0", e.HalfLengthMM, e.HalfWidthMM)
	}
	bpp := opt.BinsPerPixel
	if bpp == 0 {
		bpp = 4
	}
	if bpp < 1 || bpp > 64 {
		return EdgeResult{}, fmt.Errorf("quality: %d bins per pixel; use 1 to 64 (0 = 4)", opt.BinsPerPixel)
	}
	dx, dy := g.PixelMM()
	sn, cs := math.Sincos(e.NormalDeg * math.Pi / 180)
	pitch := math.Abs(cs)*dx + math.Abs(sn)*dy
	b := pitch / float64(bpp)
	nb := int(math.Ceil(2 * e.HalfWidthMM / b))
	if nb < 16 {
		return EdgeResult{}, fmt.Errorf("quality: edge half-width %.3g mm spans only %d bins of %.3g mm; make it at least %.3g mm",
			e.HalfWidthMM, nb, b, 8*b)
	}
	if nb > 1<<16 {
		return EdgeResult{}, fmt.Errorf("quality: edge half-width %.3g mm needs %d bins of %.3g mm; that is too many", e.HalfWidthMM, nb, b)
	}
	h := float64(nb) * b / 2 // half-width rounded up to whole bins
	sum := make([]float64, nb)
	sumD := make([]float64, nb)
	cnt := make([]int, nb)
	// Bounding box of the measured rectangle, in pixel indices.
	px, py := e.X0*g.FOVmm, e.Y0*g.FOVmm
	ex := math.Abs(sn)*e.HalfLengthMM + math.Abs(cs)*h
	ey := math.Abs(cs)*e.HalfLengthMM + math.Abs(sn)*h
	fx, fy := float64(g.Nx), float64(g.Ny)
	j0 := max(0, int(math.Floor((px-ex)/dx+fx/2))-1)
	j1 := min(g.Nx-1, int(math.Ceil((px+ex)/dx+fx/2))+1)
	i0 := max(0, int(math.Floor((py-ey)/dy+fy/2))-1)
	i1 := min(g.Ny-1, int(math.Ceil((py+ey)/dy+fy/2))+1)
	samples := 0
	for i := i0; i <= i1; i++ {
		for j := j0; j <= j1; j++ {
			x, y := g.Centre(i, j)
			ux, uy := x*g.FOVmm-px, y*g.FOVmm-py
			d := ux*cs + uy*sn  // across, along the normal
			s := -ux*sn + uy*cs // along the edge
			if math.Abs(s) > e.HalfLengthMM || d < -h || d >= h {
				continue
			}
			k := min(nb-1, int((d+h)/b))
			sum[k] += img[i*g.Nx+j]
			sumD[k] += d
			cnt[k]++
			samples++
		}
	}
	if samples < 4*nb {
		return EdgeResult{}, fmt.Errorf("quality: only %d pixels fall in the edge rectangle for %d bins; lengthen the edge (half-length %.3g mm) or check that it lies inside the image",
			samples, nb, e.HalfLengthMM)
	}
	esf := make([]float64, nb)
	empty, run, longest := 0, 0, 0
	for k := range esf {
		if cnt[k] == 0 {
			empty++
			run++
			longest = max(longest, run)
			esf[k] = math.NaN()
			continue
		}
		run = 0
		esf[k] = sum[k] / float64(cnt[k])
	}
	if longest > 1 || empty*20 > nb || math.IsNaN(esf[0]) || math.IsNaN(esf[nb-1]) {
		return EdgeResult{}, fmt.Errorf("quality: %d of %d edge bins are empty (longest run %d); the edge must be slanted a few degrees against the pixel axes and long enough to fill the bins",
			empty, nb, longest)
	}
	for k := range esf {
		if math.IsNaN(esf[k]) {
			esf[k] = (esf[k-1] + esf[k+1]) / 2
		}
	}
	pos := make([]float64, nb)
	for k := range pos {
		pos[k] = -h + (float64(k)+0.5)*b
	}
	// The samples of a bin need not be centred in it: move each bin's mean
	// to the bin centre along the local slope of the ESF (first order).
	slope := make([]float64, nb)
	for k := range slope {
		a, z := max(0, k-1), min(nb-1, k+1)
		slope[k] = (esf[z] - esf[a]) / (float64(z-a) * b)
	}
	for k := range esf {
		if cnt[k] > 0 {
			esf[k] -= slope[k] * (sumD[k]/float64(cnt[k]) - pos[k])
		}
	}
	// Plateaus: mean of the bins beyond half the half-width on each side.
	var lo, hi float64
	var nlo, nhi int
	for k, p := range pos {
		switch {
		case p < -h/2:
			lo += esf[k]
			nlo++
		case p > h/2:
			hi += esf[k]
			nhi++
		}
	}
	lo /= float64(nlo)
	hi /= float64(nhi)
	if !(hi != lo) {
		return EdgeResult{}, errors.New("quality: the two sides of the edge have the same mean level; there is no edge to measure")
	}
	if hi < lo {
		// Orient from dark to bright: reverse the distances.
		lo, hi = hi, lo
		for a, z := 0, nb-1; a < z; a, z = a+1, z-1 {
			esf[a], esf[z] = esf[z], esf[a]
		}
	}
	step := hi - lo
	lsf := make([]float64, nb)
	for k := range lsf {
		a, z := max(0, k-1), min(nb-1, k+1)
		lsf[k] = (esf[z] - esf[a]) / (float64(z-a) * b) / step
	}
	win := make([]float64, nb)
	var area float64
	for k, p := range pos {
		w := 1.0
		if q := math.Abs(p); q > h/2 {
			w = 0.5 * (1 + math.Cos(math.Pi*(q-h/2)/(h/2)))
		}
		win[k] = w * lsf[k]
		area += win[k]
	}
	if !(area > 0) {
		return EdgeResult{}, errors.New("quality: the line-spread function has no positive area; the edge is lost in noise")
	}
	mtf := func(f float64) float64 {
		var re, im float64
		for k, w := range win {
			s, c := math.Sincos(-2 * math.Pi * f * pos[k])
			re += w * c
			im += w * s
		}
		return math.Hypot(re, im) / area / (sincPi(f*b) * sincPi(2*f*b))
	}
	fmax := 1 / pitch
	res := EdgeResult{Low: lo, High: hi, BinMM: b, PixelMM: pitch, Samples: samples, Position: pos, ESF: esf}
	res.LSF = lsf
	df := 1 / (4 * h)
	for f := 0.0; f <= fmax*(1+1e-12); f += df {
		res.Freq = append(res.Freq, f)
		res.MTF = append(res.MTF, mtf(f))
	}
	// MTF50: first fall below 0.5 on a fine scan, then bisection.
	// 512 steps up to 1/PixelMM: for half-widths up to 25 pixels each step
	// is under a tenth of the MTF's resolution 1/(2·half-width).
	const scan = 512
	f50 := math.NaN()
	prev := 0.0
	for s := 1; s <= scan; s++ {
		f := fmax * float64(s) / scan
		if mtf(f) < 0.5 {
			a, z := prev, f
			for range 60 {
				m := (a + z) / 2
				if mtf(m) < 0.5 {
					z = m
				} else {
					a = m
				}
			}
			f50 = (a + z) / 2
			break
		}
		prev = f
	}
	if math.IsNaN(f50) {
		return res, fmt.Errorf("quality: the MTF stays above 0.5 up to %.3g cycles/mm (twice the pixel Nyquist frequency); MTF50 is not measurable", fmax)
	}
	res.MTF50 = f50
	w, err := riseWidth(pos, esf, lo, step)
	if err != nil {
		return res, err
	}
	res.Width1090 = w
	return res, nil
}

// riseWidth returns the 10–90 % width of an edge-spread function oriented
// from dark to bright (see EdgeResponse).
func riseWidth(pos, esf []float64, lo, step float64) (float64, error) {
	n := len(esf)
	e := func(k int) float64 { return (esf[k] - lo) / step }
	// 50 % crossing nearest the edge (position 0).
	k50 := -1
	for k := 0; k+1 < n; k++ {
		if (e(k) < 0.5) != (e(k+1) < 0.5) {
			if k50 < 0 || math.Abs(pos[k]+pos[k+1]) < math.Abs(pos[k50]+pos[k50+1]) {
				k50 = k
			}
		}
	}
	if k50 < 0 {
		return 0, errors.New("quality: the edge-spread function never crosses 50 % of its step")
	}
	cross := func(k int, level float64) float64 { // between bins k and k+1
		t := (level - e(k)) / (e(k+1) - e(k))
		return pos[k] + t*(pos[k+1]-pos[k])
	}
	lowAt := math.NaN()
	for k := k50; k >= 0; k-- {
		if e(k) < 0.1 {
			lowAt = cross(k, 0.1)
			break
		}
	}
	highAt := math.NaN()
	for k := k50 + 1; k < n; k++ {
		if e(k) > 0.9 {
			highAt = cross(k-1, 0.9)
			break
		}
	}
	if math.IsNaN(lowAt) || math.IsNaN(highAt) {
		return 0, errors.New("quality: the edge-spread function does not reach 10 % and 90 % of its step within the measured width; widen the edge rectangle")
	}
	return highAt - lowAt, nil
}

// sincPi returns sin(πu)/(πu), 1 at u = 0.
func sincPi(u float64) float64 {
	if math.Abs(u) < 1e-4 {
		z := math.Pi * u
		return 1 - z*z/6
	}
	return math.Sin(math.Pi*u) / (math.Pi * u)
}

// ---------------------------------------------------------------------------
// Bar-group modulation

// BarGroup is a group of equal parallel bars along a pixel axis on a uniform
// background, the bars p/2 wide and p apart.
type BarGroup struct {
	// X0, Y0 locate the centre of the group (FOV units).
	X0, Y0 float64
	// PeriodMM is the bar period p (one bar and one gap) in mm; the group
	// holds 1/p line pairs per mm.
	PeriodMM float64
	// LengthMM is the length of each bar in mm.
	LengthMM float64
	// Bars is the number of bars (≥ 3).
	Bars int
	// AlongY is false when the intensity varies along x (the bars stand
	// vertically on screen) and true when it varies along y.
	AlongY bool
	// Delta is the true intensity of a bar minus that of the gaps.
	Delta float64
}

// BarScore is the outcome of BarModulation.
type BarScore struct {
	Group BarGroup
	// Resolvable is false when the period is not longer than two pixels
	// along the modulation axis, so the grid cannot represent it at all
	// (beyond the Nyquist limit); Modulation is then NaN.
	Resolvable bool
	// Modulation is the measured amplitude of the group's fundamental, in
	// phase with the true bars, divided by the fundamental of the ideal bar
	// pattern, (2/π)·Delta: 1 for a perfect image of the bars, 0 when they
	// are washed out, negative when the pattern is inverted.
	Modulation float64
	// Columns is the number of profile samples fitted.
	Columns int
}

// BarModulation measures the modulation of one bar group. The image is first
// averaged along the bars over the central 60 % of their length, giving a
// profile across them; that profile, between the centres of the first and
// last bar (an integer number of periods), is fitted by least squares with
// a + c·cos(2πu/p) + s·sin(2πu/p), u measured from the first bar's centre.
// Over a whole number of periods the cosine coefficient of a square wave of
// height Delta and 50 % duty is its Fourier coefficient (2/π)·Delta
// (Fourier series of a square wave, textbook), so Modulation = c/((2/π)·
// Delta). For a bar pattern seen through a blur it is the blur's modulation
// transfer at 1/p, as long as the harmonics at 3/p, 5/p, … are attenuated
// enough not to alias onto the fundamental on the grid. Because the phase is
// known, noise does not bias the cosine coefficient (an amplitude
// √(c² + s²) would be biased upwards).
func BarModulation(img []float64, g Grid, bg BarGroup) (BarScore, error) {
	if err := checkGridImage(img, g); err != nil {
		return BarScore{}, err
	}
	if !allFinite(bg.X0, bg.Y0, bg.PeriodMM, bg.LengthMM, bg.Delta) {
		return BarScore{}, errors.New("quality: bar group has a value that is not finite")
	}
	if !(bg.PeriodMM > 0) || !(bg.LengthMM > 0) || bg.Bars < 3 {
		return BarScore{}, fmt.Errorf("quality: bar group with period %v mm, length %v mm and %d bars; need positive sizes and at least 3 bars",
			bg.PeriodMM, bg.LengthMM, bg.Bars)
	}
	if bg.Delta == 0 {
		return BarScore{}, errors.New("quality: bar group has no true contrast (Delta = 0)")
	}
	sc := BarScore{Group: bg}
	dx, dy := g.PixelMM()
	// Along: the modulation axis; across: along the bars.
	nA, nC := g.Nx, g.Ny
	pA, pC := dx, dy
	cA, cC := bg.X0*g.FOVmm, bg.Y0*g.FOVmm
	if bg.AlongY {
		nA, nC, pA, pC, cA, cC = g.Ny, g.Nx, dy, dx, cC, cA
	}
	if bg.PeriodMM <= 2*pA {
		sc.Modulation = math.NaN()
		return sc, nil
	}
	sc.Resolvable = true
	p := bg.PeriodMM
	first := cA - float64(bg.Bars-1)*p/2 // centre of the first bar (mm)
	span := float64(bg.Bars-1) * p
	half := 0.3 * bg.LengthMM
	// Profile sample positions (mm) along the modulation axis.
	pos := func(k, n int, pitch float64) float64 { return float64(k-n/2) * pitch }
	a0 := max(0, int(math.Floor(first/pA+float64(nA/2)))-1)
	a1 := min(nA-1, int(math.Ceil((first+span)/pA+float64(nA/2)))+1)
	c0 := max(0, int(math.Floor((cC-half)/pC+float64(nC/2)))-1)
	c1 := min(nC-1, int(math.Ceil((cC+half)/pC+float64(nC/2)))+1)
	var rows []int
	for c := c0; c <= c1; c++ {
		if math.Abs(pos(c, nC, pC)-cC) <= half {
			rows = append(rows, c)
		}
	}
	if len(rows) == 0 {
		return sc, fmt.Errorf("quality: bar group at (%.4g, %.4g) has no pixel within the central part of its %.3g mm bars", bg.X0, bg.Y0, bg.LengthMM)
	}
	// Normal equations of the three-term fit.
	var G [3][3]float64
	var r [3]float64
	w := 2 * math.Pi / p
	for a := a0; a <= a1; a++ {
		u := pos(a, nA, pA) - first
		if u < -1e-9*p || u > span*(1+1e-12)+1e-9*p {
			continue
		}
		var v float64
		for _, c := range rows {
			if bg.AlongY {
				v += img[a*g.Nx+c]
			} else {
				v += img[c*g.Nx+a]
			}
		}
		v /= float64(len(rows))
		s, co := math.Sincos(w * u)
		basis := [3]float64{1, co, s}
		for m := range 3 {
			r[m] += basis[m] * v
			for n := range 3 {
				G[m][n] += basis[m] * basis[n]
			}
		}
		sc.Columns++
	}
	if sc.Columns < 5 {
		return sc, fmt.Errorf("quality: bar group at (%.4g, %.4g) is sampled by %d pixels across its bars; at least 5 are needed", bg.X0, bg.Y0, sc.Columns)
	}
	coef, ok := solve3(G, r)
	if !ok {
		// The sine basis vanishes on the samples (period too close to two
		// pixels): the in-phase fit alone is still determined.
		den := G[0][0]*G[1][1] - G[0][1]*G[1][0]
		if math.Abs(den) <= 1e-9*G[0][0]*G[1][1] {
			sc.Resolvable = false
			sc.Modulation = math.NaN()
			return sc, nil
		}
		coef[1] = (G[0][0]*r[1] - G[1][0]*r[0]) / den
	}
	sc.Modulation = coef[1] / (2 / math.Pi * bg.Delta)
	return sc, nil
}

// solve3 solves G·x = r by Cramer's rule and reports false when G is close
// to singular (its determinant below 1e-6 of the product of its diagonal).
func solve3(G [3][3]float64, r [3]float64) ([3]float64, bool) {
	det := func(m [3][3]float64) float64 {
		return m[0][0]*(m[1][1]*m[2][2]-m[1][2]*m[2][1]) -
			m[0][1]*(m[1][0]*m[2][2]-m[1][2]*m[2][0]) +
			m[0][2]*(m[1][0]*m[2][1]-m[1][1]*m[2][0])
	}
	d := det(G)
	if !(math.Abs(d) > 1e-6*G[0][0]*G[1][1]*G[2][2]) {
		return [3]float64{}, false
	}
	var x [3]float64
	for c := range 3 {
		m := G
		for k := range 3 {
			m[k][c] = r[k]
		}
		x[c] = det(m) / d
	}
	return x, true
}

// FinestResolved returns the shortest period (mm) among the resolvable
// groups of scores whose modulation reaches threshold, with all coarser
// resolvable groups of the same orientation also reaching it (an unbroken
// run from the coarsest, as in Detection.Smallest). ok is false when even the
// coarsest group falls short or none is resolvable.
func FinestResolved(scores []BarScore, alongY bool, threshold float64) (periodMM float64, ok bool) {
	var row []BarScore
	for _, s := range scores {
		if s.Group.AlongY == alongY && s.Resolvable {
			row = append(row, s)
		}
	}
	sort.SliceStable(row, func(a, b int) bool { return row[a].Group.PeriodMM > row[b].Group.PeriodMM })
	for _, s := range row {
		if !(s.Modulation >= threshold) {
			break
		}
		periodMM, ok = s.Group.PeriodMM, true
	}
	return periodMM, ok
}

// ---------------------------------------------------------------------------
// ROI statistics

// ROI is a named region of interest: Mask[k] is true for the pixels in it.
type ROI struct {
	Name string
	Mask []bool
}

// ROIStats are the statistics of one region.
type ROIStats struct {
	Name string
	// N is the number of pixels.
	N int
	// Mean and Std are the mean and the sample standard deviation (divisor
	// N − 1; 0 when N = 1) of the image over the region.
	Mean, Std float64
	// TruthMean is the mean of the truth over the region; Bias = Mean −
	// TruthMean; RMSE is the root-mean-square of image − truth there.
	TruthMean, Bias, RMSE float64
}

// ROIStatistics returns the statistics of img against truth over each ROI
// (textbook definitions; sums are formed about the region's first value so
// that a large common offset does not cost precision). It returns an error
// for images of different lengths, a mask of another length, an empty region
// or a value that is not finite.
func ROIStatistics(img, truth []float64, rois []ROI) ([]ROIStats, error) {
	if len(img) == 0 {
		return nil, errors.New("quality: empty image")
	}
	if len(truth) != len(img) {
		return nil, fmt.Errorf("quality: image has %d values but the truth %d", len(img), len(truth))
	}
	for k := range img {
		if !allFinite(img[k], truth[k]) {
			return nil, fmt.Errorf("quality: pixel %d of the image or the truth is not finite", k)
		}
	}
	if len(rois) == 0 {
		return nil, errors.New("quality: no ROI given")
	}
	out := make([]ROIStats, len(rois))
	for r, roi := range rois {
		if len(roi.Mask) != len(img) {
			return nil, fmt.Errorf("quality: ROI %q has %d entries, want %d (one per pixel)", roi.Name, len(roi.Mask), len(img))
		}
		st := ROIStats{Name: roi.Name}
		var s, s2, t, e2 float64
		ref := math.NaN()
		for k, in := range roi.Mask {
			if !in {
				continue
			}
			if math.IsNaN(ref) {
				ref = img[k]
			}
			v := img[k] - ref
			s += v
			s2 += v * v
			t += truth[k]
			d := img[k] - truth[k]
			e2 += d * d
			st.N++
		}
		if st.N == 0 {
			return nil, fmt.Errorf("quality: ROI %q is empty", roi.Name)
		}
		n := float64(st.N)
		st.Mean = ref + s/n
		if st.N > 1 {
			st.Std = math.Sqrt(max(0, (s2-s*s/n)/(n-1)))
		}
		st.TruthMean = t / n
		st.Bias = st.Mean - st.TruthMean
		st.RMSE = math.Sqrt(e2 / n)
		out[r] = st
	}
	return out, nil
}
