package plans

import "math"

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

// ScanTime returns the scan time of shots of scheme s under p's scanner:
// Cartesian2DTime for line sampling, ShotTime for radial and spiral.
func ScanTime(p *Plan, s Scheme, shots int) float64 {
	if p.Modality == ModalityODT {
		return ODTTime(p.Micro.ExposureMs, p.Micro.SettlingMs, shots)
	}
	if s.NonCartesian() {
		return ShotTime(p.Scanner.TRms, shots, p.Scanner.Averages)
	}
	return Cartesian2DTime(p.Scanner.TRms, shots, p.Scanner.EchoTrain, p.Scanner.Averages)
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
	}
	return "lines"
}
