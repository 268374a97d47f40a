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

// A 3D plan with a receive array: the ring surrounds the readout axis, so
// every readout plane sees the same sensitivities, and each plane's data are
// the exact coil-weighted spectra of its cut. Fully sampled, the
// sensitivity-weighted combination must reproduce the cuts as well as one
// uniform coil does (the same truncation, less noise per coil combined), and
// at R = 4 CG-SENSE must unfold what zero-filling leaves folded. Correlated
// coil noise is drawn and whitened plane by plane.
func TestCartesian3DWithCoils(t *testing.T) {
	single, err := Parse("3d.toml", []byte(plan3D))
	if err != nil {
		t.Fatal(err)
	}
	coilPlan := strings.Replace(plan3D, "reference_snr = 40", "reference_snr = 40\ncoils = 8\ncoil_noise_correlation = 0.2", 1)
	coilPlan = strings.Replace(coilPlan, `[[recon]]
method = "zero-filled"`, `[[recon]]
method = "zero-filled"
[[recon]]
method = "cg-sense"
lambda = 0.001`, 1)
	p, err := Parse("3d-coils.toml", []byte(coilPlan))
	if err != nil {
		t.Fatal(err)
	}
	o1, err := Run(context.Background(), single, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	o8, err := Run(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	a1, a8 := Analyse(o1), Analyse(o8)
	find := func(a *Analysis, cand int, method string) Row {
		t.Helper()
		for _, r := range a.Rows {
			if r.Candidate == cand && r.Method == method {
				return r
			}
		}
		t.Fatalf("no row for candidate %d, method %s", cand, method)
		return Row{}
	}
	full1, full8 := find(a1, 0, "zero-filled"), find(a8, 0, "zero-filled")
	t.Logf("R = 1 zero-filled NRMSE: one coil %.4f, 8 coils %.4f", full1.NRMSE.Mean, full8.NRMSE.Mean)
	if !(full8.NRMSE.Mean < 1.25*full1.NRMSE.Mean) {
		t.Errorf("fully sampled 8-coil combination NRMSE %.4f, one coil %.4f", full8.NRMSE.Mean, full1.NRMSE.Mean)
	}
	zf4, cg4 := find(a8, 1, "zero-filled"), find(a8, 1, "cg-sense")
	t.Logf("R = 4 lattice, 8 coils: zero-filled NRMSE %.4f, CG-SENSE %.4f", zf4.NRMSE.Mean, cg4.NRMSE.Mean)
	if !(cg4.NRMSE.Mean < 0.8*zf4.NRMSE.Mean) {
		t.Errorf("CG-SENSE at R = 4 (%.4f) does not unfold the zero-filled image (%.4f)", cg4.NRMSE.Mean, zf4.NRMSE.Mean)
	}
}

// The coil combination of the adjoint image divides by the diagonal of EᴴE
// at full sampling, which for the prewhitened SENSE operator is Sᴴ·Ψ⁻¹·S per
// pixel (Roemer et al. 1990; Pruessmann et al. 2001): checked against
// Adjoint∘Forward of the whitened operator (simulate.SENSE, whose whitening
// uses the Cholesky factor, not Ψ⁻¹) on a constant image, in 2D and for the
// stacked planes of 3D. With correlated noise the white-noise weight
// 1/Σ|S_c|² would be off by the factor the whitening adds.
func TestCoilCombinationUnbiased(t *testing.T) {
	coils := "reference_snr = 40\ncoils = 6\ncoil_noise_correlation = 0.3"
	for name, text := range map[string]string{
		"2D": strings.Replace(minimal, "reference_snr = 30", coils, 1),
		"3D": strings.Replace(plan3D, "reference_snr = 40", coils, 1),
	} {
		w, p := newTestWorker(t, text)
		env := w.env
		if env.coilNoise == nil || env.coilNoise.IsIdentity() {
			t.Fatalf("%s: no correlated coil noise", name)
		}
		var op simulate.Operator
		rows, cols := p.PlaneSize()
		full := make([]bool, rows*cols)
		for i := range full {
			full[i] = true
		}
		sense, err := simulate.NewCartesianSENSE(rows, cols, full, planeMaps(env), env.coilNoise)
		if err != nil {
			t.Fatal(err)
		}
		op = sense
		if p.Is3D() {
			op = planes3D{op: sense, planes: len(env.cuts)}
		}
		x := make([]complex128, op.ImageLen())
		for i := range x {
			x[i] = 1
		}
		y := make([]complex128, op.DataLen())
		op.Forward(y, x)
		op.Adjoint(x, y)
		if len(x) != len(env.combine) {
			t.Fatalf("%s: %d combination weights for %d pixels", name, len(env.combine), len(x))
		}
		worst := 0.0
		for i, v := range x {
			worst = math.Max(worst, math.Abs(real(v)*env.combine[i]-1)+math.Abs(imag(v)*env.combine[i]))
		}
		if worst > 1e-10 {
			t.Errorf("%s: combined full-sampling image of a constant is off by %.3g", name, worst)
		}
	}
}

// planeMaps returns the maps of one plane: the 2D maps, or in 3D one plane's.
func planeMaps(env *runEnv) [][]complex128 {
	if env.planeMaps != nil {
		return env.planeMaps
	}
	return env.maps
}
