package odt

import (
	"testing"

	"accelplan/simulate/nufft"
)

// benchArcs is a sweep-sized ODT point: 256² grid, 32 illuminations.
func benchArcs(b *testing.B) *Arcs {
	s := Setup{Wavelength: 0.532, Medium: 1.333, NAIllumination: 1.0, NADetection: 1.2, FOV: 30, Grid: 256}
	ill, err := Illuminations(s, "fan", 32)
	if err != nil {
		b.Fatal(err)
	}
	a, err := NewArcs(s, ill)
	if err != nil {
		b.Fatal(err)
	}
	return a
}

// One Forward and one Adjoint, the cost of a gradient step.
func BenchmarkOperatorForwardAdjoint256(b *testing.B) {
	a := benchArcs(b)
	op, err := NewOperator(a, nufft.Options{})
	if err != nil {
		b.Fatal(err)
	}
	x, y := make([]complex128, op.ImageLen()), make([]complex128, op.DataLen())
	x[len(x)/2+3] = 1
	for b.Loop() {
		op.Forward(y, x)
		op.Adjoint(x, y)
	}
	b.ReportMetric(float64(op.DataLen()), "samples")
}

// Noiseless data from the exact spectrum of the demo cell.
func BenchmarkBornData256(b *testing.B) {
	a := benchArcs(b)
	cell := DemoCell()
	for b.Loop() {
		if _, err := BornData(a, cell); err != nil {
			b.Fatal(err)
		}
	}
}

// Beam propagation of one illumination through the demo cell, 128² grid,
// default options (2× finer, window 3 FOVs).
func BenchmarkSimulateFieldsPerIllumination128(b *testing.B) {
	s := Setup{Wavelength: 0.532, Medium: 1.333, NAIllumination: 0.5, NADetection: 0.7, FOV: 16, Grid: 128}
	ill, err := Illuminations(s, "fan", 1)
	if err != nil {
		b.Fatal(err)
	}
	a, err := NewArcs(s, ill)
	if err != nil {
		b.Fatal(err)
	}
	cell := DemoCell()
	for b.Loop() {
		if _, err := SimulateFields(a, cell, BPMOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}
