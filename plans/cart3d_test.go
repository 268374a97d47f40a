package plans

import (
	"context"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"

	"accelplan/simulate"
)

const plan3D = `title = "3d"
seed = 9
repeats = 2
[object]
phase_lines = 48
partitions = 32
readout_points = 64
fov_mm = 220
readout_positions = [-0.05, 0.1]
[scanner]
tr_ms = 8
reference_snr = 40
[[scheme]]
pattern = "cartesian3d-uniform"
accelerations = [1, 4]
[[scheme]]
pattern = "cartesian3d-poisson-disc"
accelerations = [4]
calibration_lines = 8
calibration_partitions = 8
[[recon]]
method = "zero-filled"
[accept]
threshold = 0.5
`

// A 3D scan decouples along the fully sampled readout: the truth is the
// stack of the phantom's exact cuts, the operator acts plane by plane, and
// fully sampled zero-filling reproduces each cut up to noise.
func TestCartesian3DDecouples(t *testing.T) {
	p, err := Parse("3d.toml", []byte(plan3D))
	if err != nil {
		t.Fatal(err)
	}
	if r, c := p.ImageSize(); r != 2*32 || c != 48 {
		t.Fatalf("image size %d × %d, want 64 × 48", r, c)
	}
	o, err := Run(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	// Truth: plane q is SliceX(x_q) rasterised on nz × ny.
	ph := simulate.ModifiedSheppLogan3D()
	for q, x := range p.Object.ReadoutPositions {
		want := ph.SliceX(x).Rasterize(48, 32)
		got := o.Truth[q*32*48 : (q+1)*32*48]
		for i := range want {
			if math.Abs(got[i]-want[i]) > 1e-12 {
				t.Fatalf("plane %d pixel %d: truth %v, cut %v", q, i, got[i], want[i])
			}
		}
	}
	// Uniform R = 4 is 2 × 2 (Ry ≥ Rz, as square as possible).
	if c := o.Candidates[1]; c.Sampling.Shots != 48*32/4 {
		t.Errorf("R = 4 lattice acquires %d points, want %d", c.Sampling.Shots, 48*32/4)
	}
	a := Analyse(o)
	if full := a.Rows[0]; full.R != 1 || !(full.NRMSE.Mean < 0.2) {
		t.Errorf("fully sampled 3D plane stack: R %v, NRMSE %.3f", full.R, full.NRMSE.Mean)
	}
	if a.Rows[1].NRMSE.Mean <= a.Rows[0].NRMSE.Mean {
		t.Errorf("R = 4 no worse than full sampling")
	}
}

// The stacked-plane operator is block diagonal: its adjoint identity holds
// and planes do not mix.
func TestPlanes3DAdjoint(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	mask := make([]bool, 16*12)
	for i := range mask {
		mask[i] = rng.Float64() < 0.5
	}
	op, err := simulate.NewCartesian(16, 12, mask)
	if err != nil {
		t.Fatal(err)
	}
	b := planes3D{op: op, planes: 3}
	x := make([]complex128, b.ImageLen())
	y := make([]complex128, b.DataLen())
	for i := range x {
		x[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	for i := range y {
		y[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	ex := make([]complex128, b.DataLen())
	ehy := make([]complex128, b.ImageLen())
	b.Forward(ex, x)
	b.Adjoint(ehy, y)
	var l, r complex128
	for i := range ex {
		l += ex[i] * cmplx.Conj(y[i])
	}
	for i := range x {
		r += x[i] * cmplx.Conj(ehy[i])
	}
	if cmplx.Abs(l-r) > 1e-10*cmplx.Abs(l) {
		t.Errorf("⟨Ex,y⟩ = %v, ⟨x,Eᴴy⟩ = %v", l, r)
	}
	// A plane of zeros stays zero.
	for i := 16 * 12; i < 2*16*12; i++ {
		x[i] = 0
	}
	b.Forward(ex, x)
	for i := op.DataLen(); i < 2*op.DataLen(); i++ {
		if ex[i] != 0 {
			t.Fatal("planes mix")
		}
	}
}

func TestPlan3DRejects(t *testing.T) {
	for _, c := range []struct{ from, to, want string }{
		{`pattern = "cartesian3d-uniform"`, `pattern = "cartesian-uniform"`, "cannot run the 2D pattern"},
		{"readout_positions = [-0.05, 0.1]", "readout_positions = [0.7]", "outside the field of view"},
		{"calibration_partitions = 8", "calibration_partitions = 0", "calibration box"},
		{"accelerations = [1, 4]", "accelerations = [1, 2.5]", "whole number"},
	} {
		_, err := Parse("3d.toml", []byte(strings.Replace(plan3D, c.from, c.to, 1)))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q → %q: got %v, want %q", c.from, c.to, err, c.want)
		}
	}
}
