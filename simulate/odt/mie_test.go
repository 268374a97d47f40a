package odt

import (
	"math"
	"math/cmplx"
	"testing"

	"accelplan/trajectories"
)

// mieCase is one cylinder of testdata/mie_fixture.json, made by SciPy 1.10.1
// (scipy.special Bessel and Hankel functions) from the exact series solution
// of Bohren & Huffman 1983, ch. 8; see testdata/make_mie_fixture.py.
type mieCase struct {
	Name          string    `json:"name"`
	Wavelength    float64   `json:"wavelength_um"`
	Medium        float64   `json:"medium_index"`
	CylinderIndex float64   `json:"cylinder_index"`
	Radius        float64   `json:"radius_um"`
	BRe           []float64 `json:"b_re"`
	BIm           []float64 `json:"b_im"`
}

func loadMie(t *testing.T) map[string]mieCase {
	var fx struct {
		Cases []mieCase `json:"cases"`
	}
	readJSON(t, "mie_fixture.json", &fx)
	m := map[string]mieCase{}
	for _, c := range fx.Cases {
		m[c.Name] = c
	}
	return m
}

// amplitude returns F(ψ) = b_0 + 2 Σ_{n≥1} b_n cos(nψ).
func (c mieCase) amplitude(psi float64) complex128 {
	f := complex(c.BRe[0], c.BIm[0])
	for n := 1; n < len(c.BRe); n++ {
		f += 2 * complex(c.BRe[n], c.BIm[n]) * complex(math.Cos(float64(n)*psi), 0)
	}
	return f
}

// mieSetup places the fixture's cylinder at the centre of a 16 µm FOV.
func mieSetup(c mieCase) (Setup, Specimen) {
	s := Setup{Wavelength: c.Wavelength, Medium: c.Medium, NAIllumination: 0.8, NADetection: 1.0, FOV: 16, Grid: 128}
	sp := Specimen{Medium: c.Medium, Bodies: []Body{{DeltaN: c.CylinderIndex - c.Medium, A: c.Radius, B: c.Radius}}}
	return s, sp
}

// mieData returns the exact data of the cylinder for the arcs: every
// radiating field outside the cylinder is a sum of 2D point sources, and a
// point source's angular spectrum i/(2γ)·exp(iγd) and far-field amplitude i/4
// stand in the ratio 2/γ (Weyl's plane-wave expansion of (i/4)H0; Kak &
// Slaney 1988, ch. 6), so the detector spectrum is U(α) = (2/γ)·F(ψ)·exp(iγd)
// with ψ the angle between the scattered direction (α, γ)/k_m and the
// incident one; the datum is √N/L·U.
func mieData(a *Arcs, c mieCase) []complex128 {
	s := a.Setup
	km := s.MediumWavenumber()
	out := make([]complex128, a.Len())
	for k := range out {
		q := a.DetectorFrequency(k)
		eta := math.Sqrt(km*km - q*q)
		inx, inz := a.Incident(k / a.PerShot)
		psi := math.Atan2(q, eta) - math.Atan2(inx, inz)
		gamma := 2 * math.Pi * eta
		u := complex(2/gamma, 0) * c.amplitude(psi) * cmplx.Exp(complex(0, gamma*s.DetectorZ))
		out[k] = complex(math.Sqrt(float64(s.Grid))/s.FOV, 0) * u
	}
	return out
}

func mieArcs(t *testing.T, c mieCase, detZ float64) (*Arcs, Specimen) {
	t.Helper()
	s, sp := mieSetup(c)
	s.DetectorZ = detZ
	ill := []trajectories.Illumination{{Dir: tilted(0)}, {Dir: tilted(30)}, {Dir: tilted(-20)}}
	a, err := NewArcs(s, ill)
	if err != nil {
		t.Fatal(err)
	}
	return a, sp
}

// The first-Born data of a weak cylinder approach the exact series solution,
// with an error of second order in the index step: halving δn halves the
// relative error. This checks the whole factor of NewArcs (amplitude and
// phase, including exp(iγd) for a detection plane beyond the cylinder)
// against physics outside the package.
func TestBornMatchesExactCylinder(t *testing.T) {
	mie := loadMie(t)
	for _, d := range []float64{0, 5} {
		errs := map[string]float64{}
		for _, name := range []string{"weak", "weaker"} {
			c := mie[name]
			a, sp := mieArcs(t, c, d)
			born, err := BornData(a, sp)
			if err != nil {
				t.Fatal(err)
			}
			errs[name] = relErr(born, mieData(a, c))
		}
		t.Logf("detector plane %g µm: Born vs exact %.3g (δn = 5e-4), %.3g (δn = 2.5e-4)", d, errs["weak"], errs["weaker"])
		// Phase through the centre: 2π·5e-4·4/0.532 = 0.024 rad.
		if errs["weak"] > 0.015 {
			t.Errorf("plane %g: Born data differ from the exact solution by %.3g, want ≤ 0.015", d, errs["weak"])
		}
		if r := errs["weak"] / errs["weaker"]; r < 1.8 || r > 2.2 {
			t.Errorf("plane %g: error ratio for δn halved = %.3f, want 2 ± 0.2 (Born error of second order)", d, r)
		}
	}
}

// The beam-propagation fields of a cylinder with a phase delay of 1.4 rad
// through its centre, far beyond the Born regime, reproduce the exact
// scattered field; the first-Born data do not.
func TestBPMMatchesExactCylinder(t *testing.T) {
	c := loadMie(t)["strong"]
	a, sp := mieArcs(t, c, 0)
	exact := mieData(a, c)
	f, err := SimulateFields(a, sp, BPMOptions{})
	if err != nil {
		t.Fatal(err)
	}
	lin, err := NewLinearizer(a, f.Oversample, f.Span)
	if err != nil {
		t.Fatal(err)
	}
	scat := make([]complex128, a.Len())
	if err := lin.Data(scat, f, BornField); err != nil {
		t.Fatal(err)
	}
	born, err := BornData(a, sp)
	if err != nil {
		t.Fatal(err)
	}
	eBPM, eBorn := relErr(scat, exact), relErr(born, exact)
	t.Logf("δn = 0.02, radius 3 µm: BPM scattered field vs exact %.3g; first Born vs exact %.3g", eBPM, eBorn)
	if eBPM > 0.01 {
		t.Errorf("BPM scattered field differs from the exact solution by %.3g, want ≤ 0.01", eBPM)
	}
	if eBorn < 0.3 {
		t.Errorf("first Born differs from the exact solution by only %.3g; the case should be beyond Born", eBorn)
	}
}
