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
	// MetricROIRMSE is the worst root-mean-square error against the truth
	// over the plan's [[roi]] regions (image intensity units); lower is
	// better.
	MetricROIRMSE = "roi-rmse"

	PhantomLowContrast = "low-contrast"
	PhantomResolution  = "resolution"
)

// taskPhantom returns the phantom named by an MRI plan and, for the task
// phantoms, the scorer of the task metric.
// taskScorer scores one image against the truth for a task-based metric.
type taskScorer func(img, truth []float64, rows, cols int) (float64, error)

func taskPhantom(p *Plan) (supportedPhantom, taskScorer, error) {
	fov := p.Object.FOVmm
	switch p.Object.Phantom {
	case PhantomLowContrast:
		ph, err := simulate.NewLowContrastPhantom(simulate.LowContrastSpec{FOVmm: fov})
		if err != nil {
			return nil, nil, err
		}
		score := func(img, _ []float64, rows, cols int) (float64, error) {
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
		score := func(img, _ []float64, rows, cols int) (float64, error) {
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
	var ph supportedPhantom = simulate.ModifiedSheppLogan()
	if p.Object.Phantom == PhantomImage && p.image != nil {
		ph = p.image
	}
	if p.Accept.Metric == MetricROIRMSE {
		return ph, roiScorer(p), nil
	}
	return ph, nil, nil
}

// ROI is a circular region of interest, centred at (x, y) in FOV units.
type ROI struct {
	Name     string  `toml:"name"`
	X        float64 `toml:"x"`
	Y        float64 `toml:"y"`
	RadiusMM float64 `toml:"radius_mm"`
}

// roiScorer returns the worst RMSE against the truth over the plan's ROIs
// (simulate/quality ROIStatistics). The masks are built on first use; the
// scorer belongs to one worker.
func roiScorer(p *Plan) taskScorer {
	var rois []quality.ROI
	return func(img, truth []float64, rows, cols int) (float64, error) {
		if rois == nil {
			g := quality.Grid{Nx: cols, Ny: rows, FOVmm: p.Object.FOVmm}
			for _, r := range p.ROIs {
				rois = append(rois, quality.ROI{Name: r.Name, Mask: g.CircleMask(r.X, r.Y, r.RadiusMM)})
			}
		}
		st, err := quality.ROIStatistics(img, truth, rois)
		if err != nil {
			return 0, err
		}
		worst := 0.0
		for _, r := range st {
			worst = math.Max(worst, r.RMSE)
		}
		return worst, nil
	}
}

// roiMetric validates the [[roi]] tables and their metric.
func (v *validator) roiMetric(p *Plan) {
	if p.Accept.Metric != MetricROIRMSE {
		if len(p.ROIs) > 0 {
			v.fail("roi", 0, "", "[[roi]] regions are scored by metric roi-rmse", "set accept.metric = \"roi-rmse\", or remove them")
		}
		return
	}
	if p.Is3D() || p.Modality == ModalityODT {
		v.fail("accept", -1, "metric", "roi-rmse is available for 2D MRI plans", "choose ssim, psnr or nrmse")
		return
	}
	if len(p.ROIs) == 0 {
		v.fail("accept", -1, "metric", "roi-rmse needs at least one [[roi]] table", "add [[roi]] with name, x, y (FOV units) and radius_mm")
	}
	pix := p.Object.FOVmm / float64(max(p.Object.PhaseLines, p.Object.ReadoutPoints))
	for i, r := range p.ROIs {
		switch {
		case !finite(r.X) || !finite(r.Y) || math.Abs(r.X) >= 0.5 || math.Abs(r.Y) >= 0.5:
			v.fail("roi", i, "x", fmt.Sprintf("centre (%v, %v) is outside the field of view", r.X, r.Y), "x and y in FOV units, within (−0.5, 0.5)")
		case !(r.RadiusMM >= pix) || r.RadiusMM > p.Object.FOVmm/2:
			v.fail("roi", i, "radius_mm", fmt.Sprintf("must be between one pixel (%.2g mm) and half the FOV, got %v", pix, r.RadiusMM), "")
		}
	}
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
	case MetricROIRMSE:
	default:
		if a.Contrast != 0 {
			v.fail("accept", -1, "contrast", "applies to metric smallest-disc only", "remove it")
		}
	}
}
