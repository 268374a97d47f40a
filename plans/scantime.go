package plans

import (
	"fmt"
	"math"
)

// Cartesian2DTime returns the scan time in seconds of a 2D Cartesian
// acquisition: TR × ⌈lines / echo train length⌉ × averages, slices
// interleaved within the TR (Bernstein, King, Zhou, Handbook of MRI Pulse
// Sequences, 2004; Haacke et al. 1999). The number of echo trains is rounded
// up because a scanner cannot play a fraction of one; when the echo train
// length divides the line count this is the handbook's
// TR × lines × averages / echo train length.
func Cartesian2DTime(trMs float64, lines, echoTrain, averages int) float64 {
	if echoTrain < 1 {
		echoTrain = 1
	}
	shots := math.Ceil(float64(lines) / float64(echoTrain))
	return trMs / 1000 * shots * float64(averages)
}

// ShotTime returns the scan time in seconds of an acquisition that plays one
// shot (a radial spoke or a spiral interleave) per TR: TR × shots × averages
// (Bernstein et al. 2004).
func ShotTime(trMs float64, shots, averages int) float64 {
	return trMs / 1000 * float64(shots) * float64(averages)
}

// ScanTime returns the scan time in seconds of shots of scheme s under p's
// scanner: Budget(p, s, shots).Total.
func ScanTime(p *Plan, s Scheme, shots int) float64 { return Budget(p, s, shots).Total }

// TimeBudget breaks a protocol's time down.
type TimeBudget struct {
	Imaging     float64 // the acquisition proper, all averages and concatenations
	Dummy       float64 // dummy TRs played before each concatenation to reach steady state
	Calibration float64 // a separate calibration scan (e.g. coil sensitivities)
	Total       float64
	Shots       int    // shots played per concatenation and average, phase oversampling included
	Formula     string // how Imaging was computed, for tables
}

// Budget returns the time budget of shots of scheme s under p's scanner
// (Bernstein, King, Zhou, Handbook of MRI Pulse Sequences, 2004; common
// practice):
//
//   - 2D Cartesian: TR × ⌈lines·(1 + phase oversampling) / echo train⌉ ×
//     averages × concatenations, the slices of one concatenation
//     interleaved within the TR;
//   - radial and spiral: TR × shots × averages × concatenations;
//   - dummy scans: dummy TRs × TR × concatenations; a calibration scan adds
//     its own duration;
//   - ODT: illuminations × (exposure + settling).
func Budget(p *Plan, s Scheme, shots int) TimeBudget {
	if p.Modality == ModalityODT {
		t := ODTTime(p.Micro.ExposureMs, p.Micro.SettlingMs, shots)
		return TimeBudget{Imaging: t, Total: t, Shots: shots,
			Formula: fmt.Sprintf("%d illuminations × (%g + %g) ms", shots, p.Micro.ExposureMs, p.Micro.SettlingMs)}
	}
	sc := p.Scanner
	conc := max(sc.Concatenations, 1)
	var b TimeBudget
	if s.NonCartesian() {
		b.Shots = shots
		b.Imaging = ShotTime(sc.TRms, shots, sc.Averages) * float64(conc)
		b.Formula = fmt.Sprintf("TR %g ms × %d shots × %d averages × %d concatenations", sc.TRms, shots, sc.Averages, conc)
	} else {
		lines := int(math.Ceil(float64(shots) * (1 + sc.PhaseOversampling)))
		etl := max(sc.EchoTrain, 1)
		b.Shots = lines
		b.Imaging = Cartesian2DTime(sc.TRms, lines, etl, sc.Averages) * float64(conc)
		b.Formula = fmt.Sprintf("TR %g ms × ⌈%d lines / %d echoes⌉ × %d averages × %d concatenations", sc.TRms, lines, etl, sc.Averages, conc)
	}
	b.Dummy = float64(sc.DummyScans) * sc.TRms / 1000 * float64(conc)
	b.Calibration = sc.CalibrationScanS
	b.Total = b.Imaging + b.Dummy + b.Calibration
	return b
}

// ShotName names what a shot of scheme s is, for tables.
func ShotName(s Scheme) string {
	switch s.Pattern {
	case PatternRadial:
		return "spokes"
	case PatternSpiral:
		return "interleaves"
	case PatternFan, PatternFanGolden:
		return "illuminations"
	case Pattern3DUniform, Pattern3DShifted, Pattern3DRandom, Pattern3DPoissonDisc:
		return "phase-encode points"
	}
	return "lines"
}
