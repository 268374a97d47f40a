package plans

import (
	"fmt"
	"strings"

	"accelplan/simulate/odt"
	"accelplan/trajectories"
)

var odtPhantoms = []string{"demo-cell"}

// odtSpecimen returns the specimen a plan names.
func odtSpecimen(name string) odt.Specimen { return odt.DemoCell() }

// odtSetup returns the instrument of an ODT plan.
func odtSetup(p *Plan) odt.Setup {
	m := p.Micro
	return odt.Setup{Wavelength: m.WavelengthUm, Medium: m.MediumIndex, NAIllumination: m.NAIllumination,
		NADetection: m.NADetection, FOV: p.Object.FOVum, Grid: p.Object.Grid}
}

// ODTTime returns the acquisition time in seconds of an illumination set:
// illuminations × (exposure + settling), the settling being the time the
// beam scanner needs between angles (common practice).
func ODTTime(exposureMs, settlingMs float64, illuminations int) float64 {
	return float64(illuminations) * (exposureMs + settlingMs) / 1000
}

// odt validates a plan of modality odt.
func (v *validator) odt(p *Plan) {
	if p.Scanner != (Scanner{}) {
		v.fail("scanner", -1, "", "a [scanner] table does not apply to modality odt", "describe the instrument in [microscope]")
	}
	o := &p.Object
	if o.PhaseLines != 0 || o.ReadoutPoints != 0 || o.FOVmm != 0 {
		v.fail("object", -1, "phase_lines", "phase_lines, readout_points and fov_mm describe an MRI matrix", "use grid and fov_um for modality odt")
	}
	if o.Phantom == "" {
		o.Phantom = odtPhantoms[0]
	}
	if !oneOf(o.Phantom, odtPhantoms) {
		v.fail("object", -1, "phantom", fmt.Sprintf("unknown specimen %q", o.Phantom), "choose one of: "+strings.Join(odtPhantoms, ", "))
	}
	if o.Grid < 16 || o.Grid > 1024 {
		v.fail("object", -1, "grid", fmt.Sprintf("must be between 16 and 1024, got %d", o.Grid), "the reconstruction grid is grid × grid")
	}
	if !(o.FOVum > 0) || !finite(o.FOVum) || o.FOVum > 10000 {
		v.fail("object", -1, "fov_um", fmt.Sprintf("must be a positive number of micrometres, got %v", o.FOVum), "")
	}
	o.PhaseLines, o.ReadoutPoints = o.Grid, o.Grid
	m := &p.Micro
	if m.MediumIndex == 0 {
		m.MediumIndex = odtSpecimen(o.Phantom).Medium
	}
	if !(m.WavelengthUm > 0) || !finite(m.WavelengthUm) || m.WavelengthUm > 100 {
		v.fail("microscope", -1, "wavelength_um", fmt.Sprintf("must be between 0 and 100 µm, got %v", m.WavelengthUm), "e.g. 0.532 for a green laser")
	}
	if !(m.MediumIndex >= 1) || !finite(m.MediumIndex) || m.MediumIndex > 4 {
		v.fail("microscope", -1, "medium_index", fmt.Sprintf("must be between 1 and 4, got %v", m.MediumIndex), "1.333 for water")
	}
	if !(m.NAIllumination > 0) || m.NAIllumination >= m.MediumIndex {
		v.fail("microscope", -1, "na_illumination", fmt.Sprintf("must lie strictly between 0 and the medium index %v, got %v", m.MediumIndex, m.NAIllumination), "")
	}
	if m.NADetection == 0 {
		m.NADetection = m.NAIllumination
	}
	if !(m.NADetection >= m.NAIllumination) || m.NADetection >= m.MediumIndex {
		v.fail("microscope", -1, "na_detection", fmt.Sprintf("must lie between na_illumination %v and the medium index %v, got %v", m.NAIllumination, m.MediumIndex, m.NADetection), "")
	}
	if !(m.ExposureMs > 0) || !finite(m.ExposureMs) || m.ExposureMs > 60000 {
		v.fail("microscope", -1, "exposure_ms", fmt.Sprintf("must be between 0 and 60000 ms, got %v", m.ExposureMs), "")
	}
	if !(m.SettlingMs >= 0) || !finite(m.SettlingMs) || m.SettlingMs > 60000 {
		v.fail("microscope", -1, "settling_ms", fmt.Sprintf("must be between 0 and 60000 ms, got %v", m.SettlingMs), "")
	}
	if !(m.FieldSNR > 0) || !finite(m.FieldSNR) || m.FieldSNR > 1e6 {
		v.fail("microscope", -1, "field_snr", fmt.Sprintf("must be a positive number, got %v", m.FieldSNR), "incident field amplitude over the noise σ per detector pixel")
	}
	if v.err == nil {
		s := odtSetup(p)
		if err := s.Validate(); err != nil {
			v.fail("microscope", -1, "", err.Error(), "")
		} else if mg := s.MinGrid(); o.Grid < mg {
			v.fail("object", -1, "grid", fmt.Sprintf("%d is too coarse for the spectrum this instrument reaches; it needs at least %d", o.Grid, mg),
				"raise grid or lower fov_um")
		}
	}
	if len(p.Schemes) == 0 {
		v.fail("", -1, "", "the plan has no [[scheme]]", "add at least one [[scheme]] with pattern = \"fan\" and illuminations = [...]")
	}
	for i := range p.Schemes {
		v.odtScheme(p, i)
	}
	if len(p.Recons) == 0 {
		v.fail("", -1, "", "the plan has no [[recon]]", "add at least one [[recon]] table")
	}
	for i := range p.Recons {
		v.recon(p, i)
	}
	v.accept(p)
	v.noiseMaps(p)
}

func (v *validator) odtScheme(p *Plan, i int) {
	s := &p.Schemes[i]
	if s.Pattern != PatternFan && s.Pattern != PatternFanGolden {
		v.fail("scheme", i, "pattern", fmt.Sprintf("pattern %q is not an illumination set", s.Pattern), "choose fan or fan-golden for modality odt")
		return
	}
	if s.Label == "" {
		s.Label = fmt.Sprintf("%s %d", s.Pattern, i+1)
	}
	if s.Accelerations != nil || s.Interleaves != nil || s.CalibrationLines != 0 || s.SpokeOrder != "" {
		v.fail("scheme", i, "accelerations", "an illumination set is given by its counts", "list illuminations = [...]; the achieved R is reported")
	}
	if len(s.Illuminations) == 0 {
		v.fail("scheme", i, "illuminations", "missing or empty", "list the illumination counts to try, e.g. [60, 30, 15, 8]")
	}
	for _, n := range s.Illuminations {
		if n < 1 || n > 10000 {
			v.fail("scheme", i, "illuminations", fmt.Sprintf("%d must be between 1 and 10000", n), "")
		}
		s.Accelerations = append(s.Accelerations, float64(n))
	}
	sortUnique(v, s, i)
}

// boxRecon checks a box-constrained reconstruction.
func (v *validator) boxRecon(p *Plan, i int) {
	r := &p.Recons[i]
	if r.Label == "" {
		r.Label = r.Method
	}
	if r.Wavelet != "" || r.Levels != 0 || r.Lambda != 0 || r.LambdaLook != nil {
		v.fail("recon", i, "wavelet", "fista-box has no regulariser weight or wavelet", "keep iterations and box")
	}
	if r.Iterations == 0 {
		r.Iterations = 60
	}
	if r.Iterations < 1 || r.Iterations > 10000 {
		v.fail("recon", i, "iterations", fmt.Sprintf("must be between 1 and 10000, got %d", r.Iterations), "")
	}
	if r.Box == nil {
		// Non-negativity, with a cap no real specimen reaches.
		r.Box = []float64{0, 1}
	}
	if len(r.Box) != 2 || !finite(r.Box[0]) || !finite(r.Box[1]) || !(r.Box[1] > r.Box[0]) {
		v.fail("recon", i, "box", fmt.Sprintf("must be [low, high] with low < high, got %v", r.Box), "e.g. [0, 0.1] for a non-negative index contrast")
	}
}

// odtCandidate builds the illumination set of count n.
func odtCandidate(p *Plan, s Scheme, n int) (trajectories.Sampling, error) {
	st := odtSetup(p)
	smp, _, err := trajectories.IlluminationSet(trajectories.IlluminationSpec{Pattern: s.Pattern, Count: n,
		Wavelength: st.Wavelength, Medium: st.Medium, NA: st.NAIllumination, NADetect: st.NADetection, FOV: st.FOV, N: st.Grid})
	return smp, err
}
