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
