package quality_test

import (
	"fmt"
	"math"

	"accelplan/simulate/quality"
)

// A disc on a dark background and a copy with a faint ripple; invented data.
func exampleImages() (x, ref []float64, roi []bool, ny, nx int) {
	ny, nx = 32, 32
	x, ref, roi = make([]float64, ny*nx), make([]float64, ny*nx), make([]bool, ny*nx)
	for i := range ny {
		for j := range nx {
			r := math.Hypot(float64(i-16), float64(j-16))
			if r < 10 {
				ref[i*nx+j] = 1
				roi[i*nx+j] = true
			}
			x[i*nx+j] = ref[i*nx+j] + 0.05*math.Sin(float64(i+2*j))
		}
	}
	return
}

func Example() {
	x, ref, roi, ny, nx := exampleImages()
	fmt.Printf("NRMSE %.4f\n", quality.NRMSE(x, ref, nil))
	fmt.Printf("PSNR  %.2f dB\n", quality.PSNR(x, ref, nil, 1))
	fmt.Printf("SSIM  %.4f (roi %.4f)\n", quality.SSIM(x, ref, ny, nx, nil, 1), quality.SSIM(x, ref, ny, nx, roi, 1))
	fmt.Printf("HFEN  %.4f\n", quality.HFEN(x, ref, ny, nx, nil))
	// Output:
	// NRMSE 0.0648
	// PSNR  29.03 dB
	// SSIM  0.8805 (roi 0.8298)
	// HFEN  0.0208
}

// Score many reconstructions of one size with a plan: no allocation per call,
// and errors that say what is wrong.
func ExampleSSIMPlan() {
	x, ref, _, ny, nx := exampleImages()
	plan, err := quality.NewSSIMPlan(ny, nx, 1)
	if err != nil {
		fmt.Println(err)
		return
	}
	interior, _ := plan.Mean(x, ref, nil, quality.AverageInterior)
	all, _ := plan.Mean(x, ref, nil, quality.AverageAll)
	fmt.Printf("interior %.4f, all pixels %.4f\n", interior, all)
	_, err = plan.Mean(x[:10], ref, nil, quality.AverageAll)
	fmt.Println(err)
	// Output:
	// interior 0.8805, all pixels 0.7247
	// quality: image has 10 values, want 1024 (32×32)
}
