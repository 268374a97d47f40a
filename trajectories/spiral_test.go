package trajectories

import (
	"math"
	"sort"
	"strings"
	"testing"
)

func baseSpiral() SpiralSpec {
	return SpiralSpec{N: 128, FOV: 0.24, Interleaves: 8, GMax: 0.04, SMax: 150, Dt: 4e-6, EdgeUndersampling: 1, DenseFraction: 1}
}

// TestSpiralLimits recomputes the gradient and slew of the sampled path
// (g = Δk/(γ̄·Δt), γ̄ = 42.577478518 MHz/T, CODATA 2018) and checks they never
// exceed the limits the spiral was designed for (issue 3).
func TestSpiralLimits(t *testing.T) {
	specs := []SpiralSpec{baseSpiral()}
	vd := baseSpiral()
	vd.EdgeUndersampling, vd.DenseFraction, vd.Interleaves = 3, 0.25, 4
	specs = append(specs, vd)
	weak := baseSpiral()
	weak.GMax, weak.SMax, weak.Dt, weak.Interleaves = 0.02, 80, 10e-6, 16
	specs = append(specs, weak)
	for _, sp := range specs {
		d, err := DesignSpiral(sp)
		if err != nil {
			t.Fatal(err)
		}
		const gammaBar = 42.577478518e6
		var prev [2]float64
		peakG, peakS := 0.0, 0.0
		for j := 1; j < len(d.K); j++ {
			g := [2]float64{(d.K[j][0] - d.K[j-1][0]) / sp.FOV / (gammaBar * sp.Dt), (d.K[j][1] - d.K[j-1][1]) / sp.FOV / (gammaBar * sp.Dt)}
			peakG = max(peakG, math.Hypot(g[0], g[1]))
			peakS = max(peakS, math.Hypot(g[0]-prev[0], g[1]-prev[1])/sp.Dt)
			prev = g
		}
		if peakG > sp.GMax || peakS > sp.SMax {
			t.Errorf("%+v: peak gradient %.5f T/m (limit %g), slew %.2f T/m/s (limit %g)", sp, peakG, sp.GMax, peakS, sp.SMax)
		}
		// The design should use the limits, not dawdle: within 3% of one.
		if peakG < 0.97*sp.GMax && peakS < 0.97*sp.SMax {
			t.Errorf("%+v: neither limit reached (%.4f T/m, %.1f T/m/s)", sp, peakG, peakS)
		}
		if math.Abs(peakG-d.PeakG) > 1e-9 || math.Abs(peakS-d.PeakSlew) > 1e-6 {
			t.Errorf("reported peaks %.6f, %.3f; recomputed %.6f, %.3f", d.PeakG, d.PeakSlew, peakG, peakS)
		}
		last := d.K[len(d.K)-1]
		before := d.K[len(d.K)-2]
		if d.K[0] != [2]float64{} || math.Hypot(last[0], last[1]) < 64 || math.Hypot(before[0], before[1]) >= 64 {
			t.Errorf("path starts at %v, ends at radius %.3f (one before %.3f); want 0 and the first sample past N/2 = 64", d.K[0], math.Hypot(last[0], last[1]), math.Hypot(before[0], before[1]))
		}
		if want := float64(len(d.K)) * sp.Dt; math.Abs(d.Readout-want) > 1e-15 {
			t.Errorf("readout %g, samples·Dt %g", d.Readout, want)
		}
	}
}

// TestSpiralRegimes compares the readout duration with the closed forms of
// the two regimes of a constant-density Archimedean spiral k = λθ·e^{iθ}
// (Glover 1999, memory; derived here): amplitude-limited, constant speed
// γ̄·G along the arc length L = λ/2·(θ√(1+θ²) + asinh θ) (arc length of an
// Archimedean spiral, any calculus handbook), T = L/(γ̄G); slew-limited,
// centripetal λθθ̇² = γ̄S gives θ(t) = (3/2·√(γ̄S/λ)·t)^{2/3}, T =
// 2/3·θmax^{3/2}·√(λ/(γ̄S)), which the exact optimum (also spending slew
// tangentially) exceeds slightly.
func TestSpiralRegimes(t *testing.T) {
	amp := baseSpiral()
	amp.GMax, amp.SMax = 0.01, 1e5
	slew := baseSpiral()
	slew.GMax = 10
	for _, c := range []struct {
		name string
		sp   SpiralSpec
		tol  float64
	}{{"amplitude-limited", amp, 0.01}, {"slew-limited", slew, 0.03}} {
		d, err := DesignSpiral(c.sp)
		if err != nil {
			t.Fatal(err)
		}
		lam := float64(c.sp.Interleaves) / (2 * math.Pi * c.sp.FOV)
		thmax := float64(c.sp.N) / 2 / c.sp.FOV / lam
		var want float64
		if c.name == "amplitude-limited" {
			L := lam / 2 * (thmax*math.Sqrt(1+thmax*thmax) + math.Asinh(thmax))
			want = L / (GammaBar * c.sp.GMax)
		} else {
			want = 2.0 / 3 * math.Pow(thmax, 1.5) * math.Sqrt(lam/(GammaBar*c.sp.SMax))
		}
		if d.Readout < want*(1-1e-3) || d.Readout > want*(1+c.tol) {
			t.Errorf("%s: readout %.4f ms, closed form %.4f ms (allowed +%.0f%%)", c.name, d.Readout*1e3, want*1e3, c.tol*100)
		}
		t.Logf("%s: readout %.4f ms, closed form %.4f ms", c.name, d.Readout*1e3, want*1e3)
	}
}

// TestSpiralArmSpacing: the n interleaves of a constant-density spiral cross
// the +kx axis one Nyquist step (1 cycle/FOV) apart; with edge
// undersampling α the gap at the edge is α steps (common practice; the design
// rule dr/dθ = n·u/(2π·FOV)).
func TestSpiralArmSpacing(t *testing.T) {
	for _, c := range []struct {
		alpha, dense float64
	}{{1, 1}, {2.5, 0.3}} {
		sp := baseSpiral()
		sp.EdgeUndersampling, sp.DenseFraction = c.alpha, c.dense
		s, _, err := Spiral(sp)
		if err != nil {
			t.Fatal(err)
		}
		var cross []float64
		for i := 0; i+1 < len(s.K); i++ {
			if (i+1)%s.ShotLen == 0 {
				continue // do not join two interleaves
			}
			a, b := s.K[i], s.K[i+1]
			if a[1] < 0 && b[1] >= 0 && a[0]+b[0] > 0 {
				f := -a[1] / (b[1] - a[1])
				cross = append(cross, a[0]+f*(b[0]-a[0]))
			}
		}
		sort.Float64s(cross)
		var inner, edge []float64
		for j := 1; j < len(cross); j++ {
			gap := cross[j] - cross[j-1]
			mid := (cross[j] + cross[j-1]) / 2
			if mid > 5 && mid < c.dense*64-2 {
				inner = append(inner, gap)
			}
			if mid > 58 && mid < 63 {
				edge = append(edge, gap)
			}
		}
		for _, g := range inner {
			if math.Abs(g-1) > 0.01 {
				t.Errorf("α=%g: gap %.4f cycles/FOV in the dense part, want 1", c.alpha, g)
			}
		}
		for _, g := range edge {
			want := sp.gapFactor(60/sp.FOV, 64/sp.FOV) // u near the edge
			if math.Abs(g-want) > 0.08*want {
				t.Errorf("α=%g: edge gap %.3f, want about %.3f", c.alpha, g, want)
			}
		}
		if len(edge) == 0 || (c.dense > 0.5 && len(inner) < 50) {
			t.Errorf("α=%g: too few crossings measured (%d inner, %d edge)", c.alpha, len(inner), len(edge))
		}
		// The weights cover the disc reached, π·(N/2)², within 1%.
		sum := 0.0
		for _, w := range s.Weights {
			sum += w
		}
		if disc := math.Pi * 64 * 64; math.Abs(sum-disc) > 0.01*disc {
			t.Errorf("α=%g: weights sum %.1f, disc %.1f", c.alpha, sum, disc)
		}
	}
}

func TestSpiralReference(t *testing.T) {
	sp := baseSpiral()
	s, d, err := Spiral(sp)
	if err != nil {
		t.Fatal(err)
	}
	if s.FullShots != sp.Interleaves || s.R != 1 {
		t.Errorf("constant density: reference %d, R %g; want %d, 1", s.FullShots, s.R, sp.Interleaves)
	}
	vd := sp
	vd.EdgeUndersampling, vd.DenseFraction = 3, 0.2
	s2, d2, err := Spiral(vd)
	if err != nil {
		t.Fatal(err)
	}
	if !(s2.R > 1.2 && s2.R < 3) || d2.Readout >= d.Readout {
		t.Errorf("variable density α=3: R = %g (want in (1.2, 3)), readout %.3f ms vs %.3f ms", s2.R, d2.Readout*1e3, d.Readout*1e3)
	}
	// The reference is the least constant-density count that fits.
	ref := sp
	ref.Interleaves = s2.FullShots
	dr, _ := DesignSpiral(ref)
	ref.Interleaves = s2.FullShots - 1
	dr1, _ := DesignSpiral(ref)
	if dr.Readout > d2.Readout || dr1.Readout <= d2.Readout {
		t.Errorf("reference %d: readout %.4f ms (with one fewer %.4f ms) against %.4f ms", s2.FullShots, dr.Readout*1e3, dr1.Readout*1e3, d2.Readout*1e3)
	}
	t.Logf("N=128 FOV 24 cm, 8 interleaves, 40 mT/m, 150 T/m/s: readout %.3f ms; α=3 from 0.2·kmax: %.3f ms, reference %d, R %.3f", d.Readout*1e3, d2.Readout*1e3, s2.FullShots, s2.R)
	// Interleaves are rotated copies, 360°/n apart.
	for i, a := range s.Angles {
		if math.Abs(a-360*float64(i)/8) > 1e-12 {
			t.Errorf("interleave %d at %g°", i, a)
		}
	}
}

func TestSpiralBadInput(t *testing.T) {
	mod := func(f func(*SpiralSpec)) SpiralSpec { s := baseSpiral(); f(&s); return s }
	cases := []struct {
		sp      SpiralSpec
		wantErr string
	}{
		{mod(func(s *SpiralSpec) { s.Interleaves = 0 }), "interleaves = 0"},
		{mod(func(s *SpiralSpec) { s.GMax = 0 }), "gradient limit"},
		{mod(func(s *SpiralSpec) { s.SMax = -1 }), "slew-rate limit"},
		{mod(func(s *SpiralSpec) { s.FOV = 0 }), "FOV"},
		{mod(func(s *SpiralSpec) { s.Dt = 0 }), "sampling interval"},
		{mod(func(s *SpiralSpec) { s.EdgeUndersampling = 0.5 }), "edge undersampling"},
		{mod(func(s *SpiralSpec) { s.DenseFraction = 1.5 }), "dense fraction"},
		{mod(func(s *SpiralSpec) { s.MaxReadout = 1e-3 }), "exceeds the maximum"},
	}
	for _, c := range cases {
		_, _, err := Spiral(c.sp)
		if err == nil || !strings.Contains(err.Error(), c.wantErr) {
			t.Errorf("error %v, want containing %q", err, c.wantErr)
		}
	}
}
