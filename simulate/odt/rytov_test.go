package odt

import (
	"math"
	"math/rand/v2"
	"testing"
)

// rytovSetup is a small setup for the beam-propagation checks.
func rytovArcs(t *testing.T) *Arcs {
	t.Helper()
	s := Setup{Wavelength: 0.532, Medium: 1.333, NAIllumination: 0.5, NADetection: 0.7, FOV: 16, Grid: 80}
	ill, err := Illuminations(s, "fan", 5)
	if err != nil {
		t.Fatal(err)
	}
	a, err := NewArcs(s, ill)
	if err != nil {
		t.Fatal(err)
	}
	return a
}

// linearised returns the Born and Rytov data of the BPM fields of sp.
func linearised(t *testing.T, a *Arcs, sp Specimen) (born, rytov []complex128) {
	t.Helper()
	f, err := SimulateFields(a, sp, BPMOptions{})
	if err != nil {
		t.Fatal(err)
	}
	lin, err := NewLinearizer(a, f.Oversample, f.Span)
	if err != nil {
		t.Fatal(err)
	}
	born, rytov = make([]complex128, a.Len()), make([]complex128, a.Len())
	if err := lin.Data(born, f, BornField); err != nil {
		t.Fatal(err)
	}
	if err := lin.Data(rytov, f, RytovField); err != nil {
		t.Fatal(err)
	}
	return born, rytov
}

// For a weak object the Born and Rytov linearisations of the same
// beyond-Born field agree, and both match the first-Born model; their
// difference is of second order in the index step, so scaling the cell's
// steps by ½ halves it (Kak & Slaney 1988, ch. 6: both are first-order
// approximations that differ at second order). Tolerance: the relative
// difference stays below the largest phase delay φ (in radians) and below
// 1%; the measured ratio to φ is about 0.45.
func TestBornAndRytovAgreeForWeakObject(t *testing.T) {
	a := rytovArcs(t)
	var diffs []float64
	for _, f := range []float64{0.02, 0.01} {
		sp := scaled(DemoCell(), f)
		phi := sp.MaxPhase(a.Setup.Wavelength, 0.01)
		born, rytov := linearised(t, a, sp)
		model, err := BornData(a, sp)
		if err != nil {
			t.Fatal(err)
		}
		d := relErr(born, rytov)
		t.Logf("steps ×%g (φ = %.3f rad): Born vs Rytov %.3g, Born vs model %.3g, Rytov vs model %.3g",
			f, phi, d, relErr(born, model), relErr(rytov, model))
		if d > phi || d > 0.03 {
			t.Errorf("steps ×%g: Born and Rytov differ by %.3g, want ≤ φ = %.3g and ≤ 0.03", f, d, phi)
		}
		if e := relErr(rytov, model); e > 0.01 {
			t.Errorf("steps ×%g: Rytov data differ from the Born model by %.3g, want ≤ 0.01", f, e)
		}
		diffs = append(diffs, d)
	}
	if r := diffs[0] / diffs[1]; r < 1.8 || r > 2.2 {
		t.Errorf("halving the steps scaled the Born–Rytov difference by 1/%.3f, want 1/2 ± 0.2", r)
	}
}

// For the full cell, about 2.4 rad of phase delay, the Born linearisation of
// the true field is far from the first-Born model while the Rytov one stays
// close (the Rytov approximation holds for large objects of small index
// gradient; Kak & Slaney 1988, ch. 6; Devaney 1982).
func TestRytovOutlastsBornForStrongObject(t *testing.T) {
	a := rytovArcs(t)
	sp := DemoCell()
	born, rytov := linearised(t, a, sp)
	model, err := BornData(a, sp)
	if err != nil {
		t.Fatal(err)
	}
	eb, er := relErr(born, model), relErr(rytov, model)
	t.Logf("demo cell (φ = %.2f rad): Born field vs model %.3g, Rytov field vs model %.3g", sp.MaxPhase(a.Setup.Wavelength, 0.01), eb, er)
	if eb < 0.5 {
		t.Errorf("Born data within %.3g of the model; the cell should be beyond Born", eb)
	}
	if er > 0.05 {
		t.Errorf("Rytov data differ from the model by %.3g, want ≤ 0.05", er)
	}
}

// Without a specimen the propagated field is the incident plane wave itself
// (exact propagator), and the noise added to it reaches the data with
// standard deviation σ·√Span (Parseval's identity of the orthonormal DFT).
func TestEmptyFieldAndNoiseScaling(t *testing.T) {
	a := rytovArcs(t)
	// A specimen of the medium's own index scatters nothing.
	empty := Specimen{Medium: 1.333, Bodies: []Body{{DeltaN: 0, A: 1, B: 1}}}
	f, err := SimulateFields(a, empty, BPMOptions{})
	if err != nil {
		t.Fatal(err)
	}
	lin, err := NewLinearizer(a, f.Oversample, f.Span)
	if err != nil {
		t.Fatal(err)
	}
	y := make([]complex128, a.Len())
	if err := lin.Data(y, f, BornField); err != nil {
		t.Fatal(err)
	}
	var peak float64
	for _, v := range y {
		peak = max(peak, math.Hypot(real(v), imag(v)))
	}
	if peak > 1e-12 {
		t.Errorf("empty specimen scatters %.3g", peak)
	}
	const sigma = 0.01
	rng := rand.New(rand.NewPCG(11, 12))
	var sum float64
	var count int
	for range 20 {
		g := &Fields{Oversample: f.Oversample, Span: f.Span, Pixels: f.Pixels, Shots: make([][]complex128, len(f.Shots))}
		for i, u := range f.Shots {
			g.Shots[i] = append([]complex128(nil), u...)
		}
		AddFieldNoise(g, sigma, rng)
		if err := lin.Data(y, g, BornField); err != nil {
			t.Fatal(err)
		}
		for _, v := range y {
			sum += real(v)*real(v) + imag(v)*imag(v)
			count += 2
		}
	}
	got := math.Sqrt(sum / float64(count))
	want := sigma * math.Sqrt(float64(f.Span))
	t.Logf("data noise %.5f per channel from %d values, expected %.5f", got, count, want)
	if math.Abs(got-want) > 0.03*want {
		t.Errorf("data noise %.5f, want %.5f ± 3%%", got, want)
	}
}

func TestFieldsReject(t *testing.T) {
	a := rytovArcs(t)
	if _, err := SimulateFields(a, DemoCell(), BPMOptions{Pad: 1}); err == nil {
		t.Error("pad 1 accepted")
	}
	if _, err := SimulateFields(nil, DemoCell(), BPMOptions{}); err == nil {
		t.Error("nil arcs accepted")
	}
	lin, err := NewLinearizer(a, 2, 3)
	if err != nil {
		t.Fatal(err)
	}
	y := make([]complex128, a.Len())
	bad := &Fields{Oversample: 2, Span: 3, Pixels: 480, Shots: make([][]complex128, len(a.Illuminations))}
	for i := range bad.Shots {
		bad.Shots[i] = make([]complex128, 480) // all zero: no Rytov phase
	}
	if err := lin.Data(y, bad, RytovField); err == nil {
		t.Error("zero field accepted for Rytov")
	}
	bad.Pixels = 100
	if err := lin.Data(y, bad, BornField); err == nil {
		t.Error("wrong sample count accepted")
	}
}

// Linearizer.Data runs once per noise draw: it allocates nothing.
func TestLinearizerAllocatesNothing(t *testing.T) {
	a := rytovArcs(t)
	f, err := SimulateFields(a, scaled(DemoCell(), 0.1), BPMOptions{})
	if err != nil {
		t.Fatal(err)
	}
	lin, err := NewLinearizer(a, f.Oversample, f.Span)
	if err != nil {
		t.Fatal(err)
	}
	y := make([]complex128, a.Len())
	if n := testing.AllocsPerRun(3, func() { _ = lin.Data(y, f, RytovField) }); n != 0 {
		t.Errorf("%g allocations per Data call", n)
	}
}
