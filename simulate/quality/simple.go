package quality

import (
	"fmt"
	"math"
)

// NRMSE returns the normalised root-mean-square error ‖x−ref‖₂/‖ref‖₂ over
// the pixels of roi (nil = all pixels). This is the "euclidean" normalisation
// of scikit-image's normalized_root_mse(ref, x) (textbook definition). It is 0
// when x equals ref (also when both are all zero) and +Inf when ref is zero on
// the roi but x is not. It returns NaN for mismatched lengths or an empty roi.
func NRMSE(x, ref []float64, roi []bool) float64 {
	if checkPair(x, ref, roi) != nil {
		return math.NaN()
	}
	var num, den float64
	for i, r := range ref {
		if roi != nil && !roi[i] {
			continue
		}
		d := x[i] - r
		num += d * d
		den += r * r
	}
	if num == 0 {
		return 0
	}
	return math.Sqrt(num / den)
}

// MSE returns the mean squared difference between x and ref over the pixels
// of roi (nil = all pixels), or NaN for mismatched lengths or an empty roi.
func MSE(x, ref []float64, roi []bool) float64 {
	if checkPair(x, ref, roi) != nil {
		return math.NaN()
	}
	var sum float64
	n := 0
	for i, r := range ref {
		if roi != nil && !roi[i] {
			continue
		}
		d := x[i] - r
		sum += d * d
		n++
	}
	return sum / float64(n)
}

// PSNR returns the peak signal-to-noise ratio 10·log10(L²/MSE) in decibels,
// with L = dataRange and the MSE taken over the pixels of roi (nil = all
// pixels); textbook definition, as scikit-image's peak_signal_noise_ratio(ref,
// x, data_range=L). It is +Inf for identical images and NaN for mismatched
// lengths, an empty roi or a dataRange that is not a positive finite number.
func PSNR(x, ref []float64, roi []bool, dataRange float64) float64 {
	if !(dataRange > 0) || math.IsInf(dataRange, 1) {
		return math.NaN()
	}
	mse := MSE(x, ref, roi)
	if math.IsNaN(mse) {
		return mse
	}
	if mse == 0 {
		return math.Inf(1)
	}
	return 10 * math.Log10(dataRange*dataRange/mse)
}

// checkPair reports whether x, ref and roi agree in length and roi selects at
// least one pixel.
func checkPair(x, ref []float64, roi []bool) error {
	if len(x) != len(ref) {
		return fmt.Errorf("quality: image has %d values but reference has %d", len(x), len(ref))
	}
	if len(ref) == 0 {
		return fmt.Errorf("quality: images are empty")
	}
	return checkROI(roi, len(ref))
}

func checkROI(roi []bool, n int) error {
	if roi == nil {
		return nil
	}
	if len(roi) != n {
		return fmt.Errorf("quality: roi has %d values but the image has %d", len(roi), n)
	}
	for _, b := range roi {
		if b {
			return nil
		}
	}
	return fmt.Errorf("quality: roi selects no pixel")
}

func checkImage(name string, v []float64, ny, nx int) error {
	if len(v) != ny*nx {
		return fmt.Errorf("quality: %s has %d values, want %d (%d×%d)", name, len(v), ny*nx, ny, nx)
	}
	return nil
}
