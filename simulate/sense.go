package simulate

import (
	"errors"
	"fmt"

	"accelplan/simulate/nufft"
)

// SENSE is the multi-coil encoding operator of sensitivity encoding,
//
//	E = W·[F·S_1; F·S_2; …; F·S_N],
//
// that weights the image by each coil's sensitivity map S_c and encodes it
// with one single-coil operator F (a masked Cartesian FFT, a NUFFT, or any
// Operator), stacking the coils' data coil-major: coil c's m samples sit at
// [c·m, (c+1)·m). W is the optional prewhitening L⁻¹ of a NoiseCovariance
// Ψ = L·Lᴴ applied across coils per sample; with it, least squares on E is the
// SNR-optimal SENSE reconstruction, provided the data are whitened by the same
// covariance (NoiseCovariance.Whiten). Any W with WᴴW = Ψ⁻¹ gives the same
// least-squares solution and noise; the triangular L⁻¹ is used rather than the
// symmetric Ψ^(−1/2) because it comes straight from the Cholesky factor and
// is applied in place. Sources: Pruessmann KP, Weiger M,
// Scheidegger MB, Boesiger P, MRM 1999;42:952-962 (SENSE); Pruessmann KP,
// Weiger M, Börnert P, Boesiger P, MRM 2001;46:638-651 (the operator form for
// arbitrary k-space trajectories).
//
// SENSE satisfies Operator. It reuses one single-coil operator for every coil
// and holds scratch space, so it is not safe for concurrent use: Clone it for
// another goroutine. Forward and Adjoint allocate nothing.
type SENSE struct {
	base  Operator
	maps  [][]complex128
	noise *NoiseCovariance // nil or identity: no whitening
	n, m  int
	img   []complex128 // scratch, ImageLen
	dat   []complex128 // scratch, DataLen, only with whitening

	// Made by Normal on its first call: a second image, the data E·src
	// (when base has no Normal) and, with whitening, the mixed maps T_c
	// (shared through the covariance).
	img2, ex []complex128
	mixed    [][]complex128
}

// NewSENSE builds the operator from a single-coil operator base, one
// sensitivity map per coil (each of base.ImageLen() values, row-major on the
// image grid) and an optional noise covariance for prewhitening (nil, or one
// made with a nil matrix, means none). The maps are kept, not copied; do not
// change them while the operator is in use.
func NewSENSE(base Operator, maps [][]complex128, noise *NoiseCovariance) (*SENSE, error) {
	if base == nil {
		return nil, errors.New("simulate: SENSE needs a single-coil encoding operator")
	}
	n, m := base.ImageLen(), base.DataLen()
	if n < 1 || m < 1 {
		return nil, fmt.Errorf("simulate: SENSE single-coil operator maps %d pixels to %d samples; both must be ≥ 1", n, m)
	}
	if len(maps) < 1 || len(maps) > MaxCoils {
		return nil, fmt.Errorf("simulate: SENSE with %d sensitivity maps; allowed are 1 to %d coils", len(maps), MaxCoils)
	}
	for c, s := range maps {
		if len(s) != n {
			return nil, fmt.Errorf("simulate: sensitivity map of coil %d has %d pixels, the image has %d", c, len(s), n)
		}
	}
	if noise != nil && noise.Coils() != len(maps) {
		return nil, fmt.Errorf("simulate: noise covariance is for %d coils but %d sensitivity maps are given", noise.Coils(), len(maps))
	}
	s := &SENSE{base: base, maps: maps, n: n, m: m, img: make([]complex128, n)}
	if noise != nil && !noise.IsIdentity() {
		s.noise = noise
		s.dat = make([]complex128, len(maps)*m)
	}
	return s, nil
}

// NewCartesianSENSE is NewSENSE over the single-coil Cartesian operator of
// mask (see NewCartesian): data per coil in row-major order of the acquired
// samples, the layout of CoilArray.CartesianData.
func NewCartesianSENSE(ny, nx int, mask []bool, maps [][]complex128, noise *NoiseCovariance) (*SENSE, error) {
	c, err := NewCartesian(ny, nx, mask)
	if err != nil {
		return nil, err
	}
	return NewSENSE(c, maps, noise)
}

// NewNUFFTSENSE is NewSENSE over one NUFFT plan for the k-space points
// (kx[j], ky[j]) in cycles per FOV (see nufft.New for the allowed band and
// options): data per coil in the order of the points, the layout of
// CoilArray.Samples.
func NewNUFFTSENSE(ny, nx int, kx, ky []float64, opts nufft.Options, maps [][]complex128, noise *NoiseCovariance) (*SENSE, error) {
	p, err := nufft.New(ny, nx, kx, ky, opts)
	if err != nil {
		return nil, err
	}
	return NewSENSE(p, maps, noise)
}

// Clone returns an operator with scratch space of its own (and a clone of the
// single-coil operator) for use in another goroutine. It works when the
// single-coil operator is a *Cartesian or a *nufft.Plan; for other operators
// it returns an error.
func (s *SENSE) Clone() (*SENSE, error) {
	var base Operator
	switch b := s.base.(type) {
	case *Cartesian:
		base = b.Clone()
	case *nufft.Plan:
		base = b.Clone()
	default:
		return nil, fmt.Errorf("simulate: cannot clone a SENSE operator over %T", s.base)
	}
	t := &SENSE{base: base, maps: s.maps, noise: s.noise, n: s.n, m: s.m, img: make([]complex128, s.n), mixed: s.mixed}
	if s.dat != nil {
		t.dat = make([]complex128, len(s.dat))
	}
	return t, nil
}

// ImageLen returns the number of image pixels.
func (s *SENSE) ImageLen() int { return s.n }

// DataLen returns coils × samples per coil.
func (s *SENSE) DataLen() int { return len(s.maps) * s.m }

// Coils returns the number of coils.
func (s *SENSE) Coils() int { return len(s.maps) }

// SamplesPerCoil returns the number of samples of each coil.
func (s *SENSE) SamplesPerCoil() int { return s.m }

// Base returns the single-coil operator (shared, not a copy).
func (s *SENSE) Base() Operator { return s.base }

// Maps returns the sensitivity maps (shared, not a copy).
func (s *SENSE) Maps() [][]complex128 { return s.maps }

// Noise returns the covariance the operator whitens with, or nil.
func (s *SENSE) Noise() *NoiseCovariance { return s.noise }

// Forward computes dst = E·src: for each coil the single-coil samples of
// S_c·src, then the whitening across coils.
func (s *SENSE) Forward(dst, src []complex128) {
	if len(src) != s.n || len(dst) != s.DataLen() {
		panic(fmt.Sprintf("simulate: SENSE Forward with %d samples and %d pixels, want %d and %d", len(dst), len(src), s.DataLen(), s.n))
	}
	for c, sc := range s.maps {
		img := s.img
		for i, v := range src {
			img[i] = sc[i] * v
		}
		s.base.Forward(dst[c*s.m:(c+1)*s.m], img)
	}
	if s.noise != nil {
		whitenLower(dst, s.noise.white, len(s.maps), s.m)
	}
}

// Adjoint computes dst = Eᴴ·src = Σ_c conj(S_c)·Fᴴ·(Wᴴ·src)_c.
func (s *SENSE) Adjoint(dst, src []complex128) {
	if len(dst) != s.n || len(src) != s.DataLen() {
		panic(fmt.Sprintf("simulate: SENSE Adjoint with %d pixels and %d samples, want %d and %d", len(dst), len(src), s.n, s.DataLen()))
	}
	if s.noise != nil {
		copy(s.dat, src)
		whitenUpperH(s.dat, s.noise.white, len(s.maps), s.m)
		src = s.dat
	}
	clear(dst)
	for c, sc := range s.maps {
		s.base.Adjoint(s.img, src[c*s.m:(c+1)*s.m])
		for i, v := range s.img {
			w := sc[i]
			dst[i] += complex(real(w), -imag(w)) * v
		}
	}
}

// Normal computes dst = EᴴE·src. When the single-coil operator is a
// NormalOperator (a Cartesian mask of whole rows) it runs
//
//	EᴴE = Σ_c S_cᴴ·N·T_c,  T_c = Σ_d (WᴴW)_cd·S_d,  N = FᴴF of the single coil,
//
// since the coil mixing WᴴW = Ψ⁻¹ acts per sample and commutes with the
// linear N: one N per coil instead of a Forward and an Adjoint, and with
// whitening the mixed maps T_c computed once per maps and covariance and
// shared by every operator over them. Otherwise it is Adjoint∘Forward. The
// first call allocates what it needs; later calls allocate nothing.
func (s *SENSE) Normal(dst, src []complex128) {
	if len(dst) != s.n || len(src) != s.n {
		panic(fmt.Sprintf("simulate: SENSE Normal with %d and %d pixels, want %d", len(dst), len(src), s.n))
	}
	nb, ok := s.base.(NormalOperator)
	if !ok {
		if s.ex == nil {
			s.ex = make([]complex128, s.DataLen())
		}
		s.Forward(s.ex, src)
		s.Adjoint(dst, s.ex)
		return
	}
	if s.img2 == nil {
		s.img2 = make([]complex128, s.n)
	}
	in := s.maps
	if s.noise != nil {
		if s.mixed == nil {
			s.mixed = s.noise.mixedMaps(s.maps)
		}
		in = s.mixed
	}
	clear(dst)
	for c, sc := range s.maps {
		img, tc := s.img, in[c]
		for i, v := range src {
			img[i] = tc[i] * v
		}
		nb.Normal(s.img2, img)
		for i, v := range s.img2 {
			w := sc[i]
			dst[i] += complex(real(w), -imag(w)) * v
		}
	}
}

// mixMaps returns T_c = Σ_d inv[c·n+d]·maps[d] for the n×n row-major inv.
func mixMaps(maps [][]complex128, inv []complex128) [][]complex128 {
	n := len(maps)
	out := make([][]complex128, n)
	for c := range out {
		t := make([]complex128, len(maps[c]))
		for d, sd := range maps {
			v := inv[c*n+d]
			for i, s := range sd {
				t[i] += v * s
			}
		}
		out[c] = t
	}
	return out
}

// CoilImages writes Fᴴ applied to each coil's (whitened, if the operator
// whitens) data into dst[c]: for a fully sampled Cartesian mask these are the
// coil images S_c·f, ready for a root-sum-of-squares combination. dst must hold Coils()
// slices of ImageLen() values.
func (s *SENSE) CoilImages(dst [][]complex128, src []complex128) error {
	if len(dst) != len(s.maps) {
		return fmt.Errorf("simulate: %d coil images for %d coils", len(dst), len(s.maps))
	}
	if len(src) != s.DataLen() {
		return fmt.Errorf("simulate: %d samples given, the operator measures %d", len(src), s.DataLen())
	}
	for c := range s.maps {
		if len(dst[c]) != s.n {
			return fmt.Errorf("simulate: coil image %d has %d pixels, want %d", c, len(dst[c]), s.n)
		}
		s.base.Adjoint(dst[c], src[c*s.m:(c+1)*s.m])
	}
	return nil
}
