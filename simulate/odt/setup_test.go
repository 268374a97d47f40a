package odt

import (
	"math"
	"strings"
	"testing"

	"accelplan/simulate/nufft"
	"accelplan/trajectories"
)

func goodSetup() Setup {
	return Setup{Wavelength: 0.532, Medium: 1.333, NAIllumination: 0.8, NADetection: 1.0, FOV: 20, Grid: 128}
}

// Bad input gets a message that names the plan key and the allowed range.
func TestSetupRejects(t *testing.T) {
	cases := []struct {
		name string
		edit func(*Setup)
		want []string
	}{
		{"wavelength zero", func(s *Setup) { s.Wavelength = 0 }, []string{"wavelength_um", "> 0"}},
		{"wavelength negative", func(s *Setup) { s.Wavelength = -0.5 }, []string{"wavelength_um", "> 0"}},
		{"wavelength NaN", func(s *Setup) { s.Wavelength = math.NaN() }, []string{"wavelength_um"}},
		{"medium below 1", func(s *Setup) { s.Medium = 0.9 }, []string{"medium_index", "≥ 1"}},
		{"illumination NA at medium", func(s *Setup) { s.NAIllumination = 1.333 }, []string{"na_illumination", "(0, 1.333)"}},
		{"illumination NA above medium", func(s *Setup) { s.NAIllumination = 1.4; s.NADetection = 1.4 }, []string{"na_illumination", "(0, 1.333)"}},
		{"illumination NA zero", func(s *Setup) { s.NAIllumination = 0 }, []string{"na_illumination"}},
		{"detection NA at medium", func(s *Setup) { s.NADetection = 1.333 }, []string{"na_detection", "[0.8, 1.333)"}},
		{"detection NA below illumination", func(s *Setup) { s.NADetection = 0.5 }, []string{"na_detection", "[0.8, 1.333)"}},
		{"fov", func(s *Setup) { s.FOV = 0 }, []string{"fov_um", "> 0"}},
		{"grid", func(s *Setup) { s.Grid = 1 }, []string{"grid", "at least 2"}},
		{"detector plane", func(s *Setup) { s.DetectorZ = math.Inf(1) }, []string{"detector plane"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := goodSetup()
			c.edit(&s)
			err := s.Validate()
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not mention %q", err, w)
				}
			}
			if _, err2 := NewArcs(s, []trajectories.Illumination{{Dir: tilted(0)}}); err2 == nil || err2.Error() != err.Error() {
				t.Errorf("NewArcs error %v, want %v", err2, err)
			}
		})
	}
	if err := goodSetup().Validate(); err != nil {
		t.Fatalf("good setup rejected: %v", err)
	}
}

func TestArcsRejectIlluminations(t *testing.T) {
	s := goodSetup()
	cases := []struct {
		name string
		ill  []trajectories.Illumination
		want string
	}{
		{"none", nil, "illuminations = 0: must be at least 1"},
		{"not unit", []trajectories.Illumination{{Dir: [3]float64{0, 0, 2}}}, "unit vector"},
		{"out of plane", []trajectories.Illumination{{Dir: [3]float64{0, 0.6, 0.8}}}, "x–z plane"},
		{"backwards", []trajectories.Illumination{{Dir: [3]float64{0, 0, -1}}}, "+z"},
		{"beyond NA", []trajectories.Illumination{{Dir: tilted(60)}}, "na_illumination = 0.8"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := NewArcs(s, c.ill)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one containing %q", err, c.want)
			}
		})
	}
	if _, err := Illuminations(s, "fan", 0); err == nil || !strings.Contains(err.Error(), "illuminations = 0") {
		t.Errorf("zero fan: error %v", err)
	}
	if _, err := Illuminations(s, "ring", 4); err == nil || !strings.Contains(err.Error(), "fan") {
		t.Errorf("3D pattern: error %v", err)
	}
}

// A grid too coarse for the arcs is refused with the size it needs.
func TestOperatorNeedsFineEnoughGrid(t *testing.T) {
	s := goodSetup() // (0.8 + 1.0)·20/0.532 = 67.7 cycles/FOV
	ill, err := Illuminations(s, "fan", 5)
	if err != nil {
		t.Fatal(err)
	}
	a, err := NewArcs(s, ill)
	if err != nil {
		t.Fatal(err)
	}
	_, err = NewOperator(a, nufft.Options{})
	if err == nil || !strings.Contains(err.Error(), "grid must be at least 136") {
		t.Fatalf("error %v, want a request for grid 136", err)
	}
	s.Grid = s.MinGrid()
	a, _ = NewArcs(s, ill)
	if _, err := NewOperator(a, nufft.Options{}); err != nil {
		t.Fatalf("grid %d: %v", s.Grid, err)
	}
}

// The covered spectrum obeys the transverse bound (NA_ill + NA_det)/λ of
// transmission ODT and reaches it to within the detector step of one cycle
// per FOV; axially it spans [−(n_m − √(n_m² − NA_det²)), n_m − √(n_m² −
// NA_ill²)]/λ (common practice: the Ewald arcs of the extreme illuminations,
// e.g. Lim J et al., Opt Express 2015;23:16933, from memory).
func TestCoveredSpectrumBounds(t *testing.T) {
	for _, c := range []struct{ nai, nad float64 }{{0.5, 0.5}, {0.8, 1.0}, {1.1, 1.2}} {
		s := goodSetup()
		s.NAIllumination, s.NADetection = c.nai, c.nad
		s.Grid = s.MinGrid()
		ill, err := Illuminations(s, "fan", 7)
		if err != nil {
			t.Fatal(err)
		}
		a, err := NewArcs(s, ill)
		if err != nil {
			t.Fatal(err)
		}
		bound := s.TransverseBound()
		kx, _ := a.Reach()
		zlo := -(s.Medium - math.Sqrt(s.Medium*s.Medium-c.nad*c.nad)) * s.FOV / s.Wavelength
		zhi := (s.Medium - math.Sqrt(s.Medium*s.Medium-c.nai*c.nai)) * s.FOV / s.Wavelength
		minZ, maxZ := math.Inf(1), math.Inf(-1)
		for k := range a.KZ {
			minZ, maxZ = min(minZ, a.KZ[k]), max(maxZ, a.KZ[k])
		}
		t.Logf("NA %g + %g: |kx| ≤ %.3f (bound %.3f), kz in [%.3f, %.3f] (bounds [%.3f, %.3f]) cycles/FOV", c.nai, c.nad, kx, bound, minZ, maxZ, zlo, zhi)
		if kx > bound+1e-9 || kx < bound-1 {
			t.Errorf("NA %g + %g: transverse reach %.4f, want in [%.4f, %.4f]", c.nai, c.nad, kx, bound-1, bound)
		}
		if minZ < zlo-1e-9 || maxZ > zhi+1e-9 || minZ > zlo+1 || maxZ < zhi-1 {
			t.Errorf("NA %g + %g: axial range [%.4f, %.4f], want within a cycle inside [%.4f, %.4f]", c.nai, c.nad, minZ, maxZ, zlo, zhi)
		}
	}
}

// Every arc point lies on the Ewald circle of radius n_m·L/λ centred at
// −k_in (Fourier diffraction theorem: Wolf 1969; Kak & Slaney 1988, ch. 6),
// and the arcs of a fan agree with the sample list trajectories builds for
// the same fan.
func TestArcsOnEwaldCircles(t *testing.T) {
	s := goodSetup()
	s.Grid = 160
	sp := trajectories.IlluminationSpec{Pattern: "fan", Count: 6, Wavelength: s.Wavelength, Medium: s.Medium,
		NA: s.NAIllumination, NADetect: s.NADetection, FOV: s.FOV, N: s.Grid}
	samp, ill, err := trajectories.IlluminationSet(sp)
	if err != nil {
		t.Fatal(err)
	}
	a, err := NewArcs(s, ill)
	if err != nil {
		t.Fatal(err)
	}
	r := s.MediumWavenumber() * s.FOV
	if len(samp.K) != a.Len() {
		t.Fatalf("trajectories lists %d samples, arcs %d", len(samp.K), a.Len())
	}
	for k := range a.KX {
		inx, inz := a.Incident(k / a.PerShot)
		dx, dz := a.KX[k]+inx*s.FOV, a.KZ[k]+inz*s.FOV
		if d := math.Hypot(dx, dz) - r; math.Abs(d) > 1e-9*r {
			t.Fatalf("sample %d is %.3g cycles/FOV off its Ewald circle", k, d)
		}
		if math.Abs(samp.K[k][0]-a.KX[k]) > 1e-9 || math.Abs(samp.K[k][1]-a.KZ[k]) > 1e-9 {
			t.Fatalf("sample %d: arcs (%g, %g), trajectories (%g, %g)", k, a.KX[k], a.KZ[k], samp.K[k][0], samp.K[k][1])
		}
	}
}
