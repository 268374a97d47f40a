package simulate

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"sync"
)

// MaxCoils is the largest number of receive coils an array may have. The
// noise routines keep one value per coil on the stack, and arrays of more
// channels are usually compressed to fewer virtual coils before SENSE.
const MaxCoils = 64

// CoilArray is a set of receive coils whose complex sensitivities are short
// sums of complex exponentials sharing one set of T frequencies:
//
//	S_c(r) = Σ_t Coef[c][t] · exp(2πi (FX[t]·x + FY[t]·y)),
//
// with r = (x, y) in FOV units and the frequencies in cycles per FOV. By the
// shift theorem the spectrum of the coil-weighted object S_c·f is
//
//	Σ_t Coef[c][t] · F(kx − FX[t], ky − FY[t]),
//
// exact for an analytic phantom, because each term merely shifts the phantom's
// spectrum (Bracewell RN, The Fourier Transform and Its Applications, 3rd ed.,
// 2000, ch. 6). Multi-coil data drawn this way do not commit the inverse crime
// even though the sensitivities are smooth.
//
// A CoilArray is plain data: build one with CoilRing.Build or fill the fields
// yourself and call Validate. Its methods never modify it except Normalize.
type CoilArray struct {
	// FX, FY are the T frequencies shared by all coils, cycles per FOV.
	FX, FY []float64
	// Coef[c][t] is the weight of term t in the sensitivity of coil c.
	Coef [][]complex128
}

// Coils returns the number of coils.
func (a *CoilArray) Coils() int { return len(a.Coef) }

// Terms returns the number of exponential terms per coil.
func (a *CoilArray) Terms() int { return len(a.FX) }

// Validate reports a coil array that cannot be used: no coil, more than
// MaxCoils, no term, ragged coefficient rows or non-finite values.
func (a *CoilArray) Validate() error {
	if a == nil {
		return errors.New("simulate: no coil array")
	}
	n := len(a.Coef)
	if n < 1 || n > MaxCoils {
		return fmt.Errorf("simulate: a coil array has %d coils; allowed are 1 to %d", n, MaxCoils)
	}
	t := len(a.FX)
	if t < 1 {
		return errors.New("simulate: the coil sensitivities have no exponential term")
	}
	if len(a.FY) != t {
		return fmt.Errorf("simulate: coil array has %d x-frequencies but %d y-frequencies", t, len(a.FY))
	}
	for i := range t {
		if !finite(a.FX[i]) || !finite(a.FY[i]) {
			return fmt.Errorf("simulate: coil term %d has a non-finite frequency", i)
		}
	}
	for c, row := range a.Coef {
		if len(row) != t {
			return fmt.Errorf("simulate: coil %d has %d coefficients, want one per term (%d)", c, len(row), t)
		}
		for i, v := range row {
			if !finite(real(v)) || !finite(imag(v)) {
				return fmt.Errorf("simulate: coil %d term %d has a non-finite coefficient", c, i)
			}
		}
	}
	return nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// Sensitivity returns S_c(x, y), x and y in FOV units.
func (a *CoilArray) Sensitivity(c int, x, y float64) complex128 {
	var s complex128
	for t, w := range a.Coef[c] {
		sn, cs := math.Sincos(2 * math.Pi * (a.FX[t]*x + a.FY[t]*y))
		s += w * complex(cs, sn)
	}
	return s
}

// Maps rasterises the sensitivities on the ny-by-nx FFT-centred grid: maps[c]
// holds S_c at the pixel centres x = (j − nx/2)/nx, y = (i − ny/2)/ny,
// row-major. Reconstructing with these exact maps is common practice in
// simulation studies of parallel imaging; it leaves out the errors of
// estimating sensitivities from calibration data, so g-factors and errors
// found with them are the best the array can do.
func (a *CoilArray) Maps(ny, nx int) ([][]complex128, error) {
	if err := a.Validate(); err != nil {
		return nil, err
	}
	if ny < 1 || nx < 1 {
		return nil, fmt.Errorf("simulate: sensitivity maps of %d×%d pixels; both sizes must be ≥ 1", ny, nx)
	}
	T := a.Terms()
	ex := make([]complex128, T*nx) // exp(2πi FX[t] x_j)
	ey := make([]complex128, T*ny) // exp(2πi FY[t] y_i)
	for t := range T {
		for j := range nx {
			s, c := math.Sincos(2 * math.Pi * a.FX[t] * float64(j-nx/2) / float64(nx))
			ex[t*nx+j] = complex(c, s)
		}
		for i := range ny {
			s, c := math.Sincos(2 * math.Pi * a.FY[t] * float64(i-ny/2) / float64(ny))
			ey[t*ny+i] = complex(c, s)
		}
	}
	maps := make([][]complex128, a.Coils())
	for c, coef := range a.Coef {
		m := make([]complex128, ny*nx)
		for t, w := range coef {
			rowT := ex[t*nx : (t+1)*nx]
			for i := range ny {
				wy := w * ey[t*ny+i]
				line := m[i*nx : (i+1)*nx]
				for j, v := range rowT {
					line[j] += wy * v
				}
			}
		}
		maps[c] = m
	}
	return maps, nil
}

// rssMaps returns, per pixel, √(Σ_c |maps[c]|²), the root-sum-of-squares of
// the sensitivities.
func rssMaps(maps [][]complex128) []float64 {
	if len(maps) == 0 {
		return nil
	}
	out := make([]float64, len(maps[0]))
	for _, m := range maps {
		for i, v := range m {
			out[i] += real(v)*real(v) + imag(v)*imag(v)
		}
	}
	for i, v := range out {
		out[i] = math.Sqrt(v)
	}
	return out
}

// Normalize scales every coefficient by one real factor so that the mean of
// the root-sum-of-squares sensitivity √(Σ_c |S_c|²) over the pixel centres of
// region (on the ny-by-nx FFT-centred grid; nil means every pixel) is 1, and
// returns that factor. It does not flatten the profile: the RSS still varies
// over the region (a ring array is more sensitive near its coils), but with
// white coil noise of σ per channel the noise of the optimally combined fully
// sampled image, σ/√(Σ_c |S_c|²) (Roemer PB et al., MRM 1990;16:192-225), is
// then σ on average over the region, so a reference SNR set for a single coil
// keeps its meaning.
func (a *CoilArray) Normalize(ny, nx int, region []bool) (float64, error) {
	if region != nil && len(region) != ny*nx {
		return 0, fmt.Errorf("simulate: normalisation region has %d pixels, want %d×%d = %d", len(region), ny, nx, ny*nx)
	}
	maps, err := a.Maps(ny, nx)
	if err != nil {
		return 0, err
	}
	rss := rssMaps(maps)
	var sum float64
	var n int
	for i, v := range rss {
		if region == nil || region[i] {
			sum += v
			n++
		}
	}
	if n == 0 {
		return 0, errors.New("simulate: the normalisation region holds no pixel")
	}
	if !(sum > 0) {
		return 0, errors.New("simulate: the coils have no sensitivity in the normalisation region")
	}
	scale := float64(n) / sum
	for _, row := range a.Coef {
		for t := range row {
			row[t] *= complex(scale, 0)
		}
	}
	return scale, nil
}

// CoilRing describes an array of loop-like receive coils evenly spaced on a
// circle around the FOV centre. Coil c sits at angle θ_c = StartDeg + 360°·c/N
// and position p_c = Radius·(cos θ_c, sin θ_c) (y grows downwards, as on the
// image), with the tangent t_c = (−sin θ_c, cos θ_c) of the ring. Its
// sensitivity is a periodic bump centred on the coil,
//
//	S_c(r) = A·e^{iθ_c}·B_c(r − p_c),
//	B_c(d) = exp(z·Σ_u w_u·(cos(2π u·d/L) − 1) + iγ·(t_x·sin(2π d_x/L) + t_y·sin(2π d_y/L))),
//
// over the four lattice directions u = (1, 0), (0, 1), (1, 1), (1, −1) with
// weights w_u = 1, 1, ½, ½ (which make the magnitude isotropic to second
// order near the coil), z = Falloff + i·RadialPhase, γ = TangentialPhase and
// period L = Period FOVs, truncated to the harmonics |n|, |m| ≤ Order of its
// Fourier series. Each factor has a closed-form Fourier series:
// exp(z cos φ) = Σ_n I_n(z) e^{inφ} and exp(ix sin φ) = Σ_n J_n(x) e^{inφ}
// (the generating functions of the Bessel functions; Abramowitz M, Stegun IA,
// Handbook of Mathematical Functions, 1964, 9.6.33 and 9.1.41, equation
// numbers from memory), so the Fourier coefficients of B_c are the exact
// sums
//
//	b_nm = e^{−3z}·Σ_{j,k} I_{n−j−k}(z)·I_{m−j+k}(z)·I_j(z/2)·I_k(z/2),
//	b^c_nm = Σ_{p,q} b_{n−p, m−q}·J_p(γ t_x)·J_q(γ t_y),
//
// with every sum cut where its terms fall below 1e-17 of the leading one.
// Coil c then has Coef = A·e^{iθ_c}·b^c_nm·e^{−2πi(n p_x + m p_y)/L} at
// f = (n/L, m/L): (2·Order+1)² terms shared by all coils.
//
// |S_c| peaks at the coil and falls to e^{−4·Falloff} of its peak half a
// period away. The phase is θ_c (as in a quadrature ring), plus a part that
// grows with the distance from the coil (RadialPhase) and a gradient of about
// 2πγ/L rad per FOV along the ring's tangent at the coil (TangentialPhase).
// The diagonal directions make |B| non-separable and the tangential phase
// makes the array chiral: without them coils mirrored about a grid axis
// would see the pixels on that axis alike, and SENSE could not unfold those
// pixels beyond the number of distinct coil heights. A Period larger than the
// FOV (2 by default) keeps the bump from wrapping around: within the FOV each
// coil is seen only from its own side. The common factor A is set by Build so
// that the mean root-sum-of-squares over the disc of radius NormRadius is 1
// (see CoilArray.Normalize).
//
// The shape is a design of this package chosen to behave like a loop array
// (smooth, localised magnitude, smooth phase); it is not a field computed
// from coil windings.
type CoilRing struct {
	// Coils is the number of coils N, 1 to MaxCoils.
	Coils int
	// Radius is the distance of the coil centres from the FOV centre, FOV
	// units, in (0, Period/2].
	Radius float64
	// Falloff is the real part κ of z, in (0, 4]: larger means a faster fall
	// of the magnitude away from the coil.
	Falloff float64
	// RadialPhase is the imaginary part of z, in [−4, 4] rad.
	RadialPhase float64
	// TangentialPhase is γ, in [−4, 4].
	TangentialPhase float64
	// Period is the period L of the bumps in FOV units, in [1, 8].
	Period float64
	// Order is the largest harmonic kept per axis, 1 to 16.
	Order int
	// StartDeg is the angle of coil 0 from the +x axis towards +y, degrees.
	StartDeg float64
	// NormRadius is the radius (FOV units, in (0, ½]) of the disc over which
	// the mean root-sum-of-squares is set to 1, sampled at the pixel centres
	// of a 128×128 grid.
	NormRadius float64
}

// DefaultCoilRing returns the ring used when a plan asks only for a coil
// count: coils at radius 0.6 FOV (just outside the FOV), falloff 1, radial
// phase 0.25 rad, tangential phase 1 (a gradient of about π rad per FOV),
// period 2 FOV, harmonics up to 3 (49 terms, frequencies up to 1.5 cycles per
// FOV), coil 0 at −90° (the top of the image), normalised over the disc of
// radius 0.4 FOV. These numbers are design choices of this package; the
// tests report what they give (the spread of the root-sum-of-squares over a
// head-sized object and the g-factors of 8 coils).
func DefaultCoilRing(coils int) CoilRing {
	return CoilRing{
		Coils:           coils,
		Radius:          0.6,
		Falloff:         1,
		RadialPhase:     0.25,
		TangentialPhase: 1,
		Period:          2,
		Order:           3,
		StartDeg:        -90,
		NormRadius:      0.4,
	}
}

// Validate reports the first field out of its allowed range.
func (r CoilRing) Validate() error {
	switch {
	case r.Coils < 1 || r.Coils > MaxCoils:
		return fmt.Errorf("simulate: coils = %d is outside the allowed range 1 to %d", r.Coils, MaxCoils)
	case !finite(r.Period) || r.Period < 1 || r.Period > 8:
		return fmt.Errorf("simulate: coil period %g FOV is outside the allowed range [1, 8]", r.Period)
	case !finite(r.Radius) || !(r.Radius > 0) || r.Radius > r.Period/2:
		return fmt.Errorf("simulate: coil radius %g FOV is outside the allowed range (0, %g] (half the period)", r.Radius, r.Period/2)
	case !finite(r.Falloff) || !(r.Falloff > 0) || r.Falloff > 4:
		return fmt.Errorf("simulate: coil falloff %g is outside the allowed range (0, 4]", r.Falloff)
	case !finite(r.RadialPhase) || math.Abs(r.RadialPhase) > 4:
		return fmt.Errorf("simulate: coil radial phase %g rad is outside the allowed range [−4, 4]", r.RadialPhase)
	case !finite(r.TangentialPhase) || math.Abs(r.TangentialPhase) > 4:
		return fmt.Errorf("simulate: coil tangential phase %g is outside the allowed range [−4, 4]", r.TangentialPhase)
	case r.Order < 1 || r.Order > 16:
		return fmt.Errorf("simulate: coil order %d is outside the allowed range 1 to 16", r.Order)
	case !finite(r.StartDeg):
		return fmt.Errorf("simulate: coil start angle %g° must be finite", r.StartDeg)
	case !finite(r.NormRadius) || !(r.NormRadius > 0) || r.NormRadius > 0.5:
		return fmt.Errorf("simulate: normalisation radius %g FOV is outside the allowed range (0, 0.5]", r.NormRadius)
	}
	return nil
}

// Build returns the coil array the ring describes, normalised as documented
// on CoilRing.
func (r CoilRing) Build() (*CoilArray, error) {
	if err := r.Validate(); err != nil {
		return nil, err
	}
	K := r.Order
	w := 2*K + 1
	gamma := r.TangentialPhase
	P := besselCut(func(p int) complex128 { return complex(besselJ(p, math.Abs(gamma)), 0) })
	b, wb := bumpCoefficients(complex(r.Falloff, r.RadialPhase), K+P)
	a := &CoilArray{FX: make([]float64, w*w), FY: make([]float64, w*w), Coef: make([][]complex128, r.Coils)}
	for m := -K; m <= K; m++ {
		for n := -K; n <= K; n++ {
			t := (m+K)*w + n + K
			a.FX[t] = float64(n) / r.Period
			a.FY[t] = float64(m) / r.Period
		}
	}
	jx := make([]complex128, 2*P+1)
	jy := make([]complex128, 2*P+1)
	for c := range r.Coils {
		theta := (r.StartDeg + 360*float64(c)/float64(r.Coils)) * math.Pi / 180
		s, co := math.Sincos(theta)
		px, py := r.Radius*co, r.Radius*s
		for p := -P; p <= P; p++ {
			jx[p+P] = complex(besselJ(p, -gamma*s), 0)
			jy[p+P] = complex(besselJ(p, gamma*co), 0)
		}
		row := make([]complex128, w*w)
		for m := -K; m <= K; m++ {
			for n := -K; n <= K; n++ {
				var v complex128
				for q := -P; q <= P; q++ {
					brow := b[(m-q+K+P)*wb:]
					var u complex128
					for p := -P; p <= P; p++ {
						u += brow[n-p+K+P] * jx[p+P]
					}
					v += u * jy[q+P]
				}
				t := (m+K)*w + n + K
				ps, pc := math.Sincos(-2 * math.Pi * (a.FX[t]*px + a.FY[t]*py))
				row[t] = complex(co, s) * v * complex(pc, ps)
			}
		}
		a.Coef[c] = row
	}
	const g = 128
	disc := make([]bool, g*g)
	for i := range g {
		y := float64(i-g/2) / g
		for j := range g {
			x := float64(j-g/2) / g
			disc[i*g+j] = x*x+y*y <= r.NormRadius*r.NormRadius
		}
	}
	if _, err := a.Normalize(g, g, disc); err != nil {
		return nil, err
	}
	return a, nil
}

// besselCut returns the smallest order P ≥ 0 beyond which the Bessel
// coefficients f(p) of a generating-function series have fallen below 1e-17
// of the largest |f(p)| for p ≤ P, checked over 4 successive orders (the
// coefficients decrease monotonically once p exceeds the argument).
func besselCut(f func(p int) complex128) int {
	var peak float64
	for p := 0; p < 200; p++ {
		v := cmplx.Abs(f(p))
		peak = max(peak, v)
		if peak == 0 {
			return 0
		}
		small := true
		for q := p + 1; q <= p+4; q++ {
			if cmplx.Abs(f(q)) > 1e-17*peak {
				small = false
				break
			}
		}
		if small {
			return p
		}
	}
	return 200
}

// bumpCoefficients returns b_nm of CoilRing for |n|, |m| ≤ M, row-major with
// m the row: b[(m+M)(2M+1) + n+M], and the row length 2M+1.
func bumpCoefficients(z complex128, M int) ([]complex128, int) {
	J := besselCut(func(j int) complex128 { return besselI(j, z/2) })
	maxOrd := M + 2*J
	iz := make([]complex128, maxOrd+1) // I_n(z)
	iz2 := make([]complex128, J+1)     // I_n(z/2)
	for n := range iz {
		iz[n] = besselI(n, z)
	}
	for n := range iz2 {
		iz2[n] = besselI(n, z/2)
	}
	w := 2*M + 1
	b := make([]complex128, w*w)
	e := cmplx.Exp(-3 * z)
	for m := -M; m <= M; m++ {
		for n := -M; n <= M; n++ {
			var s complex128
			for j := -J; j <= J; j++ {
				for k := -J; k <= J; k++ {
					s += iz[abs(n-j-k)] * iz[abs(m-j+k)] * iz2[abs(j)] * iz2[abs(k)]
				}
			}
			b[(m+M)*w+n+M] = e * s
		}
	}
	return b, w
}

// besselJ returns the Bessel function of the first kind J_n(x) of integer
// order n and real argument x, as i^(−n)·I_n(ix) (Abramowitz & Stegun 1964,
// 9.6.3) with J_(−n) = (−1)^n·J_n (9.1.5).
func besselJ(n int, x float64) float64 {
	sign := 1.0
	if n < 0 {
		n = -n
		if n%2 == 1 {
			sign = -1
		}
	}
	v := besselI(n, complex(0, x))
	// i^(−n) cycles 1, −i, −1, i.
	switch n % 4 {
	case 1:
		v *= complex(0, -1)
	case 2:
		v = -v
	case 3:
		v *= complex(0, 1)
	}
	return sign * real(v)
}

func abs(n int) int {
	if n < 0 {
		return -n
	}
	return n
}

// besselI returns the modified Bessel function of the first kind I_n(z) of
// integer order n ≥ 0 and complex argument z, by its power series
// I_n(z) = Σ_k (z/2)^{2k+n} / (k!·(n+k)!) (Abramowitz & Stegun 1964, 9.6.10),
// summed until the terms stop mattering; for |z| ≤ 12 and n ≤ 16 (the range
// CoilRing allows) every term is positive in magnitude order and the sum is
// accurate to a few ulps of the largest term.
func besselI(n int, z complex128) complex128 {
	h := z / 2
	term := complex(1, 0)
	for k := 1; k <= n; k++ {
		term *= h / complex(float64(k), 0)
	}
	q := h * h
	sum := term
	for k := 1; k < 200; k++ {
		term *= q / complex(float64(k)*float64(n+k), 0)
		sum += term
		if cmplx.Abs(term) <= 1e-18*cmplx.Abs(sum) && float64(k) > cmplx.Abs(h) {
			break
		}
	}
	return sum
}

// Samples returns the noiseless multi-coil data of phantom p at the k-space
// points (kx[j], ky[j]) in cycles per FOV, for an ny-by-nx reconstruction
// grid: out[c·m + j] = √(nx·ny)·Σ_t Coef[c][t]·F(k_j − f_t), coil-major with m
// = len(kx) samples per coil. The factor √(nx·ny) matches the orthonormal DFT
// (see CartesianSample) and the NUFFT of package nufft, so the data fit the
// SENSE operators of this package. The points may lie anywhere. The phantom's
// spectrum is evaluated T times per point; for Ellipses the phase factors
// that do not depend on the point are computed once (see shiftedEllipses),
// which leaves one Bessel function per term, point and ellipse (measured
// about 1.7 times faster than calling Spectrum; some 2·10⁴ points per second
// per core for 8 coils, 49 terms and the 10-ellipse head phantom). With
// workers > 1 the points are split among that many goroutines (p.Spectrum
// must then be safe for concurrent use, as it is for Ellipses); the result
// does not depend on the number of workers.
func (a *CoilArray) Samples(p Phantom, ny, nx int, kx, ky []float64, workers int) ([]complex128, error) {
	if err := a.Validate(); err != nil {
		return nil, err
	}
	if p == nil {
		return nil, errors.New("simulate: no phantom")
	}
	if ny < 1 || nx < 1 {
		return nil, fmt.Errorf("simulate: grid %d×%d; both sizes must be ≥ 1", ny, nx)
	}
	if len(kx) != len(ky) {
		return nil, fmt.Errorf("simulate: %d kx coordinates but %d ky coordinates", len(kx), len(ky))
	}
	if len(kx) == 0 {
		return nil, errors.New("simulate: no k-space point to sample")
	}
	if workers < 1 {
		workers = 1
	}
	m := len(kx)
	out := make([]complex128, a.Coils()*m)
	scale := complex(math.Sqrt(float64(nx)*float64(ny)), 0)
	var se *shiftedEllipses
	if e, ok := p.(Ellipses); ok {
		se = newShiftedEllipses(e, a.FX, a.FY)
	}
	run := func(lo, hi int) {
		f := make([]complex128, a.Terms())
		for j := lo; j < hi; j++ {
			if se != nil {
				se.spectra(f, kx[j], ky[j])
			} else {
				for t := range f {
					f[t] = p.Spectrum(kx[j]-a.FX[t], ky[j]-a.FY[t])
				}
			}
			for c, coef := range a.Coef {
				var s complex128
				for t, w := range coef {
					s += w * f[t]
				}
				out[c*m+j] = scale * s
			}
		}
	}
	if workers == 1 || m < 2*workers {
		run(0, m)
		return out, nil
	}
	var wg sync.WaitGroup
	for w := range workers {
		lo, hi := w*m/workers, (w+1)*m/workers
		wg.Add(1)
		go func() { defer wg.Done(); run(lo, hi) }()
	}
	wg.Wait()
	return out, nil
}

// shiftedEllipses evaluates the spectrum of an Ellipses phantom at the T
// shifted points k − f_t of one sample point k at once. The transform of an
// ellipse (see Ellipses.Spectrum) is ρab·J1(2πq)/q·exp(−2πi k·c); at k − f_t
// its phase splits into exp(−2πi k·c), once per point, and exp(2πi f_t·c),
// once per term, and the rotated components of f_t are fixed too, so per
// term and ellipse only q and J1 remain. The values equal Spectrum's to
// rounding.
type shiftedEllipses struct {
	terms    int
	a, b, w  []float64 // semi-axes and ρab per ellipse
	cos, sin []float64 // rotation per ellipse
	x0, y0   []float64
	fu, fv   []float64    // [e·T + t]: f_t along the ellipse's axes
	phase    []complex128 // [e·T + t]: exp(2πi f_t·c_e)
}

func newShiftedEllipses(e Ellipses, fx, fy []float64) *shiftedEllipses {
	T := len(fx)
	se := &shiftedEllipses{terms: T}
	for _, el := range e {
		if !el.valid() {
			continue
		}
		sn, cs := math.Sincos(el.ThetaDeg * math.Pi / 180)
		se.a = append(se.a, el.A)
		se.b = append(se.b, el.B)
		se.w = append(se.w, el.Rho*el.A*el.B)
		se.cos = append(se.cos, cs)
		se.sin = append(se.sin, sn)
		se.x0 = append(se.x0, el.X0)
		se.y0 = append(se.y0, el.Y0)
		for t := range T {
			se.fu = append(se.fu, fx[t]*cs+fy[t]*sn)
			se.fv = append(se.fv, -fx[t]*sn+fy[t]*cs)
			ps, pc := math.Sincos(2 * math.Pi * (fx[t]*el.X0 + fy[t]*el.Y0))
			se.phase = append(se.phase, complex(pc, ps))
		}
	}
	return se
}

// spectra writes F(kx − f_t, ky − f_t) for every term t into f.
func (se *shiftedEllipses) spectra(f []complex128, kx, ky float64) {
	clear(f)
	T := se.terms
	for e, w := range se.w {
		ps, pc := math.Sincos(-2 * math.Pi * (kx*se.x0[e] + ky*se.y0[e]))
		pp := complex(pc, ps)
		ku := kx*se.cos[e] + ky*se.sin[e]
		kv := -kx*se.sin[e] + ky*se.cos[e]
		a, b := se.a[e], se.b[e]
		fu, fv, ph := se.fu[e*T:(e+1)*T], se.fv[e*T:(e+1)*T], se.phase[e*T:(e+1)*T]
		for t := range f {
			q := math.Hypot(a*(ku-fu[t]), b*(kv-fv[t]))
			f[t] += complex(w*diskFT(q), 0) * ph[t] * pp
		}
	}
}

// CartesianSpectra returns the noiseless fully sampled multi-coil k-space of p
// on the centred ny-by-nx grid, one row-major grid per coil, scaled as
// CartesianSpectrum: spectra[c][m·nx + n] = √(nx·ny)·Σ_t Coef[c][t]·F(k − f_t)
// at kx = n − nx/2, ky = m − ny/2.
//
// When every frequency is a multiple of 1/L for a small integer L (as for
// CoilRing, L = Period when the period is an integer), every shifted point
// k − f_t lies on the lattice of spacing 1/L, and the phantom's spectrum is
// evaluated once per lattice point (about L² times the grid) instead of T
// times per grid point; for Ellipses the lattice itself is computed by
// CartesianSpectrum of the ellipses scaled by 1/L, using F(u/L) = L²·F_{1/L}(u).
// Otherwise each point is evaluated as in Samples.
func (a *CoilArray) CartesianSpectra(p Phantom, ny, nx int) ([][]complex128, error) {
	if err := a.Validate(); err != nil {
		return nil, err
	}
	if p == nil {
		return nil, errors.New("simulate: no phantom")
	}
	if ny < 1 || nx < 1 {
		return nil, fmt.Errorf("simulate: grid %d×%d; both sizes must be ≥ 1", ny, nx)
	}
	N, T := a.Coils(), a.Terms()
	out := make([][]complex128, N)
	for c := range out {
		out[c] = make([]complex128, ny*nx)
	}
	scale := complex(math.Sqrt(float64(nx)*float64(ny)), 0)
	L, ux, uy, ok := a.lattice()
	if !ok {
		f := make([]complex128, T)
		for m := range ny {
			ky := float64(m - ny/2)
			for n := range nx {
				kx := float64(n - nx/2)
				for t := range f {
					f[t] = p.Spectrum(kx-a.FX[t], ky-a.FY[t])
				}
				for c, coef := range a.Coef {
					var s complex128
					for t, w := range coef {
						s += w * f[t]
					}
					out[c][m*nx+n] = scale * s
				}
			}
		}
		return out, nil
	}
	// Lattice indices: k − f_t = (L·k − u_t)/L with u_t = L·f_t integer.
	uxMin, uxMax := minMax(ux)
	uyMin, uyMax := minMax(uy)
	lx0, lx1 := L*(-nx/2)-uxMax, L*(nx-1-nx/2)-uxMin // lattice index range along x
	ly0, ly1 := L*(-ny/2)-uyMax, L*(ny-1-ny/2)-uyMin
	wx := lx1 - lx0 + 1
	lat := latticeSpectrum(p, L, lx0, lx1, ly0, ly1)
	for c, coef := range a.Coef {
		dst := out[c]
		for t, w := range coef {
			w *= scale
			offx := -ux[t] - lx0
			offy := -uy[t] - ly0
			for m := range ny {
				li := (L*(m-ny/2) + offy) * wx
				row := dst[m*nx : (m+1)*nx]
				for n := range row {
					row[n] += w * lat[li+L*(n-nx/2)+offx]
				}
			}
		}
	}
	return out, nil
}

// lattice reports whether all frequencies are multiples of 1/L for some L in
// 1…16 and returns the smallest such L with the integer indices L·f.
func (a *CoilArray) lattice() (L int, ux, uy []int, ok bool) {
	T := a.Terms()
	ux, uy = make([]int, T), make([]int, T)
outer:
	for L = 1; L <= 16; L++ {
		for t := range T {
			vx, vy := a.FX[t]*float64(L), a.FY[t]*float64(L)
			rx, ry := math.Round(vx), math.Round(vy)
			if math.Abs(vx-rx) > 1e-9 || math.Abs(vy-ry) > 1e-9 || math.Abs(rx) > 1<<20 || math.Abs(ry) > 1<<20 {
				continue outer
			}
			ux[t], uy[t] = int(rx), int(ry)
		}
		return L, ux, uy, true
	}
	return 0, nil, nil, false
}

func minMax(v []int) (lo, hi int) {
	lo, hi = v[0], v[0]
	for _, x := range v[1:] {
		lo, hi = min(lo, x), max(hi, x)
	}
	return lo, hi
}

// latticeSpectrum returns F(u/L, v/L) for lattice indices u in [x0, x1], v in
// [y0, y1], row-major over v then u.
func latticeSpectrum(p Phantom, L, x0, x1, y0, y1 int) []complex128 {
	wx, wy := x1-x0+1, y1-y0+1
	lat := make([]complex128, wx*wy)
	if e, ok := p.(Ellipses); ok {
		// The ellipses scaled by 1/L have spectrum F_{1/L}(u) = F(u/L)/L².
		s := make(Ellipses, len(e))
		for i, el := range e {
			s[i] = Ellipse{Rho: el.Rho, X0: el.X0 / float64(L), Y0: el.Y0 / float64(L),
				A: el.A / float64(L), B: el.B / float64(L), ThetaDeg: el.ThetaDeg}
		}
		// A centred grid of even size 2h covers the indices [−h, h−1].
		hx := max(-x0, x1+1)
		hy := max(-y0, y1+1)
		g := CartesianSpectrum(s, 2*hx, 2*hy)
		f := complex(float64(L*L)/math.Sqrt(float64(2*hx)*float64(2*hy)), 0)
		for v := y0; v <= y1; v++ {
			src := g[(v+hy)*2*hx:]
			dst := lat[(v-y0)*wx : (v-y0+1)*wx]
			for u := range dst {
				dst[u] = f * src[u+x0+hx]
			}
		}
		return lat
	}
	inv := 1 / float64(L)
	for v := y0; v <= y1; v++ {
		for u := x0; u <= x1; u++ {
			lat[(v-y0)*wx+u-x0] = p.Spectrum(float64(u)*inv, float64(v)*inv)
		}
	}
	return lat
}

// CartesianData returns the noiseless multi-coil samples of p that a mask on
// the centred ny-by-nx grid acquires, coil-major and, within a coil, in
// row-major order of the grid: the layout of the data of NewCartesianSENSE
// with the same mask.
func (a *CoilArray) CartesianData(p Phantom, ny, nx int, mask []bool) ([]complex128, error) {
	if len(mask) != ny*nx {
		return nil, fmt.Errorf("simulate: mask has %d entries, want %d×%d = %d", len(mask), ny, nx, ny*nx)
	}
	spectra, err := a.CartesianSpectra(p, ny, nx)
	if err != nil {
		return nil, err
	}
	var out []complex128
	for _, s := range spectra {
		for i, m := range mask {
			if m {
				out = append(out, s[i])
			}
		}
	}
	if len(out) == 0 {
		return nil, errors.New("simulate: the mask acquires no sample")
	}
	return out, nil
}

// CheckSENSEFactor reports whether an array of the given number of coils can
// unfold uniform Cartesian undersampling by the total acceleration factor r:
// each measured pixel then holds the sum of r aliased pixels, and separating
// them by their coil weights needs at least r coils (Pruessmann KP et al., MRM
// 1999;42:952-962). The error names the limit.
func CheckSENSEFactor(coils int, r float64) error {
	if coils < 1 {
		return fmt.Errorf("simulate: SENSE needs at least one receive coil, got %d", coils)
	}
	if !(r >= 1) || math.IsInf(r, 0) {
		return fmt.Errorf("simulate: acceleration factor R = %g must be a finite number ≥ 1", r)
	}
	if r > float64(coils)+1e-9 {
		return fmt.Errorf("simulate: uniform Cartesian SENSE at R = %g folds %g pixels onto each measured one and needs at least that many receive coils; this array has %d coils (allowed: R ≤ %d)",
			r, math.Ceil(r-1e-9), coils, coils)
	}
	return nil
}

// NoiseCovariance is the noise covariance Ψ of the receive channels of a coil
// array, Ψ_cc' = E[n_c·conj(n_c')]/(2σ²), in units of the per-channel variance
// σ² (so Ψ = I means independent coils, each with σ per real and imaginary
// channel, as AddNoise draws). It holds the Cholesky factor Ψ = L·Lᴴ (Golub
// GH, Van Loan CF, Matrix Computations, 4th ed., 2013, §4.2, for a Hermitian
// matrix) used to draw correlated noise n = σ·L·w from white w, and its
// inverse L⁻¹, which prewhitens data: L⁻¹·n is white with σ per channel. It
// is immutable after construction and safe for concurrent use.
type NoiseCovariance struct {
	n     int
	psi   []complex128 // Ψ, row-major
	chol  []complex128 // L, lower triangular, row-major
	white []complex128 // L⁻¹, lower triangular, row-major
	ident bool

	// The maps mixed by Ψ⁻¹ for SENSE.Normal, kept for the last set of
	// maps asked for, so that every operator over the same maps and
	// covariance (one per worker and candidate) shares one copy.
	mixMu   sync.Mutex
	mixFor  [][]complex128
	mixMaps [][]complex128
}

// mixedMaps returns T_c = Σ_d (Ψ⁻¹)_cd·maps[d], computed once for a given
// set of maps (by identity) and shared; safe for concurrent use.
func (nc *NoiseCovariance) mixedMaps(maps [][]complex128) [][]complex128 {
	nc.mixMu.Lock()
	defer nc.mixMu.Unlock()
	if !sameMaps(nc.mixFor, maps) {
		nc.mixFor, nc.mixMaps = maps, mixMaps(maps, nc.Inverse())
	}
	return nc.mixMaps
}

// sameMaps reports whether a and b are the same slices of the same maps.
func sameMaps(a, b [][]complex128) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if len(a[i]) != len(b[i]) || (len(a[i]) > 0 && &a[i][0] != &b[i][0]) {
			return false
		}
	}
	return true
}

// NewNoiseCovariance checks that psi (coils×coils, row-major) is Hermitian and
// positive definite and factors it. A nil psi means the identity.
func NewNoiseCovariance(coils int, psi []complex128) (*NoiseCovariance, error) {
	if coils < 1 || coils > MaxCoils {
		return nil, fmt.Errorf("simulate: noise covariance for %d coils; allowed are 1 to %d", coils, MaxCoils)
	}
	n := coils
	nc := &NoiseCovariance{n: n}
	if psi == nil {
		nc.ident = true
		psi = make([]complex128, n*n)
		for i := range n {
			psi[i*n+i] = 1
		}
	}
	if len(psi) != n*n {
		return nil, fmt.Errorf("simulate: noise covariance has %d entries, want %d×%d = %d", len(psi), n, n, n*n)
	}
	var dmax float64
	for i := range n {
		for j := range n {
			v := psi[i*n+j]
			if !finite(real(v)) || !finite(imag(v)) {
				return nil, fmt.Errorf("simulate: noise covariance entry (%d, %d) is not finite", i, j)
			}
		}
		dmax = max(dmax, math.Abs(real(psi[i*n+i])))
	}
	for i := range n {
		for j := i; j < n; j++ {
			if cmplx.Abs(psi[i*n+j]-cmplx.Conj(psi[j*n+i])) > 1e-12*dmax {
				return nil, fmt.Errorf("simulate: noise covariance is not Hermitian: entry (%d, %d) = %v but (%d, %d) = %v", i, j, psi[i*n+j], j, i, psi[j*n+i])
			}
		}
	}
	nc.psi = append([]complex128(nil), psi...)
	l, err := cholesky(nc.psi, n)
	if err != nil {
		return nil, err
	}
	nc.chol = l
	nc.white = lowerInverse(l, n)
	return nc, nil
}

// RingNoiseCovariance returns a noise covariance for coils on a ring in which
// neighbouring channels are correlated: Ψ_cc' = rho^d(c, c'), d the distance
// between the coils counted around the ring (0 on the diagonal). It is a
// simple model for inductive and shared-preamplifier coupling of this
// package's own choosing, real and circulant; NewNoiseCovariance tells
// whether a given rho gives a positive definite matrix (|rho| < 0.5 always
// does, being diagonally dominant for rings of up to MaxCoils).
func RingNoiseCovariance(coils int, rho float64) []complex128 {
	if coils < 1 {
		return nil
	}
	psi := make([]complex128, coils*coils)
	for i := range coils {
		for j := range coils {
			d := abs(i - j)
			d = min(d, coils-d)
			psi[i*coils+j] = complex(math.Pow(rho, float64(d)), 0)
		}
	}
	return psi
}

// cholesky returns the lower-triangular L with a = L·Lᴴ for a Hermitian
// positive definite n×n a (row-major), by the outer-product algorithm (Golub
// & Van Loan 2013, Algorithm 4.2.1, with conjugates for the Hermitian case).
func cholesky(a []complex128, n int) ([]complex128, error) {
	l := make([]complex128, n*n)
	for j := range n {
		d := real(a[j*n+j])
		for k := range j {
			v := l[j*n+k]
			d -= real(v)*real(v) + imag(v)*imag(v)
		}
		if !(d > 1e-14*math.Abs(real(a[j*n+j]))) || !(d > 0) {
			return nil, fmt.Errorf("simulate: noise covariance is not positive definite (pivot %d is %.3g)", j, d)
		}
		ljj := math.Sqrt(d)
		l[j*n+j] = complex(ljj, 0)
		for i := j + 1; i < n; i++ {
			s := a[i*n+j]
			for k := range j {
				s -= l[i*n+k] * cmplx.Conj(l[j*n+k])
			}
			l[i*n+j] = s / complex(ljj, 0)
		}
	}
	return l, nil
}

// lowerInverse returns the inverse of the lower-triangular n×n matrix l by
// forward substitution, column by column.
func lowerInverse(l []complex128, n int) []complex128 {
	inv := make([]complex128, n*n)
	for j := range n {
		inv[j*n+j] = 1 / l[j*n+j]
		for i := j + 1; i < n; i++ {
			var s complex128
			for k := j; k < i; k++ {
				s += l[i*n+k] * inv[k*n+j]
			}
			inv[i*n+j] = -s / l[i*n+i]
		}
	}
	return inv
}

// Coils returns the number of channels.
func (nc *NoiseCovariance) Coils() int { return nc.n }

// IsIdentity reports whether Ψ was given as nil (independent coils).
func (nc *NoiseCovariance) IsIdentity() bool { return nc.ident }

// Matrix returns a copy of Ψ, row-major.
func (nc *NoiseCovariance) Matrix() []complex128 { return append([]complex128(nil), nc.psi...) }

// Cholesky returns a copy of the lower-triangular factor L of Ψ = L·Lᴴ.
func (nc *NoiseCovariance) Cholesky() []complex128 { return append([]complex128(nil), nc.chol...) }

// Inverse returns Ψ⁻¹ = L⁻ᴴ·L⁻¹, row-major.
func (nc *NoiseCovariance) Inverse() []complex128 {
	n, w := nc.n, nc.white
	inv := make([]complex128, n*n)
	for i := range n {
		for j := range n {
			var s complex128
			for k := max(i, j); k < n; k++ {
				s += cmplx.Conj(w[k*n+i]) * w[k*n+j]
			}
			inv[i*n+j] = s
		}
	}
	return inv
}

func (nc *NoiseCovariance) perCoil(data []complex128) (int, error) {
	if len(data)%nc.n != 0 {
		return 0, fmt.Errorf("simulate: %d data values do not split into %d coils", len(data), nc.n)
	}
	return len(data) / nc.n, nil
}

// AddNoise adds to coil-major multi-coil data (coil c at
// data[c·m : (c+1)·m]) complex Gaussian noise of covariance 2σ²·Ψ between
// coils and independent between samples: for each sample j it draws white
// w_c = (N(0,1) + i·N(0,1)) for every coil in turn from rng and adds
// σ·(L·w)_c. With Ψ = I this is white noise of σ per channel. It allocates
// nothing.
func (nc *NoiseCovariance) AddNoise(data []complex128, sigma float64, rng *rand.Rand) error {
	m, err := nc.perCoil(data)
	if err != nil {
		return err
	}
	if !(sigma >= 0) || math.IsInf(sigma, 0) {
		return fmt.Errorf("simulate: noise σ = %v must be a finite number ≥ 0", sigma)
	}
	n, l := nc.n, nc.chol
	var w [MaxCoils]complex128
	for j := range m {
		for c := range n {
			w[c] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		for c := range n {
			var s complex128
			row := l[c*n : c*n+c+1]
			for k, v := range row {
				s += v * w[k]
			}
			data[c*m+j] += complex(sigma, 0) * s
		}
	}
	return nil
}

// Whiten applies L⁻¹ across the coils of coil-major data in place, so that
// noise of covariance 2σ²·Ψ becomes white with σ per channel (prewhitening;
// Pruessmann KP et al., MRM 2001;46:638-651, Appendix). Data whitened this
// way belong to an encoding operator whitened the same way (NewSENSE with
// this covariance). It allocates nothing.
func (nc *NoiseCovariance) Whiten(data []complex128) error {
	m, err := nc.perCoil(data)
	if err != nil {
		return err
	}
	if nc.ident {
		return nil
	}
	whitenLower(data, nc.white, nc.n, m)
	return nil
}

// whitenLower replaces, for each sample j, the coil vector d_c = data[c·m+j]
// by (W·d)_c with W lower triangular, bottom coil first so that each row reads
// only coils not yet replaced.
func whitenLower(data, w []complex128, n, m int) {
	for c := n - 1; c >= 0; c-- {
		row := w[c*n : c*n+c+1]
		dst := data[c*m : (c+1)*m]
		d := row[c]
		for j := range dst {
			dst[j] *= d
		}
		for k := range c {
			v := row[k]
			src := data[k*m : (k+1)*m]
			for j, s := range src {
				dst[j] += v * s
			}
		}
	}
}

// whitenUpperH replaces each coil vector d by Wᴴ·d (W lower triangular, so
// Wᴴ is upper triangular), top coil first.
func whitenUpperH(data, w []complex128, n, m int) {
	for c := range n {
		dst := data[c*m : (c+1)*m]
		d := cmplx.Conj(w[c*n+c])
		for j := range dst {
			dst[j] *= d
		}
		for k := c + 1; k < n; k++ {
			v := cmplx.Conj(w[k*n+c])
			src := data[k*m : (k+1)*m]
			for j, s := range src {
				dst[j] += v * s
			}
		}
	}
}
