package trajectories

import (
	"math"
	"math/cmplx"
	"sort"
	"strings"
	"testing"
)

// TestGoldenAngles measures the increment between consecutive spokes.
// Sources: golden angle 180°/φ = 111.2461° (Winkelmann et al., IEEE TMI 2007,
// memory); tiny golden angles ψ_2 = 68.7539°, ψ_7 = 23.6281°, ψ_10 = 16.9523°
// (Wundrak et al., MRM 2016, memory; REFERENCES.md gives them to 4 decimals).
// Half spokes over 360° step by 360°/φ = 222.4922° (≡ −137.5078°; common
// practice).
func TestGoldenAngles(t *testing.T) {
	cases := []struct {
		tinyN int
		half  bool
		want  float64
	}{
		{1, false, 111.2461},
		{2, false, 68.7539},
		{7, false, 23.6281},
		{10, false, 16.9523},
		{1, true, 222.4922},
	}
	for _, c := range cases {
		s, err := Radial(RadialSpec{N: 32, Spokes: 50, Order: "golden", TinyN: c.tinyN, Half: c.half})
		if err != nil {
			t.Fatal(err)
		}
		period := 180.0
		if c.half {
			period = 360
		}
		for j := 1; j < len(s.Angles); j++ {
			d := math.Mod(s.Angles[j]-s.Angles[j-1]+period, period)
			if math.Abs(d-c.want) > 5e-5 {
				t.Fatalf("ψ_%d half=%v: step %d is %.6f°, want %.4f°", c.tinyN, c.half, j, d, c.want)
			}
		}
		// The spoke direction at angle θ is (cos θ, sin θ): check the second
		// sample of a spoke against its angle.
		k := s.K[s.ShotLen+s.ShotLen-1]
		if got := math.Mod(math.Atan2(k[1], k[0])*180/math.Pi+360, period); math.Abs(got-s.Angles[1]) > 1e-9 {
			t.Errorf("spoke 1 points at %.6f°, its angle is %.6f°", got, s.Angles[1])
		}
	}
}

// TestRadialReference: π/2·N full spokes for Nyquist (Bernstein 2004, memory):
// 402 for N = 256, where the azimuthal gap at the edge, π/402·128 = 1.0003
// cycles per FOV, is one Nyquist step.
func TestRadialReference(t *testing.T) {
	if got := RadialReferenceSpokes(256, false); got != 402 {
		t.Errorf("N=256 full spokes: %d, want 402", got)
	}
	if got := RadialReferenceSpokes(256, true); got != 804 {
		t.Errorf("N=256 half spokes: %d, want 804", got)
	}
	for _, n := range []int{64, 128, 256, 320} {
		ref := RadialReferenceSpokes(n, false)
		if gap := math.Pi / float64(ref) * float64(n) / 2; math.Abs(gap-1) > 0.01 {
			t.Errorf("N=%d: edge gap with %d spokes is %.4f cycles/FOV, want 1 within 1%%", n, ref, gap)
		}
		s, _ := Radial(RadialSpec{N: n, Spokes: ref / 4, Order: "uniform"})
		if want := float64(ref) / float64(ref/4); s.R != want || s.Shots != ref/4 {
			t.Errorf("N=%d: R = %g, want %g", n, s.R, want)
		}
	}
}

func TestRadialGeometry(t *testing.T) {
	for _, c := range []struct {
		spec    RadialSpec
		shotLen int
		kmin    float64
		kmax    float64
	}{
		{RadialSpec{N: 64, Spokes: 30, Order: "uniform"}, 128, -32, 31.5},
		{RadialSpec{N: 64, Spokes: 30, Order: "uniform", Oversampling: 1}, 64, -32, 31},
		{RadialSpec{N: 64, Spokes: 30, Order: "golden", Half: true}, 64, 0, 31.5},
		{RadialSpec{N: 50, Spokes: 7, Order: "uniform", Oversampling: 1.5}, 75, -24 - 2.0/3, 24 + 2.0/3}, // odd count: symmetric
	} {
		s, err := Radial(c.spec)
		if err != nil {
			t.Fatal(err)
		}
		if s.ShotLen != c.shotLen || len(s.K) != c.shotLen*c.spec.Spokes || len(s.Weights) != len(s.K) {
			t.Fatalf("%+v: shot length %d (%d samples), want %d", c.spec, s.ShotLen, len(s.K), c.shotLen)
		}
		os := c.spec.Oversampling
		if os == 0 {
			os = 2
		}
		// Signed radius along spoke 0 (angle 0 for every order).
		first, last := s.K[0][0], s.K[s.ShotLen-1][0]
		if math.Abs(first-c.kmin) > 1e-12 || math.Abs(last-c.kmax) > 1e-12 {
			t.Errorf("%+v: spoke runs %g..%g, want %g..%g", c.spec, first, last, c.kmin, c.kmax)
		}
		for i := 1; i < s.ShotLen; i++ {
			if d := s.K[i][0] - s.K[i-1][0]; math.Abs(d-1/os) > 1e-12 {
				t.Fatalf("%+v: sample spacing %g, want 1/os = %g", c.spec, d, 1/os)
			}
		}
		// Density compensation covers what the spokes reach: each side of a
		// diameter sweeps a half disc of radius (end + Δk/2), a half spoke a
		// full disc (geometry; midpoint rule), within 1%.
		sum := 0.0
		for _, w := range s.Weights {
			sum += w
		}
		a, b := -c.kmin+0.5/os, c.kmax+0.5/os
		disc := math.Pi * (a*a + b*b) / 2
		if c.spec.Half {
			disc = math.Pi * b * b
		}
		if math.Abs(sum-disc) > 0.01*disc {
			t.Errorf("%+v: weights sum to %.2f, disc area %.2f", c.spec, sum, disc)
		}
	}
}

func TestRationalGolden(t *testing.T) {
	// Fibonacci numbers by hand: 1 1 2 3 5 8 13 21 34 55 89 144 233.
	// N = 1: T = F_{k+1} ≥ spokes, step F_k. N = 2: T = F_{k+1} + F_k.
	cases := []struct{ n, spokes, total, step int }{
		{1, 100, 144, 89},
		{1, 144, 144, 89},
		{1, 145, 233, 144},
		{2, 100, 144, 55}, // 89 + 55
		// N = 7: T = F_{k+1} + 6·F_k over (F_k, F_{k+1}) = (1,1)→7, (1,2)→8,
		// (2,3)→15, (3,5)→23, (5,8)→38, (8,13)→61, (13,21)→99, (21,34)→160.
		{7, 100, 160, 21},
	}
	for _, c := range cases {
		total, step, err := RationalGolden(c.n, c.spokes)
		if err != nil || total != c.total || step != c.step {
			t.Errorf("RationalGolden(%d, %d) = %d, %d, %v; want %d, %d", c.n, c.spokes, total, step, err, c.total, c.step)
		}
		// The step angle approximates ψ_N to better than the base spacing.
		if d := math.Abs(float64(step)*180/float64(total) - TinyGoldenAngle(c.n)); d > 180/float64(total) {
			t.Errorf("N=%d T=%d: step angle off ψ_N by %g°", c.n, total, d)
		}
		// T spokes of that order are equidistant (Scholand et al. 2024).
		s, err := Radial(RadialSpec{N: 16, Spokes: total, Order: "rational", TinyN: c.n})
		if err != nil {
			t.Fatal(err)
		}
		a := append([]float64(nil), s.Angles...)
		sort.Float64s(a)
		for j := 1; j < len(a); j++ {
			if d := a[j] - a[j-1]; math.Abs(d-180/float64(total)) > 1e-9 {
				t.Fatalf("N=%d T=%d: sorted gap %g°, want %g°", c.n, total, d, 180/float64(total))
			}
		}
	}
}

// TestRadialStreakRadius: uniform radial sampling with n_s full spokes of
// radius kmax leaves a streak-free disc of radius n_s/(π·kmax) FOV around a
// point, the inverse of the azimuthal gap π·kmax/n_s at the edge (common
// practice; Bernstein 2004, memory). The PSF is the direct-sum adjoint.
func TestRadialStreakRadius(t *testing.T) {
	const n = 64
	for _, ns := range []int{12, 16, 25} {
		s, err := Radial(RadialSpec{N: n, Spokes: ns, Order: "uniform"})
		if err != nil {
			t.Fatal(err)
		}
		psf, err := s.PSF()
		if err != nil {
			t.Fatal(err)
		}
		if v := psf[(n/2)*n+n/2]; math.Abs(real(v)-1) > 1e-12 || math.Abs(imag(v)) > 1e-12 {
			t.Fatalf("peak %v, want 1 after normalisation", v)
		}
		ra := float64(ns) / (math.Pi * n / 2) * n // pixels
		inner, ring := 0.0, 0.0
		for i := range n {
			for j := range n {
				r := math.Hypot(float64(i-n/2), float64(j-n/2))
				v := cmplx.Abs(psf[i*n+j])
				if r >= 4 && r <= 0.8*ra {
					inner = max(inner, v)
				}
				if r >= ra && r <= 1.3*ra {
					ring = max(ring, v)
				}
			}
		}
		if inner > ring/2 {
			t.Errorf("%d spokes: max |psf| %.3f inside 0.8·r_a, %.3f on the streak ring at r_a = %.1f px", ns, inner, ring, ra)
		}
	}
}

// TestPointPSFDirectSum checks PointPSF on samples at integer Cartesian
// positions against MaskPSF of the same mask (two independent routes to the
// same inverse DFT).
func TestPointPSFDirectSum(t *testing.T) {
	const ny, nx = 12, 10
	s, _ := CartesianRandom(ny, nx, 5, 1, 2, 3)
	var k [][2]float64
	for m := range ny {
		for j := range nx {
			if s.Mask[m*nx+j] {
				k = append(k, [2]float64{float64(j - nx/2), float64(m - ny/2)})
			}
		}
	}
	got, err := PointPSF(k, nil, ny, nx)
	if err != nil {
		t.Fatal(err)
	}
	want, _ := s.PSF()
	peak := want[(ny/2)*nx+nx/2]
	for i := range got {
		if cmplx.Abs(got[i]-want[i]/peak) > 1e-12 {
			t.Fatalf("pixel %d: %v, MaskPSF/peak %v", i, got[i], want[i]/peak)
		}
	}
}

func TestRadialSideLobes(t *testing.T) {
	// Undersampling raises the side lobes beyond the main lobe; a Nyquist
	// set stays low. 3 px excludes the main lobe of the jinc-like peak.
	sl := func(spokes int, order string) float64 {
		s, _ := Radial(RadialSpec{N: 48, Spokes: spokes, Order: order})
		p, _ := s.PSF()
		v, err := SideLobeToPeakOutside(p, 48, 48, 3)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	full, under := sl(RadialReferenceSpokes(48, false), "uniform"), sl(12, "uniform")
	if full >= under/2 {
		t.Errorf("side-lobe-to-peak beyond 3 px: Nyquist %.3f, 12 spokes %.3f", full, under)
	}
	t.Logf("N=48 side-lobe-to-peak beyond 3 px: %d spokes %.3f, 12 uniform %.3f, 12 golden %.3f", RadialReferenceSpokes(48, false), full, under, sl(12, "golden"))
}

func TestRadialBadInput(t *testing.T) {
	cases := []struct {
		spec    RadialSpec
		wantErr string
	}{
		{RadialSpec{N: 64, Spokes: 0, Order: "uniform"}, "spokes = 0"},
		{RadialSpec{N: 1, Spokes: 10, Order: "uniform"}, "N = 1"},
		{RadialSpec{N: 64, Spokes: 10, Order: "spiral"}, "radial order"},
		{RadialSpec{N: 64, Spokes: 10, Order: "golden", TinyN: -1}, "N = -1"},
		{RadialSpec{N: 64, Spokes: 10, Order: "uniform", Oversampling: 0.5}, "oversampling = 0.5"},
		{RadialSpec{N: 64, Spokes: 10, Order: "uniform", Oversampling: math.NaN()}, "oversampling"},
	}
	for _, c := range cases {
		_, err := Radial(c.spec)
		if err == nil || !strings.Contains(err.Error(), c.wantErr) {
			t.Errorf("%+v: error %v, want containing %q", c.spec, err, c.wantErr)
		}
	}
}
