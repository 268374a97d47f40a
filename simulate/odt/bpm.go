package odt

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"

	"accelplan/simulate/fft"
)

// Fields holds the total field of every illumination at the detection plane
// z = Setup.DetectorZ, with an incident amplitude of 1, sampled by a detector
// Span FOVs wide centred on the FOV: Pixels = Span·Grid·Oversample samples of
// pitch h = L/(Grid·Oversample), sample p at x_p = (p − Pixels/2)·h (integer
// division).
type Fields struct {
	// Oversample is the number of field samples per grid pixel.
	Oversample int
	// Span is the detector width in FOVs.
	Span int
	// Pixels is the number of samples per illumination.
	Pixels int
	// Shots holds one field per illumination, in the order of the arcs.
	Shots [][]complex128
}

// AddFieldNoise adds circular complex white Gaussian noise to every field
// sample, drawn from rng, so that a grid-sized detector pixel would see the
// standard deviation sigma per real and imaginary channel: each of the
// Oversample finer samples gets sigma·√Oversample. A datum computed from the
// field by a Linearizer then carries noise of standard deviation
// sigma·√Span, because the detector spans Span FOVs: pass
// sigma/√Span to match data made by BornData plus noise of sigma.
func AddFieldNoise(f *Fields, sigma float64, rng *rand.Rand) {
	s := sigma * math.Sqrt(float64(f.Oversample))
	for _, u := range f.Shots {
		for p := range u {
			u[p] += complex(s*rng.NormFloat64(), s*rng.NormFloat64())
		}
	}
}

// BPMOptions tune SimulateFields. The zero value asks for the defaults.
type BPMOptions struct {
	// Oversample is the number of propagation samples per grid pixel, both
	// across (x) and along (z) the light; 0 means 2.
	Oversample int
	// Pad is the width of the computational window, and of the detector,
	// in FOVs (≥ 2); 0 means 3. The outer part holds an absorbing layer for
	// the scattered field, so that light leaving the window does not wrap
	// around.
	Pad int
}

// obliquityCap bounds the slice weight k_m/k_z near grazing directions
// (it is reached at about 84° from the axis).
const obliquityCap = 10

// SimulateFields computes the total field of specimen sp for every
// illumination of a by a split-step beam-propagation method (Feit MD, Fleck
// JA, Appl Opt 1978;17:3990-3998): the specimen's index step δn is
// area-averaged on a grid Oversample times finer than the reconstruction
// grid; the field is carried from slice to slice (slice thickness = fine
// pixel) by the exact angular-spectrum propagator of the medium,
// exp(i·2π·Δz·√((n_m/λ)² − q²)), and at each slice the scattered part
// (exp(i·k0·δn·Δz) − 1)·u is added after weighting each plane-wave component
// by k_m/k_z (capped at 10), which makes the first-order term equal to the
// first Born integral (see the package doc). Light is tracked in the frame of
// the incident wave (u = exp(i k_in,x x)·v), so a tilted illumination needs
// no periodic window; a smooth absorbing layer in the padding damps the
// scattered field there. After the last slice the field is refocused to
// z = DetectorZ through the medium, keeping only transverse frequencies
// |q| ≤ NA_det/λ (the detection pupil), and sampled over the whole window
// (Span = Pad): light scattered by the specimen spreads beyond the FOV on its
// way to and back from the detector, and a detector only one FOV wide would
// miss a few percent of it.
//
// The method neglects back-scattering, which is of order (δn/2n_m)² in
// intensity for the index steps of cells. It costs three FFTs of
// Pad·Grid·Oversample points per fine slice and illumination.
func SimulateFields(a *Arcs, sp Specimen, opt BPMOptions) (*Fields, error) {
	if a == nil || a.Len() == 0 {
		return nil, fmt.Errorf("odt: illuminations = 0: must be at least 1")
	}
	if opt.Oversample == 0 {
		opt.Oversample = 2
	}
	if opt.Pad == 0 {
		opt.Pad = 3
	}
	if opt.Oversample < 1 || opt.Oversample > 16 {
		return nil, fmt.Errorf("odt: BPM oversampling %d: must be in [1, 16]", opt.Oversample)
	}
	if opt.Pad < 2 || opt.Pad > 16 {
		return nil, fmt.Errorf("odt: BPM window pad %d: must be in [2, 16] FOVs", opt.Pad)
	}
	s := a.Setup
	dn, err := sp.Contrast(s.FOV)
	if err != nil {
		return nil, err
	}
	m := s.Grid * opt.Oversample
	mw := opt.Pad * m
	off := mw/2 - m/2
	h := s.FOV / float64(m)
	win := float64(mw) * h
	k0 := 2 * math.Pi / s.Wavelength
	km := s.MediumWavenumber()
	pupil := s.NADetection / s.Wavelength

	// Phase screen exp(i k0 δn h) − 1 on the fine FOV grid; rows without
	// specimen are flagged empty.
	raster := dn.Rasterize(m, m)
	screen := make([]complex128, m*m)
	empty := make([]bool, m)
	for r := range m {
		empty[r] = true
		for c := range m {
			if d := raster[r*m+c]; d != 0 {
				ps, pc := math.Sincos(k0 * d * h)
				screen[r*m+c] = complex(pc-1, ps)
				empty[r] = false
			}
		}
	}

	// Absorbing layer for the scattered field: w = exp(−α(x)·h) with α
	// rising quadratically from 0 at x_a to αmax at the window edge.
	absorb := make([]float64, mw)
	xa := s.FOV/2 + 0.5*(win/2-s.FOV/2)
	depth := win/2 - xa
	amax := 30 / depth
	for p := range absorb {
		x := math.Abs(float64(p-mw/2) * h)
		absorb[p] = 1
		if x > xa {
			t := (x - xa) / depth
			absorb[p] = math.Exp(-amax * t * t * h)
		}
	}

	plan, err := fft.NewPlan(mw)
	if err != nil {
		return nil, err
	}
	v := make([]complex128, mw)
	src := make([]complex128, mw)
	spec := make([]complex128, mw)
	srcSpec := make([]complex128, mw)
	step := make([]complex128, mw)
	last := make([]complex128, mw)
	weight := make([]float64, mw)

	zExit := s.FOV/2 - h/2
	out := &Fields{Oversample: opt.Oversample, Span: opt.Pad, Pixels: mw, Shots: make([][]complex128, len(a.Illuminations))}
	for i := range a.Illuminations {
		qin, ein := a.inX[i], a.inZ[i]
		for b := range mw {
			p := float64(b)
			if b >= mw/2 {
				p -= float64(mw)
			}
			q := p/win + qin
			e2 := km*km - q*q
			if e2 > 0 {
				e := math.Sqrt(e2)
				step[b] = cmplx.Exp(complex(0, 2*math.Pi*h*e))
				weight[b] = min(km/e, obliquityCap)
				last[b] = 0
				if math.Abs(q) <= pupil {
					last[b] = cmplx.Exp(complex(0, 2*math.Pi*(h/2+s.DetectorZ-zExit)*e))
				}
			} else {
				step[b] = complex(math.Exp(-2*math.Pi*h*math.Sqrt(-e2)), 0)
				weight[b] = 0
				last[b] = 0
			}
		}
		// The incident wave at the centre of slice 0, z = −L/2.
		z0 := -s.FOV / 2
		for p := range v {
			v[p] = cmplx.Exp(complex(0, 2*math.Pi*ein*z0))
		}
		plan.Forward(spec, v)
		for r := range m {
			zc := (float64(r) - float64(m/2)) * h
			plan.Inverse(v, spec)
			vin := cmplx.Exp(complex(0, 2*math.Pi*ein*zc))
			for p, w := range absorb {
				if w != 1 {
					v[p] = vin + complex(w, 0)*(v[p]-vin)
				}
			}
			hasSrc := !empty[r]
			if hasSrc {
				clear(src)
				row := screen[r*m : (r+1)*m]
				for c, sc := range row {
					src[off+c] = sc * v[off+c]
				}
				plan.Forward(srcSpec, src)
			}
			plan.Forward(spec, v)
			prop := step
			if r == m-1 {
				prop = last
			}
			for b := range spec {
				x := spec[b]
				if hasSrc {
					x += complex(weight[b], 0) * srcSpec[b]
				}
				spec[b] = prop[b] * x
			}
		}
		plan.Inverse(v, spec)
		u := make([]complex128, mw)
		for p := range u {
			x := float64(p-mw/2) * h
			u[p] = v[p] * cmplx.Exp(complex(0, 2*math.Pi*qin*x))
		}
		out.Shots[i] = u
	}
	return out, nil
}

// Linearization names how a total field becomes linear data.
type Linearization int

const (
	// BornField takes the scattered field u − u_in (first Born).
	BornField Linearization = iota
	// RytovField takes u_in·ψ with the complex phase ψ = ln(u/u_in) =
	// ln|u/u_in| + i·arg(u/u_in), the argument unwrapped along x (Rytov
	// approximation; Kak & Slaney 1988, ch. 6; Devaney AJ, Ultrason Imaging
	// 1982;4:336-350).
	RytovField
)

// String returns "born" or "rytov".
func (l Linearization) String() string {
	switch l {
	case BornField:
		return "born"
	case RytovField:
		return "rytov"
	}
	return fmt.Sprintf("Linearization(%d)", int(l))
}

// Linearizer turns measured total fields into data for the Operator of the
// same arcs: for each illumination the linearised field w (see
// Linearization) and the datum y_j = √N/L · h·Σ_p w_p·exp(−2πi q_j x_p) for
// the detector frequencies q_j = j/L of the arcs, the Riemann sum of
// √N/L·W(2πq_j) over the P samples of pitch h = L/M (M = N·oversample).
// Build it once per arcs and field sampling; it owns an FFT plan of length P
// and scratch and is not safe for concurrent use.
type Linearizer struct {
	arcs       *Arcs
	span, p    int
	plan       *fft.Plan
	w, wf      []complex128
	shift      []complex128 // √(N·P)/M·exp(2πi j⌊P/2⌋/M) per detector index
	oversample int
}

// NewLinearizer prepares the linearisation of fields sampled with
// oversample samples per grid pixel by a detector span FOVs wide.
func NewLinearizer(a *Arcs, oversample, span int) (*Linearizer, error) {
	if a == nil || a.Len() == 0 {
		return nil, fmt.Errorf("odt: illuminations = 0: must be at least 1")
	}
	if oversample < 1 || span < 1 {
		return nil, fmt.Errorf("odt: field oversampling %d and span %d: both must be at least 1", oversample, span)
	}
	n := a.Setup.Grid
	m := n * oversample
	p := m * span
	jmax := (a.PerShot - 1) / 2
	if 2*jmax >= m {
		return nil, fmt.Errorf("odt: %d field samples per FOV cannot resolve detector frequencies up to %d cycles/FOV; raise the oversampling", m, jmax)
	}
	plan, err := fft.NewPlan(p)
	if err != nil {
		return nil, err
	}
	l := &Linearizer{arcs: a, span: span, p: p, oversample: oversample, plan: plan,
		w: make([]complex128, p), wf: make([]complex128, p), shift: make([]complex128, a.PerShot)}
	scale := math.Sqrt(float64(n)*float64(p)) / float64(m)
	for j := -jmax; j <= jmax; j++ {
		ps, pc := math.Sincos(2 * math.Pi * float64(j) * float64(p/2) / float64(m))
		l.shift[j+jmax] = complex(scale*pc, scale*ps)
	}
	return l, nil
}

// Data writes into dst (length Arcs.Len()) the data of the fields f
// linearised as how. It fails when the fields do not match the arcs or, for
// the Rytov field, when the field vanishes at a sample.
func (l *Linearizer) Data(dst []complex128, f *Fields, how Linearization) error {
	a := l.arcs
	switch {
	case f == nil || len(f.Shots) != len(a.Illuminations):
		return fmt.Errorf("odt: fields for %d illuminations, the arcs have %d", lenShots(f), len(a.Illuminations))
	case f.Pixels != l.p || f.Span != l.span || f.Oversample != l.oversample:
		return fmt.Errorf("odt: fields of %d samples (oversampling %d, span %d), the linearizer expects %d (oversampling %d, span %d)",
			f.Pixels, f.Oversample, f.Span, l.p, l.oversample, l.span)
	case len(dst) != a.Len():
		return fmt.Errorf("odt: data buffer of %d, the arcs have %d samples", len(dst), a.Len())
	case how != BornField && how != RytovField:
		return fmt.Errorf("odt: unknown linearisation %d", int(how))
	}
	s := a.Setup
	np := l.p
	h := s.FOV / float64(s.Grid*l.oversample)
	jmax := (a.PerShot - 1) / 2
	for i, u := range f.Shots {
		if len(u) != np {
			return fmt.Errorf("odt: field %d has %d samples, want %d", i, len(u), np)
		}
		qin, ein := a.inX[i], a.inZ[i]
		var prevArg, unwrapped float64
		for p, up := range u {
			x := float64(p-np/2) * h
			uin := cmplx.Exp(complex(0, 2*math.Pi*(qin*x+ein*s.DetectorZ)))
			if how == BornField {
				l.w[p] = up - uin
				continue
			}
			r := up / uin
			mag := cmplx.Abs(r)
			if !(mag > 0) || math.IsInf(mag, 0) {
				return fmt.Errorf("odt: field %d is %v at sample %d; the Rytov phase needs a finite non-zero field", i, up, p)
			}
			arg := cmplx.Phase(r)
			if p == 0 {
				unwrapped = arg
			} else {
				d := arg - prevArg
				d -= 2 * math.Pi * math.Round(d/(2*math.Pi))
				unwrapped += d
			}
			prevArg = arg
			l.w[p] = uin * complex(math.Log(mag), unwrapped)
		}
		l.plan.Forward(l.wf, l.w)
		row := dst[i*a.PerShot : (i+1)*a.PerShot]
		for j := -jmax; j <= jmax; j++ {
			b := j * l.span
			if b < 0 {
				b += np
			}
			row[j+jmax] = l.shift[j+jmax] * l.wf[b]
		}
	}
	return nil
}

func lenShots(f *Fields) int {
	if f == nil {
		return 0
	}
	return len(f.Shots)
}
