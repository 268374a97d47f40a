package odt_test

import (
	"fmt"
	"math/rand/v2"

	"accelplan/priors"
	"accelplan/simulate"
	"accelplan/simulate/nufft"
	"accelplan/simulate/odt"
)

// From plan keys to first-Born data of the demo cell: the setup, a fan of
// illuminations, the arcs they measure, the encoding operator and the data
// drawn from the cell's exact spectrum, with field noise for an SNR of 200.
func ExampleNewOperator() {
	s := odt.Setup{Wavelength: 0.532, Medium: 1.333, NAIllumination: 0.4, NADetection: 0.5, FOV: 16, Grid: 64}
	ill, err := odt.Illuminations(s, "fan", 9)
	if err != nil {
		fmt.Println(err)
		return
	}
	arcs, err := odt.NewArcs(s, ill)
	if err != nil {
		fmt.Println(err)
		return
	}
	op, err := odt.NewOperator(arcs, nufft.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	y, err := odt.BornData(arcs, odt.DemoCell())
	if err != nil {
		fmt.Println(err)
		return
	}
	sigma, _ := odt.NoiseSigma(200)
	simulate.AddNoise(y, sigma, rand.New(rand.NewPCG(1, 2)))
	fmt.Printf("%d illuminations × %d detector frequencies = %d data for a %d-pixel image\n",
		len(ill), arcs.PerShot, op.DataLen(), op.ImageLen())
	fmt.Printf("transverse reach %.1f cycles/FOV, minimum grid %d\n", s.TransverseBound(), s.MinGrid())
	// Output:
	// 9 illuminations × 31 detector frequencies = 279 data for a 4096-pixel image
	// transverse reach 27.1 cycles/FOV, minimum grid 56
}

// Out-of-range plan values are refused with the key and the allowed range.
func ExampleSetup_Validate() {
	s := odt.Setup{Wavelength: 0.532, Medium: 1.333, NAIllumination: 1.4, NADetection: 1.4, FOV: 16, Grid: 64}
	fmt.Println(s.Validate())
	// Output:
	// odt: na_illumination = 1.4: must be in (0, 1.333), below medium_index
}

// A box constraint as the prior of FISTA: projected, accelerated gradient
// descent that keeps the index contrast in [0, 0.1].
func ExampleBoxProjection() {
	s := odt.Setup{Wavelength: 0.532, Medium: 1.333, NAIllumination: 0.4, NADetection: 0.5, FOV: 16, Grid: 64}
	ill, _ := odt.Illuminations(s, "fan", 9)
	arcs, _ := odt.NewArcs(s, ill)
	op, _ := odt.NewOperator(arcs, nufft.Options{})
	y, _ := odt.BornData(arcs, odt.DemoCell())
	box, err := odt.BoxProjection(0, 0.1)
	if err != nil {
		fmt.Println(err)
		return
	}
	x, _, err := priors.FISTA(op, y, box, 1, priors.FISTAOptions{MaxIter: 50})
	if err != nil {
		fmt.Println(err)
		return
	}
	lo, hi := real(x[0]), real(x[0])
	for _, v := range x {
		lo, hi = min(lo, real(v)), max(hi, real(v))
	}
	fmt.Printf("inside the box: %v\n", lo >= 0 && hi <= 0.1 && box.Value(x) == 0)
	// Output:
	// inside the box: true
}

// Beyond Born: the total field of the demo cell by beam propagation, turned
// into Rytov data for the same operator.
func ExampleSimulateFields() {
	s := odt.Setup{Wavelength: 0.532, Medium: 1.333, NAIllumination: 0.4, NADetection: 0.5, FOV: 16, Grid: 64}
	ill, _ := odt.Illuminations(s, "fan", 3)
	arcs, _ := odt.NewArcs(s, ill)
	fields, err := odt.SimulateFields(arcs, odt.DemoCell(), odt.BPMOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	lin, err := odt.NewLinearizer(arcs, fields.Oversample, fields.Span)
	if err != nil {
		fmt.Println(err)
		return
	}
	y := make([]complex128, arcs.Len())
	if err := lin.Data(y, fields, odt.RytovField); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d fields of %d samples over %d FOVs -> %d %v data\n",
		len(fields.Shots), fields.Pixels, fields.Span, len(y), odt.RytovField)
	// Output:
	// 3 fields of 384 samples over 3 FOVs -> 93 rytov data
}

// The demo cell: its largest index, the phase delay it imposes (far beyond
// the weak-scattering regime of the first Born approximation) and its truth
// image on a 64² grid of a 16 µm FOV.
func ExampleDemoCell() {
	cell := odt.DemoCell()
	if err := cell.Validate(); err != nil {
		fmt.Println(err)
		return
	}
	dn, err := cell.Contrast(16)
	if err != nil {
		fmt.Println(err)
		return
	}
	truth := dn.Rasterize(64, 64)
	var peak float64
	for _, v := range truth {
		peak = max(peak, v)
	}
	fmt.Printf("index in the nucleolus %.3f\n", cell.Index(-1.3, 0.5))
	fmt.Printf("phase delay at 532 nm: %.1f rad\n", cell.MaxPhase(0.532, 0.01))
	fmt.Printf("largest pixel of the 64² truth: %.3f\n", peak)
	// Output:
	// index in the nucleolus 1.375
	// phase delay at 532 nm: 2.4 rad
	// largest pixel of the 64² truth: 0.045
}
