package trajectories

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

func odtSpec(pattern string, count int) IlluminationSpec {
	// Invented scenario: 500 nm light in water-like medium, 8 µm field.
	return IlluminationSpec{Pattern: pattern, Count: count, Wavelength: 0.5, Medium: 1.33, NA: 0.8, FOV: 8, N: 56}
}

func TestIlluminationReference(t *testing.T) {
	// Worked by hand: r = NA·FOV/λ = 0.8·8/0.5 = 12.8 cycles/FOV.
	// fan ⌊25.6⌋ + 1 = 26; ring ⌈2π·12.8⌉ = ⌈80.42⌉ = 81; cap ⌈π·163.84⌉ = ⌈514.72⌉ = 515.
	for _, c := range []struct {
		pattern string
		want    int
	}{{"fan", 26}, {"fan-golden", 26}, {"ring", 81}, {"ring-golden", 81}, {"fibonacci-cap", 515}} {
		got, err := IlluminationReference(odtSpec(c.pattern, 10))
		if err != nil || got != c.want {
			t.Errorf("%s: reference %d (%v), want %d", c.pattern, got, err, c.want)
		}
		s, _, err := IlluminationSet(odtSpec(c.pattern, 10))
		if err != nil || s.Shots != 10 || s.R != float64(c.want)/10 {
			t.Errorf("%s: shots %d R %g (%v), want 10, %g", c.pattern, s.Shots, s.R, err, float64(c.want)/10)
		}
	}
}

// TestIncidentWaveVectors: |k_in| = n_m/λ (in cycles per FOV, ·FOV) and the
// transverse part stays inside NA/λ (definition of the NA, common practice).
func TestIncidentWaveVectors(t *testing.T) {
	for _, p := range []string{"fan", "fan-golden", "ring", "ring-golden", "fibonacci-cap"} {
		sp := odtSpec(p, 37)
		ill, err := Illuminations(sp)
		if err != nil {
			t.Fatal(err)
		}
		km := 1.33 / 0.5 * 8
		kt := 0.8 / 0.5 * 8
		for j, il := range ill {
			if d := math.Sqrt(il.K[0]*il.K[0]+il.K[1]*il.K[1]+il.K[2]*il.K[2]) - km; math.Abs(d) > 1e-9 {
				t.Fatalf("%s %d: |k_in| off by %g", p, j, d)
			}
			tr := math.Hypot(il.K[0], il.K[1])
			if tr > kt*(1+1e-12) || il.K[2] <= 0 {
				t.Fatalf("%s %d: transverse %g beyond NA/λ·FOV = %g (kz %g)", p, j, tr, kt, il.K[2])
			}
			if math.Abs(math.Sin(il.PolarDeg*math.Pi/180)*km-tr) > 1e-9 {
				t.Fatalf("%s %d: polar angle %g° disagrees with k", p, j, il.PolarDeg)
			}
			if strings.HasPrefix(p, "ring") && math.Abs(tr-kt) > 1e-9 {
				t.Fatalf("%s %d: ring illumination not at the full NA", p, j)
			}
			if strings.HasPrefix(p, "fan") && il.K[1] != 0 {
				t.Fatalf("%s %d: fan leaves the x–z plane", p, j)
			}
		}
		if p == "ring-golden" {
			for j := 1; j < len(ill); j++ {
				d := math.Mod(ill[j].AzimuthDeg-ill[j-1].AzimuthDeg+360, 360)
				if math.Abs(d-137.5078) > 1e-4 {
					t.Fatalf("golden ring azimuth step %.5f°, want 137.5078° (360°(1 − 1/φ))", d)
				}
			}
		}
		if p == "fan" && math.Abs(ill[0].K[0]+kt) > 1e-9 || p == "fan" && math.Abs(ill[36].K[0]-kt) > 1e-9 {
			t.Errorf("fan does not span the pupil: %g .. %g", ill[0].K[0], ill[36].K[0])
		}
	}
}

// TestFibonacciCapEqualArea: the spherical zone cos α ≥ c of the cap holds
// the share (1 − c)/(1 − cos α_max) of its area (Archimedes' hat-box theorem),
// and an equal-area point set puts that share of the points there, to within
// one point.
func TestFibonacciCapEqualArea(t *testing.T) {
	const n = 400
	ill, err := Illuminations(odtSpec("fibonacci-cap", n))
	if err != nil {
		t.Fatal(err)
	}
	cosMax := math.Sqrt(1 - math.Pow(0.8/1.33, 2))
	for _, c := range []float64{0.98, 0.95, 0.9, 0.85} {
		cnt := 0
		for _, il := range ill {
			if il.Dir[2] >= c {
				cnt++
			}
		}
		want := (1 - c) / (1 - cosMax) * n
		if math.Abs(float64(cnt)-want) > 1 {
			t.Errorf("zone cos α ≥ %g: %d points, area share gives %.1f", c, cnt, want)
		}
	}
	// Azimuthal balance: each quadrant holds a quarter of the points, ±3.
	var q [4]int
	for _, il := range ill {
		q[int(il.AzimuthDeg/90)%4]++
	}
	for i, v := range q {
		if math.Abs(float64(v)-n/4) > 3 {
			t.Errorf("quadrant %d holds %d of %d", i, v, n)
		}
	}
}

// TestEwaldArcs checks the 2D fan's object frequencies against the Fourier
// diffraction theorem (Wolf 1969; Kak & Slaney 1988, ch. 6): every measured
// frequency K satisfies |K + k_in| = k_m; the transverse support reaches
// (NA_ill + NA_det)/λ (common practice); and no sample enters the missing
// cone around the optical axis, |Kz| ≤ tan(α)·|Kx| with sin α the larger NA
// over n_m (a chord of the Ewald circle between transverse frequencies within
// the NA is never steeper than its tangent there).
func TestEwaldArcs(t *testing.T) {
	for _, nad := range []float64{0, 1.1} {
		sp := odtSpec("fan", 26)
		sp.NADetect = nad
		s, ill, err := IlluminationSet(sp)
		if err != nil {
			t.Fatal(err)
		}
		if nad == 0 {
			nad = sp.NA
		}
		km := sp.Medium / sp.Wavelength * sp.FOV
		qmax := math.Floor(nad * sp.FOV / sp.Wavelength)
		if s.ShotLen != int(2*qmax+1) || len(s.K) != s.ShotLen*len(ill) || len(s.Weights) != len(s.K) {
			t.Fatalf("shot length %d, %d samples", s.ShotLen, len(s.K))
		}
		sinA := math.Max(sp.NA, nad) / sp.Medium
		tanA := sinA / math.Sqrt(1-sinA*sinA)
		reach := 0.0
		for i, k := range s.K {
			il := ill[i/s.ShotLen]
			if d := math.Hypot(k[0]+il.K[0], k[1]+il.K[2]) - km; math.Abs(d) > 1e-9 {
				t.Fatalf("sample %d off its Ewald circle by %g", i, d)
			}
			if math.Abs(k[1]) > tanA*math.Abs(k[0])+1e-9 {
				t.Fatalf("sample %d (%g, %g) inside the missing cone (tan α = %g)", i, k[0], k[1], tanA)
			}
			reach = math.Max(reach, math.Abs(k[0]))
		}
		want := (sp.NA + nad) * sp.FOV / sp.Wavelength
		if reach > want+1e-9 || reach < want-1.01 {
			t.Errorf("NA_det %g: transverse reach %.3f, want up to (NA_ill+NA_det)·FOV/λ = %.3f", nad, reach, want)
		}
	}
}

// TestIlluminationPSF: the missing cone of transmission ODT stretches the
// PSF along the optical axis (common practice; Lim et al. 2015, memory):
// the axial half-maximum extent exceeds twice the lateral one. Fewer
// illuminations leave gaps between arcs, raising the side lobes beyond the
// stretched main lobe (8 px).
func TestIlluminationPSF(t *testing.T) {
	psf := func(count int) ([]complex128, int) {
		s, _, err := IlluminationSet(odtSpec("fan", count))
		if err != nil {
			t.Fatal(err)
		}
		p, err := s.PSF()
		if err != nil {
			t.Fatal(err)
		}
		return p, s.Nx
	}
	p, n := psf(26)
	halfWidth := func(at func(d int) complex128) int {
		d := 0
		for d < n/2-1 && cmplx.Abs(at(d+1)) >= 0.5 {
			d++
		}
		return d
	}
	lat := halfWidth(func(d int) complex128 { return p[(n/2)*n+n/2+d] })
	ax := halfWidth(func(d int) complex128 { return p[(n/2+d)*n+n/2] })
	if ax < 2*lat+1 {
		t.Errorf("axial half-maximum reach %d px, lateral %d px: no axial elongation", ax, lat)
	}
	full, _ := SideLobeToPeakOutside(p, n, n, 8)
	q, _ := psf(6)
	sparse, _ := SideLobeToPeakOutside(q, n, n, 8)
	if full >= sparse {
		t.Errorf("side-lobe-to-peak beyond 8 px: 26 illuminations %.3f, 6 illuminations %.3f", full, sparse)
	}
	t.Logf("fan NA 0.8, 8 µm FOV: half-max reach axial %d px, lateral %d px; side-lobe-to-peak beyond 8 px: 26 illuminations %.3f, 6 %.3f", ax, lat, full, sparse)
}

func TestIlluminationBadInput(t *testing.T) {
	mod := func(f func(*IlluminationSpec)) IlluminationSpec { s := odtSpec("ring", 10); f(&s); return s }
	cases := []struct {
		sp      IlluminationSpec
		wantErr string
	}{
		{mod(func(s *IlluminationSpec) { s.NA = 1.33 }), "illumination NA = 1.33"},
		{mod(func(s *IlluminationSpec) { s.NA = 1.5 }), "below the medium index"},
		{mod(func(s *IlluminationSpec) { s.NA = 0 }), "illumination NA = 0"},
		{mod(func(s *IlluminationSpec) { s.NADetect = 1.4 }), "detection NA"},
		{mod(func(s *IlluminationSpec) { s.Count = 0 }), "illuminations = 0"},
		{mod(func(s *IlluminationSpec) { s.Wavelength = -1 }), "wavelength"},
		{mod(func(s *IlluminationSpec) { s.Medium = 0.9 }), "medium index"},
		{mod(func(s *IlluminationSpec) { s.FOV = 0 }), "FOV"},
		{mod(func(s *IlluminationSpec) { s.Pattern = "grid" }), "pattern \"grid\""},
	}
	for _, c := range cases {
		_, _, err := IlluminationSet(c.sp)
		if err == nil || !strings.Contains(err.Error(), c.wantErr) {
			t.Errorf("error %v, want containing %q", err, c.wantErr)
		}
	}
}
