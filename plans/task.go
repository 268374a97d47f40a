package plans

import (
	"fmt"
	"math"

	"accelplan/simulate"
	"accelplan/simulate/quality"
)

// Task-based acceptance metrics, each defined for its own phantom:
//
//   - "smallest-disc": the diameter in mm of the smallest disc of the
//     low-contrast phantom detected, at the contrast [accept] names, with
//     every larger disc detected too (Rose criterion, CNR·√(A/a) ≥ 5;
//     simulate/quality.DetectDiscs). Lower is better; a draw that detects no
//     disc scores +Inf.
//   - "mtf50": the spatial frequency in cycles/mm where the modulation
//     transfer function measured on the resolution phantom's slanted edges
//     falls to one half, the worse of the two directions (ISO 12233 slanted
//     edge method, common practice). Higher is better.
const (
	MetricSmallestDisc = "smallest-disc"
	MetricMTF50        = "mtf50"

	PhantomLowContrast = "low-contrast"
	PhantomResolution  = "resolution"
)

// taskPhantom returns the phantom named by an MRI plan and, for the task
// phantoms, the scorer of the task metric.
func taskPhantom(p *Plan) (supportedPhantom, func(img []float64, rows, cols int) (float64, error), error) {
	fov := p.Object.FOVmm
	switch p.Object.Phantom {
	case PhantomLowContrast:
		ph, err := simulate.NewLowContrastPhantom(simulate.LowContrastSpec{FOVmm: fov})
		if err != nil {
			return nil, nil, err
		}
		score := func(img []float64, rows, cols int) (float64, error) {
			g := quality.Grid{Nx: cols, Ny: rows, FOVmm: fov}
			d, err := quality.DetectDiscs(img, g, ph.Targets, quality.DetectOptions{NoiseROI: ph.NoiseROI(cols, rows)})
			if err != nil {
				return 0, err
			}
			mm, ok, err := d.Smallest(p.Accept.Contrast)
			if err != nil {
				return 0, err
			}
			if !ok {
				return math.Inf(1), nil
			}
			return mm, nil
		}
		return ph, score, nil
	case PhantomResolution:
		ph, err := simulate.NewResolutionPhantom(simulate.ResolutionSpec{FOVmm: fov})
		if err != nil {
			return nil, nil, err
		}
		score := func(img []float64, rows, cols int) (float64, error) {
			g := quality.Grid{Nx: cols, Ny: rows, FOVmm: fov}
			worst := math.Inf(1)
			for _, e := range ph.Edges {
				r, err := quality.EdgeResponse(img, g, e, quality.EdgeOptions{})
				if err != nil {
					return 0, err
				}
				worst = math.Min(worst, r.MTF50)
			}
			return worst, nil
		}
		return ph, score, nil
	}
	if p.Object.Phantom == PhantomImage && p.image != nil {
		return p.image, nil, nil
	}
	return simulate.ModifiedSheppLogan(), nil, nil
}

// taskMetric checks that a task metric fits the plan's phantom.
func (v *validator) taskMetric(p *Plan) {
	a := &p.Accept
	switch a.Metric {
	case MetricSmallestDisc:
		if p.Object.Phantom != PhantomLowContrast {
			v.fail("accept", -1, "metric", "smallest-disc is defined for the low-contrast phantom", "set object.phantom = \"low-contrast\", or choose ssim, psnr or nrmse")
		}
		if !(a.Contrast > 0) || a.Contrast >= 1 {
			v.fail("accept", -1, "contrast", fmt.Sprintf("must name one of the phantom's contrasts %v, got %v", simulate.DefaultLowContrastContrasts, a.Contrast), "e.g. contrast = 0.02")
			return
		}
		ok := false
		for _, c := range simulate.DefaultLowContrastContrasts {
			ok = ok || math.Abs(c-a.Contrast) < 1e-12
		}
		if !ok {
			v.fail("accept", -1, "contrast", fmt.Sprintf("the phantom has no row of contrast %v", a.Contrast), fmt.Sprintf("choose one of %v", simulate.DefaultLowContrastContrasts))
		}
	case MetricMTF50:
		if p.Object.Phantom != PhantomResolution {
			v.fail("accept", -1, "metric", "mtf50 is defined for the resolution phantom", "set object.phantom = \"resolution\", or choose ssim, psnr or nrmse")
		}
	default:
		if a.Contrast != 0 {
			v.fail("accept", -1, "contrast", "applies to metric smallest-disc only", "remove it")
		}
	}
}
