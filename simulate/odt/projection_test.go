package odt

import (
	"math"
	"testing"

	"accelplan/trajectories"
)

// radonFixture is testdata/radon_fixture.json, made by scikit-image 0.19.3
// (skimage.transform.radon) from a 256×256 raster of the demo cell's Born
// index contrast that the script computes by itself from the index (see
// testdata/make_radon_fixture.py).
type radonFixture struct {
	Medium      float64      `json:"medium"`
	FOV         float64      `json:"fov_um"`
	Grid        int          `json:"grid"`
	Bodies      [][6]float64 `json:"bodies"`
	Angles      []float64    `json:"angles_deg"`
	Projections [][]float64  `json:"projections"`
}

func loadRadon(t *testing.T) radonFixture {
	t.Helper()
	var fx radonFixture
	readJSON(t, "radon_fixture.json", &fx)
	cell := DemoCell()
	if fx.Medium != cell.Medium || len(fx.Bodies) != len(cell.Bodies) {
		t.Fatalf("fixture cell (medium %g, %d bodies) is not DemoCell", fx.Medium, len(fx.Bodies))
	}
	for i, b := range cell.Bodies {
		if got := [6]float64{b.DeltaN, b.X, b.Z, b.A, b.B, b.ThetaDeg}; got != fx.Bodies[i] {
			t.Fatalf("fixture body %d = %v, DemoCell has %v", i, fx.Bodies[i], got)
		}
	}
	return fx
}

// projSpectrum returns the Fourier transform in FOV units of a
// scikit-image projection (row sums in pixels of an n×n raster, index n/2 at
// s = 0): P(ω) = n⁻² Σ_c p[c]·exp(−2πi ω (c − n/2)/n), which by the
// projection-slice theorem (Kak & Slaney 1988, ch. 3) equals the object's 2D
// spectrum on the line through the origin perpendicular to the projection
// direction.
func projSpectrum(p []float64, omega float64) complex128 {
	n := len(p)
	var sum complex128
	for c, v := range p {
		s, co := math.Sincos(-2 * math.Pi * omega * float64(c-n/2) / float64(n))
		sum += complex(v*co, v*s)
	}
	return sum / complex(float64(n)*float64(n), 0)
}

// band is the frequency range (cycles per FOV) compared with the fixture:
// well inside the 256-pixel raster's band, where scikit-image's bilinear
// rotation barely attenuates the spectrum.
const band = 16.0

// The fixture obeys the projection-slice theorem against the cell's exact
// spectrum: the check of both conventions (scikit-image's angle and centre,
// our spectrum's axes) that the arc comparison below relies on.
func TestRadonFixtureMatchesExactSpectrum(t *testing.T) {
	fx := loadRadon(t)
	pot, err := DemoCell().Potential(fx.FOV)
	if err != nil {
		t.Fatal(err)
	}
	for k, deg := range fx.Angles {
		s, c := math.Sincos(deg * math.Pi / 180)
		var got, want []complex128
		for w := -band; w <= band; w += 0.5 {
			got = append(got, projSpectrum(fx.Projections[k], w))
			want = append(want, pot.Spectrum(w*c, -w*s))
		}
		e := relErr(got, want)
		t.Logf("θ = %g°: ‖radon spectrum − exact slice‖/‖exact‖ = %.3g", deg, e)
		if e > 0.002 {
			t.Errorf("θ = %g°: projection spectrum differs from the exact slice by %.3g, want ≤ 0.002", deg, e)
		}
	}
}

// As the wavelength shrinks, each illumination's Ewald arc flattens into the
// line through the origin perpendicular to the illumination, and the Born
// data, freed of their physical factor, converge to the spectrum of the
// scikit-image projection along the illumination direction.
func TestArcsFlattenIntoProjectionSlices(t *testing.T) {
	fx := loadRadon(t)
	cell := DemoCell()
	ill := make([]trajectories.Illumination, len(fx.Angles))
	for k, deg := range fx.Angles {
		ill[k] = trajectories.Illumination{Dir: tilted(deg)}
	}
	prev := math.Inf(1)
	for _, lambda := range []float64{0.5, 0.1, 0.02, 0.004} {
		s := Setup{Wavelength: lambda, Medium: fx.Medium, NAIllumination: 1.1, NADetection: 1.1, FOV: fx.FOV, Grid: fx.Grid}
		a, err := NewArcs(s, ill)
		if err != nil {
			t.Fatal(err)
		}
		born, err := BornData(a, cell)
		if err != nil {
			t.Fatal(err)
		}
		var got, want []complex128
		var sag float64
		for k := range born {
			shot := k / a.PerShot
			sn, cs := math.Sincos(fx.Angles[shot] * math.Pi / 180)
			omega := a.KX[k]*cs - a.KZ[k]*sn // along the line
			if math.Abs(omega) > band {
				continue
			}
			sag = max(sag, math.Abs(a.KX[k]*sn+a.KZ[k]*cs)) // off the line
			got = append(got, born[k]/(a.Factor[k]*complex(float64(s.Grid), 0)))
			want = append(want, projSpectrum(fx.Projections[shot], omega))
		}
		e := relErr(got, want)
		t.Logf("λ = %g µm: %d samples, arc sagitta %.3g cycles/FOV, ‖data − projection spectrum‖/‖·‖ = %.3g", lambda, len(got), sag, e)
		if e >= prev {
			t.Errorf("λ = %g µm: error %.3g did not fall from %.3g", lambda, e, prev)
		}
		prev = e
	}
	if prev > 0.002 {
		t.Errorf("at λ = 0.004 µm the arc data differ from the projection spectra by %.3g, want ≤ 0.002", prev)
	}
}
