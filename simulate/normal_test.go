package simulate

import (
	"math"
	"math/rand/v2"
	"testing"

	"accelplan/simulate/nufft"
)

// TestCartesianNormal checks Normal against Adjoint∘Forward, the definition
// of the normal operator EᴴE (Forward and Adjoint are checked against
// go-dsp/gonum transforms elsewhere), for masks of whole rows (the
// column-transform path) and for masks that are not (the 2D path), on
// square, rectangular and odd grids.
func TestCartesianNormal(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 9))
	cases := []struct {
		name   string
		ny, nx int
		rows   bool // whole rows (phase-encode lines) or single samples
	}{
		{"lines 256²", 256, 256, true},
		{"lines 96×64", 96, 64, true},
		{"lines 30×20", 30, 20, true},
		{"lines 15×9", 15, 9, true},
		{"samples 64²", 64, 64, false},
		{"samples 15×9", 15, 9, false},
	}
	for _, c := range cases {
		mask := make([]bool, c.ny*c.nx)
		for m := range c.ny {
			take := r.Float64() < 0.3 || m == c.ny/2
			for n := range c.nx {
				if !c.rows {
					take = r.Float64() < 0.3
				}
				mask[m*c.nx+n] = take
			}
		}
		mask[c.ny/2*c.nx+c.nx/2] = true
		op, err := NewCartesian(c.ny, c.nx, mask)
		if err != nil {
			t.Fatal(err)
		}
		if (op.rows != nil) != c.rows {
			t.Fatalf("%s: row path %v, want %v", c.name, op.rows != nil, c.rows)
		}
		x := make([]complex128, op.ImageLen())
		for i := range x {
			x[i] = complex(r.NormFloat64(), r.NormFloat64())
		}
		y := make([]complex128, op.DataLen())
		want := make([]complex128, op.ImageLen())
		op.Forward(y, x)
		op.Adjoint(want, y)
		got := make([]complex128, op.ImageLen())
		op.Clone().Normal(got, x)
		if e := relDiff(got, want); e > 1e-13 {
			t.Errorf("%s: Normal differs from Adjoint∘Forward by %.3g (relative)", c.name, e)
		}
	}
}

// TestSENSENormal checks SENSE.Normal against Adjoint∘Forward (the
// definition of EᴴE) with and without prewhitening, over a Cartesian row
// mask (the per-coil column-transform path), a mask of single samples and a
// NUFFT (the fallback), with random complex sensitivities.
func TestSENSENormal(t *testing.T) {
	const ny, nx, coils = 32, 24, 4
	r := rand.New(rand.NewPCG(3, 8))
	maps := make([][]complex128, coils)
	for c := range maps {
		maps[c] = make([]complex128, ny*nx)
		for i := range maps[c] {
			maps[c][i] = complex(r.NormFloat64(), r.NormFloat64())
		}
	}
	psi := RingNoiseCovariance(coils, 0.3)
	rowMask := make([]bool, ny*nx)
	sampleMask := make([]bool, ny*nx)
	for m := range ny {
		take := m%3 == 0
		for n := range nx {
			rowMask[m*nx+n] = take
			sampleMask[m*nx+n] = r.Float64() < 0.4
		}
	}
	kx := make([]float64, 300)
	ky := make([]float64, 300)
	for i := range kx {
		kx[i] = (r.Float64() - 0.5) * float64(nx) * 0.9
		ky[i] = (r.Float64() - 0.5) * float64(ny) * 0.9
	}
	for _, white := range []bool{false, true} {
		var noise *NoiseCovariance
		if white {
			var err error
			if noise, err = NewNoiseCovariance(coils, psi); err != nil {
				t.Fatal(err)
			}
		}
		ops := map[string]func() (*SENSE, error){
			"row mask":    func() (*SENSE, error) { return NewCartesianSENSE(ny, nx, rowMask, maps, noise) },
			"sample mask": func() (*SENSE, error) { return NewCartesianSENSE(ny, nx, sampleMask, maps, noise) },
			"nufft":       func() (*SENSE, error) { return NewNUFFTSENSE(ny, nx, kx, ky, nufft.Options{}, maps, noise) },
		}
		for name, mk := range ops {
			op, err := mk()
			if err != nil {
				t.Fatal(err)
			}
			x := make([]complex128, op.ImageLen())
			for i := range x {
				x[i] = complex(r.NormFloat64(), r.NormFloat64())
			}
			y := make([]complex128, op.DataLen())
			want := make([]complex128, op.ImageLen())
			op.Forward(y, x)
			op.Adjoint(want, y)
			got := make([]complex128, op.ImageLen())
			for range 2 { // the second call runs on the kept scratch
				op.Normal(got, x)
			}
			if e := relDiff(got, want); e > 1e-12 {
				t.Errorf("%s, whitened %v: Normal differs from Adjoint∘Forward by %.3g (relative)", name, white, e)
			}
		}
	}
}

// relDiff returns ‖got − want‖/‖want‖.
func relDiff(got, want []complex128) float64 {
	var num, den float64
	for i := range got {
		d := got[i] - want[i]
		num += real(d)*real(d) + imag(d)*imag(d)
		den += real(want[i])*real(want[i]) + imag(want[i])*imag(want[i])
	}
	return math.Sqrt(num / den)
}
