// Package plans owns the plan file: its schema and validation, the expansion
// of a plan into sweep points, the scan-time models, the runner that simulates
// and reconstructs every point on a worker pool, and the statistics and the
// recommendation drawn from the results.
package plans

import (
	"bytes"
	"embed"
	"errors"
	"fmt"
	"math"
	"os"
	"sort"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"

	"accelplan/simulate"
	"accelplan/trajectories"
)

func trajectoriesRadialReference(n int, half bool) int {
	return trajectories.RadialReferenceSpokes(n, half)
}

//go:embed builtin/*.toml
var builtinFS embed.FS

// DefaultBuiltin is the name of the plan run when no plan file is given.
const DefaultBuiltin = "brain-t2-survey"

// BuiltinNames lists the built-in plans, the default first.
func BuiltinNames() []string {
	names := []string{DefaultBuiltin}
	ents, _ := builtinFS.ReadDir("builtin")
	for _, e := range ents {
		if n := strings.TrimSuffix(e.Name(), ".toml"); n != DefaultBuiltin {
			names = append(names, n)
		}
	}
	return names
}

// Builtin returns the text of the default built-in plan. It is annotated and
// doubles as the starter plan that users copy and edit.
func Builtin() []byte {
	b, err := BuiltinText(DefaultBuiltin)
	if err != nil {
		panic("plans: " + err.Error())
	}
	return b
}

// BuiltinText returns the text of the named built-in plan.
func BuiltinText(name string) ([]byte, error) {
	b, err := builtinFS.ReadFile("builtin/" + name + ".toml")
	if err != nil {
		return nil, fmt.Errorf("no built-in plan %q; choose one of: %s", name, strings.Join(BuiltinNames(), ", "))
	}
	return b, nil
}

// LoadBuiltinNamed returns the validated built-in plan of that name.
func LoadBuiltinNamed(name string) (*Plan, error) {
	b, err := BuiltinText(name)
	if err != nil {
		return nil, err
	}
	return Parse("built-in plan "+name, b)
}

// Plan is a validated plan file.
type Plan struct {
	// Modality is "mri" (the default) or "odt".
	Modality string `toml:"modality"`
	Title    string `toml:"title"`
	Seed     uint64 `toml:"seed"`
	Repeats  int    `toml:"repeats"`
	Output   string `toml:"output"`

	Object  Object     `toml:"object"`
	Scanner Scanner    `toml:"scanner"`
	Micro   Microscope `toml:"microscope"`
	Schemes []Scheme   `toml:"scheme"`
	Recons  []Recon    `toml:"recon"`
	Accept  Acceptance `toml:"accept"`
	// ROIs are the regions scored by metric roi-rmse.
	ROIs []ROI `toml:"roi"`
	// NoiseMaps asks for pseudo-replica noise maps of chosen points.
	NoiseMaps []NoiseMapSpec `toml:"noise_map"`

	// Source is the file the plan was read from ("built-in" for the built-in
	// plan); Text is its content, kept for hashing and the manifest.
	Source string `toml:"-"`
	Text   []byte `toml:"-"`
	// The user's object, loaded and refined for the grid when the plan
	// names one, its file's SHA-256 and what the loader warned about.
	image        *simulate.ImagePhantom
	imageHash    string
	ImageNotices []string `toml:"-"`
}

// Object says what is imaged and on which grid it is reconstructed.
type Object struct {
	Phantom       string  `toml:"phantom"`
	PhaseLines    int     `toml:"phase_lines"`
	ReadoutPoints int     `toml:"readout_points"`
	FOVmm         float64 `toml:"fov_mm"`
	// Image is the user's own object (phantom = "image"): an 8/16-bit PNG
	// or a NIfTI-1 file, relative to the plan's folder; Slice picks the
	// slice of a volume.
	Image string `toml:"image"`
	Slice int    `toml:"slice"`
	// 3D Cartesian: the kz phase-encode count, and the readout positions
	// (FOV units) of the planes that are reconstructed.
	Partitions       int       `toml:"partitions"`
	ReadoutPositions []float64 `toml:"readout_positions"`
	// ODT: an N×N grid over a square FOV in micrometres.
	Grid  int     `toml:"grid"`
	FOVum float64 `toml:"fov_um"`
}

// Microscope says how an optical diffraction tomography instrument spends
// time and how noisy its field measurements are.
type Microscope struct {
	WavelengthUm   float64 `toml:"wavelength_um"`
	MediumIndex    float64 `toml:"medium_index"`
	NAIllumination float64 `toml:"na_illumination"`
	NADetection    float64 `toml:"na_detection"`
	ExposureMs     float64 `toml:"exposure_ms"`
	SettlingMs     float64 `toml:"settling_ms"`
	FieldSNR       float64 `toml:"field_snr"`
}

// Scanner says how the instrument spends time and how noisy it is.
type Scanner struct {
	TRms         float64 `toml:"tr_ms"`
	EchoTrain    int     `toml:"echo_train"`
	Averages     int     `toml:"averages"`
	ReferenceSNR float64 `toml:"reference_snr"`
	// Time model extras (see Budget): slices interleaved within the TR,
	// concatenations (packages) played one after another, phase
	// oversampling as a fraction of the lines, dummy TRs before each
	// concatenation, and a separate calibration scan.
	Slices            int     `toml:"slices"`
	SliceTimeMs       float64 `toml:"slice_time_ms"`
	Concatenations    int     `toml:"concatenations"`
	PhaseOversampling float64 `toml:"phase_oversampling"`
	DummyScans        int     `toml:"dummy_scans"`
	CalibrationScanS  float64 `toml:"calibration_scan_s"`
	// Receive coils: 1 is a single uniform coil; more are a ring array.
	Coils int `toml:"coils"`
	// CoilCorrelation is the noise correlation between neighbouring coils
	// of the ring (0 for independent coil noise).
	CoilCorrelation float64 `toml:"coil_noise_correlation"`
	// Gradient limits and sampling of spiral designs.
	MaxGradient  float64 `toml:"max_gradient_mt_per_m"`
	MaxSlew      float64 `toml:"max_slew_t_per_m_per_s"`
	DwellUs      float64 `toml:"dwell_us"`
	MaxReadoutMs float64 `toml:"max_readout_ms"`
}

// Scheme is one sampling scheme with the accelerations to try.
type Scheme struct {
	Label            string    `toml:"label"`
	Pattern          string    `toml:"pattern"`
	Accelerations    []float64 `toml:"accelerations"`
	CalibrationLines int       `toml:"calibration_lines"`
	DensityPower     float64   `toml:"density_power"`
	// Radial spokes.
	SpokeOrder          string  `toml:"spoke_order"`
	TinyGoldenN         int     `toml:"tiny_golden_n"`
	HalfSpokes          bool    `toml:"half_spokes"`
	ReadoutOversampling float64 `toml:"readout_oversampling"`
	// Spiral interleaves.
	Interleaves []int `toml:"interleaves"`
	// ODT illumination counts.
	Illuminations []int `toml:"illuminations"`
	// 3D Cartesian: the kz extent of the calibration box, dropping the
	// k-space corners, the Poisson-disc radius growth and the lattice shift.
	CalibrationPartitions int     `toml:"calibration_partitions"`
	CornerCut             bool    `toml:"corner_cut"`
	DiscGrowth            float64 `toml:"disc_growth"`
	LatticeShift          int     `toml:"lattice_shift"`
	// PartialFourier is the acquired fraction of k-space along phase
	// encode (2D Cartesian), e.g. 0.625; 0 or 1 means full.
	PartialFourier    float64 `toml:"partial_fourier"`
	EdgeUndersampling float64 `toml:"edge_undersampling"`
	DenseFraction     float64 `toml:"dense_fraction"`
}

// NonCartesian reports whether the scheme samples off the Cartesian grid.
func (s Scheme) NonCartesian() bool { return s.Pattern == PatternRadial || s.Pattern == PatternSpiral }

// Recon is one reconstruction method and its parameters.
type Recon struct {
	Label      string    `toml:"label"`
	Method     string    `toml:"method"`
	Wavelet    string    `toml:"wavelet"`
	Levels     int       `toml:"levels"`
	Iterations int       `toml:"iterations"`
	Lambda     float64   `toml:"lambda"`
	LambdaLook []float64 `toml:"lambda_search"`
	// LambdaRule chooses how λ is set when it is not fixed: "calibration"
	// (the default), "discrepancy", "universal" or "oracle".
	LambdaRule string    `toml:"lambda_rule"`
	Box        []float64 `toml:"box"`
	// Tikhonov: the regularising operator, "identity" or "gradient".
	Tikhonov string `toml:"tikhonov"`
	// TGV: α₀/α₁, the weight of the second-order term relative to λ = α₁.
	TGVRatio float64 `toml:"tgv_ratio"`
	// Plug-and-play and RED: the denoiser ("tv", "wavelet", "wavelet-spin",
	// "nlm").
	Denoiser string `toml:"denoiser"`
	// FISTA-wavelet options: random circular shifts per iteration (cycle
	// spinning) and adaptive restart ("gradient" or "function").
	CycleSpinning bool   `toml:"cycle_spinning"`
	Restart       string `toml:"restart"`
}

// Acceptance is the quality bar a protocol must meet.
type Acceptance struct {
	Metric    string  `toml:"metric"`
	Threshold float64 `toml:"threshold"`
	// Contrast picks the disc row scored by metric smallest-disc.
	Contrast float64 `toml:"contrast"`
}

// The pattern, method and metric names a plan may use.
const (
	PatternUniform   = "cartesian-uniform"
	PatternRandom    = "cartesian-random"
	PatternRadial    = "radial"
	PatternSpiral    = "spiral"
	PatternFan       = "fan"
	PatternFanGolden = "fan-golden"

	ModalityMRI = "mri"
	ModalityODT = "odt"

	MethodZeroFilled   = "zero-filled"
	MethodFISTAWavelet = "fista-wavelet"
	MethodFISTABox     = "fista-box"
	MethodTikhonov     = "tikhonov-cg"
	MethodTV           = "tv-pdhg"
	MethodTGV          = "tgv-pdhg"
	MethodADMMWavelet  = "admm-wavelet"
	MethodCGSENSE      = "cg-sense"
	MethodHomodyne     = "homodyne"
	MethodPOCS         = "pocs"
	MethodPnPADMM      = "pnp-admm"
	MethodPnPFISTA     = "pnp-fista"
	MethodRED          = "red"

	RuleCalibration = "calibration"
	RuleDiscrepancy = "discrepancy"
	RuleUniversal   = "universal"
	RuleOracle      = "oracle"

	MetricSSIM  = "ssim"
	MetricPSNR  = "psnr"
	MetricNRMSE = "nrmse"
)

var (
	patterns = []string{PatternUniform, PatternRandom, PatternRadial, PatternSpiral, PatternFan, PatternFanGolden,
		Pattern3DUniform, Pattern3DShifted, Pattern3DRandom, Pattern3DPoissonDisc}
	spokeOrders = []string{"golden", "tiny-golden", "uniform", "rational-golden"}
	methods     = []string{MethodZeroFilled, MethodFISTAWavelet, MethodTikhonov, MethodTV, MethodTGV, MethodADMMWavelet, MethodCGSENSE, MethodHomodyne, MethodPOCS,
		MethodPnPADMM, MethodPnPFISTA, MethodRED, MethodFISTABox}
	metrics   = []string{MetricSSIM, MetricPSNR, MetricNRMSE, MetricSmallestDisc, MetricMTF50, MetricROIRMSE}
	phantoms  = []string{"modified-shepp-logan", PhantomLowContrast, PhantomResolution, PhantomImage, "modified-shepp-logan-3d"}
	denoisers = []string{"tv", "wavelet", "wavelet-spin", "nlm"}
	wavelets  = []string{"haar", "db2", "db3", "db4", "db5", "db6", "db7", "db8"}
)

// partialFourierRecon checks a homodyne or POCS reconstruction: single-coil
// Cartesian data, with iterations for POCS only.
func (v *validator) partialFourierRecon(p *Plan, i int) {
	r := &p.Recons[i]
	if p.Scanner.Coils > 1 {
		v.fail("recon", i, "method", r.Method+" combines one coil's data", "use it with scanner.coils = 1")
	}
	for j, s := range p.Schemes {
		if s.NonCartesian() {
			v.fail("scheme", j, "pattern", fmt.Sprintf("method %s needs Cartesian lines, and scheme %q is %s", r.Method, s.Label, s.Pattern), "give partial Fourier reconstructions a plan of Cartesian schemes")
		}
	}
	if r.Wavelet != "" || r.Levels != 0 || r.Lambda != 0 || r.LambdaLook != nil || r.LambdaRule != "" {
		v.fail("recon", i, "lambda", r.Method+" has no regulariser", "keep only iterations (pocs)")
	}
	if r.Method == MethodHomodyne && r.Iterations != 0 {
		v.fail("recon", i, "iterations", "homodyne is not iterative", "remove it, or use pocs")
	}
	if r.Method == MethodPOCS {
		if r.Iterations == 0 {
			r.Iterations = 5
		}
		if r.Iterations < 1 || r.Iterations > 1000 {
			v.fail("recon", i, "iterations", fmt.Sprintf("must be between 1 and 1000, got %d", r.Iterations), "with noise a few iterations are best")
		}
	}
}

// usesSENSE reports whether a plan reconstructs with CG-SENSE.
func usesSENSE(p *Plan) bool {
	for _, r := range p.Recons {
		if r.Method == MethodCGSENSE {
			return true
		}
	}
	return false
}

// methodTitle is the label of a method that the plan leaves unlabelled.
func methodTitle(r Recon) string {
	switch r.Method {
	case MethodTikhonov:
		return "tikhonov-cg " + r.Tikhonov
	case MethodFISTAWavelet, MethodADMMWavelet:
		if r.Wavelet != "" {
			return r.Method + " " + r.Wavelet
		}
	}
	return r.Method
}

// Error is a mistake in a plan file. It names the file, the line (0 when the
// mistake is not tied to one line), the key and what to do about it.
type Error struct {
	File string
	Line int
	Key  string
	Msg  string
	Hint string
}

func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	if e.Key != "" {
		fmt.Fprintf(&b, ": %s", e.Key)
	}
	fmt.Fprintf(&b, ": %s", e.Msg)
	if e.Hint != "" {
		fmt.Fprintf(&b, " (%s)", e.Hint)
	}
	return b.String()
}

// Load reads and validates a plan file.
func Load(path string) (*Plan, error) {
	text, err := os.ReadFile(path)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return nil, fmt.Errorf("plan file %s does not exist (write a starter plan with `accelplan new %s`)", path, path)
		}
		return nil, fmt.Errorf("cannot read plan file: %w", err)
	}
	return Parse(path, text)
}

// LoadBuiltin returns the validated built-in plan.
func LoadBuiltin() *Plan {
	p, err := Parse("built-in plan", Builtin())
	if err != nil {
		panic("plans: the built-in plan is invalid: " + err.Error())
	}
	return p
}

// Parse decodes and validates plan text; file names the source in messages.
func Parse(file string, text []byte) (*Plan, error) {
	if !bytes.Contains(text, []byte("\n")) && len(bytes.TrimSpace(text)) == 0 {
		return nil, &Error{File: file, Msg: "the plan is empty", Hint: "write a starter plan with `accelplan new plan.toml`"}
	}
	var p Plan
	md, err := toml.Decode(string(text), &p)
	if err != nil {
		return nil, decodeError(file, string(text), err)
	}
	if und := md.Undecoded(); len(und) > 0 {
		k := und[0]
		return nil, &Error{File: file, Line: findKey(string(text), k), Key: k.String(),
			Msg: "unknown key", Hint: "see `accelplan new` for the keys a plan may have; check the spelling and the [table] it sits in"}
	}
	p.Source = file
	p.Text = text
	v := validator{file: file, text: string(text)}
	v.plan(&p)
	if v.err != nil {
		return nil, v.err
	}
	return &p, nil
}

func decodeError(file, text string, err error) error {
	var pe toml.ParseError
	if errors.As(err, &pe) {
		return &Error{File: file, Line: pe.Position.Line, Key: pe.LastKey, Msg: "malformed TOML: " + pe.Message,
			Hint: "fix the syntax on that line; strings need quotes, lists need [ ]"}
	}
	msg := err.Error()
	// The decoder reports type mismatches as "toml: line N (last key "k"): ...".
	line := 0
	key := ""
	if i := strings.Index(msg, "line "); i >= 0 {
		rest := msg[i+5:]
		j := strings.IndexFunc(rest, func(r rune) bool { return r < '0' || r > '9' })
		if j > 0 {
			line, _ = strconv.Atoi(rest[:j])
		}
	}
	if i := strings.Index(msg, `last key "`); i >= 0 {
		rest := msg[i+10:]
		if j := strings.Index(rest, `"`); j >= 0 {
			key = rest[:j]
		}
	}
	if j := strings.LastIndex(msg, "): "); j >= 0 {
		msg = msg[j+3:]
	}
	msg = strings.TrimPrefix(msg, "toml: ")
	if line == 0 && key != "" {
		line = findKey(text, strings.Split(key, "."))
	}
	return &Error{File: file, Line: line, Key: key, Msg: "wrong type: " + msg,
		Hint: "numbers go without quotes, names in quotes, lists in [ ]; see `accelplan new`"}
}

// findKey returns the line of key path k in text, or 0. Array-of-table
// indices are not part of k, so the first match is returned.
func findKey(text string, k []string) int {
	if len(k) == 0 {
		return 0
	}
	table := strings.Join(k[:len(k)-1], ".")
	return findKeyIn(text, table, -1, k[len(k)-1])
}

// findKeyIn returns the line of key inside table (the index-th block of an
// array of tables when index >= 0), or the line of the table header when key
// is empty, or 0 when it is not there.
func findKeyIn(text, table string, index int, key string) int {
	cur := ""
	count := map[string]int{}
	curIndex := -1
	for n, raw := range strings.Split(text, "\n") {
		line := strings.TrimSpace(raw)
		if strings.HasPrefix(line, "[[") {
			end := strings.Index(line, "]]")
			if end < 0 {
				continue
			}
			cur = strings.TrimSpace(line[2:end])
			curIndex = count[cur]
			count[cur]++
			if key == "" && cur == table && (index < 0 || index == curIndex) {
				return n + 1
			}
			continue
		}
		if strings.HasPrefix(line, "[") {
			end := strings.Index(line, "]")
			if end < 0 {
				continue
			}
			cur = strings.TrimSpace(line[1:end])
			curIndex = -1
			if key == "" && cur == table {
				return n + 1
			}
			continue
		}
		if key == "" || cur != table || (index >= 0 && curIndex != index) {
			continue
		}
		if eq := strings.Index(line, "="); eq > 0 {
			name := strings.Trim(strings.TrimSpace(line[:eq]), `"'`)
			if name == key {
				return n + 1
			}
		}
	}
	return 0
}

// validator collects the first mistake in a plan.
type validator struct {
	file string
	text string
	err  error
}

func (v *validator) fail(table string, index int, key, msg, hint string) {
	if v.err != nil {
		return
	}
	line := findKeyIn(v.text, table, index, key)
	if line == 0 && key != "" {
		line = findKeyIn(v.text, table, index, "")
	}
	name := key
	if table != "" {
		t := table
		if index >= 0 {
			t = fmt.Sprintf("%s[%d]", table, index+1)
		}
		if key != "" {
			name = t + "." + key
		} else {
			name = t
		}
	}
	v.err = &Error{File: v.file, Line: line, Key: name, Msg: msg, Hint: hint}
}

// explicitZeros refuses a 0 written in the file for a key whose leaving-out
// means "use the default": a user who writes iterations = 0 has made a
// mistake, not asked for the default.
func (v *validator) explicitZeros(p *Plan) {
	zero := func(table string, index int, key string, isZero bool, hint string) {
		if isZero && findKeyIn(v.text, table, index, key) > 0 {
			v.fail(table, index, key, "must not be 0", hint)
		}
	}
	zero("", -1, "repeats", p.Repeats == 0, "at least 2 scored noise draws; leave it out for 4")
	zero("scanner", -1, "echo_train", p.Scanner.EchoTrain == 0, "1 for one echo per TR; leave it out for 1")
	zero("scanner", -1, "averages", p.Scanner.Averages == 0, "at least 1; leave it out for 1")
	zero("scanner", -1, "coils", p.Scanner.Coils == 0, "1 for a single coil; leave it out for 1")
	zero("scanner", -1, "slices", p.Scanner.Slices == 0, "at least 1; leave it out for 1")
	zero("scanner", -1, "concatenations", p.Scanner.Concatenations == 0, "at least 1; leave it out for 1")
	for i, s := range p.Schemes {
		zero("scheme", i, "density_power", s.DensityPower == 0, "a positive power; leave it out for 3")
		zero("scheme", i, "readout_oversampling", s.ReadoutOversampling == 0, "at least 1; leave it out for 2")
		zero("scheme", i, "edge_undersampling", s.EdgeUndersampling == 0, "at least 1; leave it out for 1")
	}
	for i, r := range p.Recons {
		zero("recon", i, "iterations", r.Iterations == 0, "at least 1; leave it out for the default")
		zero("recon", i, "levels", r.Levels == 0, "at least 1; leave it out for 4")
		zero("recon", i, "tgv_ratio", r.TGVRatio == 0, "a positive ratio; leave it out for 2")
		zero("recon", i, "lambda", r.Lambda == 0, "λ = 0 is no regularisation; leave lambda out to choose it by lambda_rule, or give a positive value")
	}
	for i, m := range p.NoiseMaps {
		zero("noise_map", i, "replicas", m.Replicas == 0, "at least 8; leave it out for 32")
	}
}

func oneOf(s string, list []string) bool {
	for _, x := range list {
		if s == x {
			return true
		}
	}
	return false
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func (v *validator) plan(p *Plan) {
	v.explicitZeros(p)
	if p.Repeats == 0 {
		p.Repeats = 4
	}
	if p.Repeats < 2 || p.Repeats > 1000 {
		v.fail("", -1, "repeats", fmt.Sprintf("must be between 2 and 1000, got %d", p.Repeats),
			"at least 2 scored noise draws are needed for a confidence bound")
	}
	if p.Output == "" {
		p.Output = "accelplan-out"
	}
	switch p.Modality {
	case "", ModalityMRI:
		p.Modality = ModalityMRI
	case ModalityODT:
		v.odt(p)
		return
	default:
		v.fail("", -1, "modality", fmt.Sprintf("unknown modality %q", p.Modality), "choose mri or odt")
		return
	}
	if p.Micro != (Microscope{}) {
		v.fail("microscope", -1, "", "a [microscope] table does not apply to modality mri", "remove it, or set modality = \"odt\"")
	}
	o := &p.Object
	if o.Phantom == "" {
		o.Phantom = phantoms[0]
	}
	if !oneOf(o.Phantom, phantoms) {
		v.fail("object", -1, "phantom", fmt.Sprintf("unknown phantom %q", o.Phantom), "choose one of: "+strings.Join(phantoms, ", "))
	}
	if o.PhaseLines < 16 || o.PhaseLines > 1024 {
		v.fail("object", -1, "phase_lines", fmt.Sprintf("must be between 16 and 1024, got %d", o.PhaseLines), "typical values are 128 to 512")
	}
	if o.ReadoutPoints < 16 || o.ReadoutPoints > 1024 {
		v.fail("object", -1, "readout_points", fmt.Sprintf("must be between 16 and 1024, got %d", o.ReadoutPoints), "typical values are 128 to 512")
	}
	if !(o.FOVmm > 0) || !finite(o.FOVmm) || o.FOVmm > 1000 {
		v.fail("object", -1, "fov_mm", fmt.Sprintf("must be a positive number up to 1000 mm, got %v", o.FOVmm), "")
	}
	if o.Partitions != 0 {
		v.object3D(p)
	} else if o.ReadoutPositions != nil {
		v.fail("object", -1, "readout_positions", "applies to 3D plans only", "set object.partitions for a 3D scan, or remove it")
	}
	if o.Phantom == PhantomImage || o.Image != "" || o.Slice != 0 {
		v.userImage(p)
	}
	if o.Phantom == "modified-shepp-logan-3d" && o.Partitions == 0 {
		v.fail("object", -1, "phantom", "the 3D phantom needs a 3D plan", "set object.partitions, or use modified-shepp-logan")
	}
	s := &p.Scanner
	if !(s.TRms > 0) || !finite(s.TRms) || s.TRms > 60000 {
		v.fail("scanner", -1, "tr_ms", fmt.Sprintf("must be between 0 and 60000 ms, got %v", s.TRms), "the repetition time in milliseconds")
	}
	if s.EchoTrain == 0 {
		s.EchoTrain = 1
	}
	if s.EchoTrain < 1 || s.EchoTrain > 512 {
		v.fail("scanner", -1, "echo_train", fmt.Sprintf("must be between 1 and 512, got %d", s.EchoTrain), "1 for a gradient or spin echo, more for a fast spin echo")
	}
	if s.Averages == 0 {
		s.Averages = 1
	}
	if s.Averages < 1 || s.Averages > 64 {
		v.fail("scanner", -1, "averages", fmt.Sprintf("must be between 1 and 64, got %d", s.Averages), "")
	}
	if s.Slices == 0 {
		s.Slices = 1
	}
	if s.Concatenations == 0 {
		s.Concatenations = 1
	}
	switch {
	case s.Slices < 1 || s.Slices > 1000:
		v.fail("scanner", -1, "slices", fmt.Sprintf("must be between 1 and 1000, got %d", s.Slices), "")
	case s.Concatenations < 1 || s.Concatenations > s.Slices:
		v.fail("scanner", -1, "concatenations", fmt.Sprintf("must be between 1 and the %d slices, got %d", s.Slices, s.Concatenations), "")
	case !(s.SliceTimeMs >= 0) || !finite(s.SliceTimeMs):
		v.fail("scanner", -1, "slice_time_ms", fmt.Sprintf("must be a time ≥ 0 ms, got %v", s.SliceTimeMs), "")
	case s.SliceTimeMs > 0 && float64((s.Slices+s.Concatenations-1)/s.Concatenations)*s.SliceTimeMs > s.TRms:
		per := (s.Slices + s.Concatenations - 1) / s.Concatenations
		v.fail("scanner", -1, "concatenations", fmt.Sprintf("%d slices per TR × %g ms do not fit in tr_ms = %g", per, s.SliceTimeMs, s.TRms),
			fmt.Sprintf("raise concatenations to at least %d, raise tr_ms, or lower slices", int(math.Ceil(float64(s.Slices)*s.SliceTimeMs/s.TRms))))
	case !(s.PhaseOversampling >= 0) || s.PhaseOversampling > 1:
		v.fail("scanner", -1, "phase_oversampling", fmt.Sprintf("must lie in [0, 1] (a fraction of the lines), got %v", s.PhaseOversampling), "0.2 acquires 20% more lines against wrap-around")
	case s.DummyScans < 0 || s.DummyScans > 10000:
		v.fail("scanner", -1, "dummy_scans", fmt.Sprintf("must be between 0 and 10000, got %d", s.DummyScans), "")
	case !(s.CalibrationScanS >= 0) || !finite(s.CalibrationScanS) || s.CalibrationScanS > 3600:
		v.fail("scanner", -1, "calibration_scan_s", fmt.Sprintf("must be between 0 and 3600 s, got %v", s.CalibrationScanS), "")
	}
	if s.Coils == 0 {
		s.Coils = 1
	}
	if s.Coils < 1 || s.Coils > 64 {
		v.fail("scanner", -1, "coils", fmt.Sprintf("must be between 1 and 64, got %d", s.Coils), "1 for a single uniform coil, e.g. 8 for a ring array")
	}
	if !(s.CoilCorrelation >= 0) || s.CoilCorrelation >= 1 || (s.CoilCorrelation > 0 && s.Coils < 2) {
		v.fail("scanner", -1, "coil_noise_correlation", fmt.Sprintf("must lie in [0, 1) with 2 or more coils, got %v", s.CoilCorrelation), "0.1 to 0.3 is typical of neighbouring coils")
	}
	if !(s.ReferenceSNR > 0) || !finite(s.ReferenceSNR) || s.ReferenceSNR > 1e6 {
		v.fail("scanner", -1, "reference_snr", fmt.Sprintf("must be a positive number, got %v", s.ReferenceSNR),
			"mean signal in the object over the image noise σ of the fully sampled scan; 20 to 100 is typical")
	}
	if len(p.Schemes) == 0 {
		v.fail("", -1, "", "the plan has no [[scheme]]", "add at least one [[scheme]] table; see `accelplan new`")
	}
	for i := range p.Schemes {
		v.scheme(p, i)
	}
	if len(p.Recons) == 0 {
		v.fail("", -1, "", "the plan has no [[recon]]", "add at least one [[recon]] table; see `accelplan new`")
	}
	for i := range p.Recons {
		v.recon(p, i)
	}
	v.accept(p)
	v.noiseMaps(p)
}

// accept checks the acceptance bar.
func (v *validator) accept(p *Plan) {
	a := &p.Accept
	if a.Metric == "" {
		a.Metric = MetricSSIM
	}
	if !oneOf(a.Metric, metrics) {
		v.fail("accept", -1, "metric", fmt.Sprintf("unknown metric %q", a.Metric), "choose one of: "+strings.Join(metrics, ", "))
	}
	lo, hi := thresholdRange(a.Metric)
	if !finite(a.Threshold) || a.Threshold <= lo || a.Threshold >= hi {
		v.fail("accept", -1, "threshold", fmt.Sprintf("must lie strictly between %v and %v for %s, got %v", lo, hi, a.Metric, a.Threshold),
			"e.g. 0.9 for ssim, 30 for psnr (dB), 0.1 for nrmse, 4 for smallest-disc (mm), 0.5 for mtf50 (cycles/mm)")
	}
	v.taskMetric(p)
	v.roiMetric(p)
}

func thresholdRange(metric string) (lo, hi float64) {
	switch metric {
	case MetricPSNR:
		return 0, 200
	case MetricNRMSE:
		return 0, 10
	case MetricSmallestDisc:
		return 0, 1000
	case MetricMTF50:
		return 0, 100
	case MetricROIRMSE:
		return 0, 10
	}
	return 0, 1
}

func (v *validator) scheme(p *Plan, i int) {
	s := &p.Schemes[i]
	if s.Pattern == "" {
		v.fail("scheme", i, "pattern", "missing", "choose one of: "+strings.Join(patterns, ", "))
		return
	}
	if !oneOf(s.Pattern, patterns) {
		v.fail("scheme", i, "pattern", fmt.Sprintf("unknown sampling pattern %q", s.Pattern), "choose one of: "+strings.Join(patterns, ", "))
		return
	}
	if oneOf(s.Pattern, patterns3D) {
		v.scheme3D(p, i)
		return
	}
	if s.CalibrationPartitions != 0 || s.CornerCut || s.DiscGrowth != 0 || s.LatticeShift != 0 {
		v.fail("scheme", i, "calibration_partitions", "calibration_partitions, corner_cut, disc_growth and lattice_shift apply to 3D patterns only", "remove them")
	}
	if s.Label == "" {
		s.Label = fmt.Sprintf("%s %d", s.Pattern, i+1)
	}
	for j, o := range p.Schemes[:i] {
		if o.Label == s.Label {
			v.fail("scheme", i, "label", fmt.Sprintf("label %q is used by scheme %d too", s.Label, j+1), "give each scheme its own label")
		}
	}
	if s.Pattern == PatternFan || s.Pattern == PatternFanGolden {
		v.fail("scheme", i, "pattern", fmt.Sprintf("pattern %s is an illumination set for modality odt", s.Pattern), "use a k-space pattern: "+strings.Join(patterns[:4], ", "))
		return
	}
	if s.Illuminations != nil {
		v.fail("scheme", i, "illuminations", "applies to modality odt only", "remove it")
	}
	if s.PartialFourier != 0 && (s.NonCartesian() || !(s.PartialFourier >= 0.5) || s.PartialFourier > 1) {
		v.fail("scheme", i, "partial_fourier", fmt.Sprintf("must lie in [0.5, 1] for a Cartesian scheme, got %v", s.PartialFourier), "5/8 = 0.625 and 6/8 = 0.75 are common")
	}
	if s.NonCartesian() {
		v.nonCartesian(p, i)
		return
	}
	for _, k := range []struct {
		set  bool
		name string
	}{{s.SpokeOrder != "", "spoke_order"}, {s.TinyGoldenN != 0, "tiny_golden_n"}, {s.HalfSpokes, "half_spokes"},
		{s.ReadoutOversampling != 0, "readout_oversampling"}, {s.Interleaves != nil, "interleaves"},
		{s.EdgeUndersampling != 0, "edge_undersampling"}, {s.DenseFraction != 0, "dense_fraction"}} {
		if k.set {
			v.fail("scheme", i, k.name, "does not apply to pattern "+s.Pattern, "remove it")
		}
	}
	ny := p.Object.PhaseLines
	if s.CalibrationLines < 0 || s.CalibrationLines > ny {
		v.fail("scheme", i, "calibration_lines", fmt.Sprintf("must be between 0 and the %d phase-encode lines, got %d", ny, s.CalibrationLines), "")
	}
	if s.Pattern == PatternRandom {
		if s.DensityPower == 0 {
			s.DensityPower = 3
		}
		if !(s.DensityPower > 0) || s.DensityPower > 20 {
			v.fail("scheme", i, "density_power", fmt.Sprintf("must be between 0 and 20, got %v", s.DensityPower), "3 is a common choice")
		}
	} else if s.DensityPower != 0 {
		v.fail("scheme", i, "density_power", "only applies to pattern "+PatternRandom, "remove it")
	}
	if len(s.Accelerations) == 0 {
		v.fail("scheme", i, "accelerations", "missing or empty", "list the acceleration factors R to try, e.g. [1, 2, 3, 4]")
	}
	for _, r := range s.Accelerations {
		switch {
		case !finite(r) || r < 1:
			v.fail("scheme", i, "accelerations", fmt.Sprintf("R = %v is below 1", r), "R = full lines / acquired lines, so R ≥ 1")
		case r > float64(ny):
			v.fail("scheme", i, "accelerations", fmt.Sprintf("R = %v is above the %d phase-encode lines", r, ny), "R can be at most the number of lines")
		case s.Pattern == PatternUniform && p.Scanner.Coils > 1 && r > float64(p.Scanner.Coils) && usesSENSE(p):
			v.fail("scheme", i, "accelerations", fmt.Sprintf("R = %v cannot be unfolded by SENSE with %d coils", r, p.Scanner.Coils),
				fmt.Sprintf("uniform undersampling by R needs at least R receive coils: keep R ≤ %d or raise scanner.coils", p.Scanner.Coils))
		case s.Pattern == PatternUniform && r != math.Trunc(r):
			v.fail("scheme", i, "accelerations", fmt.Sprintf("R = %v is not a whole number", r), "pattern "+PatternUniform+" keeps every R-th line; use "+PatternRandom+" for fractional R")
		case s.Pattern == PatternRandom && int(math.Round(float64(ny)/r)) < s.CalibrationLines:
			v.fail("scheme", i, "accelerations", fmt.Sprintf("R = %v keeps %d lines, fewer than the %d calibration lines", r, int(math.Round(float64(ny)/r)), s.CalibrationLines),
				"lower R or calibration_lines")
		}
	}
	sortUnique(v, s, i)
}

// nonCartesian checks a radial or spiral scheme.
func (v *validator) nonCartesian(p *Plan, i int) {
	s := &p.Schemes[i]
	o := p.Object
	if o.PhaseLines != o.ReadoutPoints {
		v.fail("object", -1, "phase_lines", fmt.Sprintf("pattern %s needs a square matrix, got %d × %d", s.Pattern, o.PhaseLines, o.ReadoutPoints),
			"set phase_lines equal to readout_points")
	}
	for _, k := range []struct {
		set  bool
		name string
	}{{s.CalibrationLines != 0, "calibration_lines"}, {s.DensityPower != 0, "density_power"}} {
		if k.set {
			v.fail("scheme", i, k.name, "does not apply to pattern "+s.Pattern, "remove it")
		}
	}
	if s.ReadoutOversampling == 0 {
		s.ReadoutOversampling = 2
	}
	if !(s.ReadoutOversampling >= 1) || s.ReadoutOversampling > 8 {
		v.fail("scheme", i, "readout_oversampling", fmt.Sprintf("must be between 1 and 8, got %v", s.ReadoutOversampling), "2 is usual")
	}
	if s.Pattern == PatternRadial {
		if s.Interleaves != nil || s.EdgeUndersampling != 0 || s.DenseFraction != 0 {
			v.fail("scheme", i, "interleaves", "spiral keys do not apply to pattern radial", "remove interleaves, edge_undersampling and dense_fraction")
		}
		if s.SpokeOrder == "" {
			s.SpokeOrder = "golden"
		}
		if !oneOf(s.SpokeOrder, spokeOrders) {
			v.fail("scheme", i, "spoke_order", fmt.Sprintf("unknown spoke order %q", s.SpokeOrder), "choose one of: "+strings.Join(spokeOrders, ", "))
		}
		if s.SpokeOrder == "tiny-golden" && s.TinyGoldenN == 0 {
			s.TinyGoldenN = 2
		}
		if s.TinyGoldenN < 0 || s.TinyGoldenN > 20 || (s.TinyGoldenN != 0 && s.SpokeOrder == "uniform") {
			v.fail("scheme", i, "tiny_golden_n", fmt.Sprintf("must be between 1 and 20 with a golden spoke order, got %d", s.TinyGoldenN), "ψ_N = 180°/(φ+N−1); 1 is the golden angle")
		}
		ref := trajectoriesRadialReference(o.ReadoutPoints, s.HalfSpokes)
		if len(s.Accelerations) == 0 {
			v.fail("scheme", i, "accelerations", "missing or empty", fmt.Sprintf("list R relative to the %d spokes of Nyquist sampling (π/2·N)", ref))
		}
		for _, r := range s.Accelerations {
			if !finite(r) || r < 1 || r > float64(ref) {
				v.fail("scheme", i, "accelerations", fmt.Sprintf("R = %v must lie between 1 and %d (the Nyquist spoke count π/2·N)", r, ref), "")
			}
		}
		sortUnique(v, s, i)
		return
	}
	// spiral
	if s.SpokeOrder != "" || s.TinyGoldenN != 0 || s.HalfSpokes {
		v.fail("scheme", i, "spoke_order", "radial keys do not apply to pattern spiral", "remove spoke_order, tiny_golden_n and half_spokes")
	}
	if s.Accelerations != nil {
		v.fail("scheme", i, "accelerations", "a spiral is set by its interleave counts", "list interleaves = [...] instead; the achieved R is reported")
	}
	if len(s.Interleaves) == 0 {
		v.fail("scheme", i, "interleaves", "missing or empty", "list the interleave counts to try, e.g. [24, 16, 12, 8]")
	}
	for _, n := range s.Interleaves {
		if n < 1 || n > 1024 {
			v.fail("scheme", i, "interleaves", fmt.Sprintf("%d must be between 1 and 1024", n), "")
		}
		s.Accelerations = append(s.Accelerations, float64(n))
	}
	if s.EdgeUndersampling == 0 {
		s.EdgeUndersampling = 1
	}
	if !(s.EdgeUndersampling >= 1) || s.EdgeUndersampling > 16 {
		v.fail("scheme", i, "edge_undersampling", fmt.Sprintf("must be between 1 and 16, got %v", s.EdgeUndersampling), "1 is a Nyquist spiral")
	}
	if !(s.DenseFraction >= 0) || s.DenseFraction > 1 {
		v.fail("scheme", i, "dense_fraction", fmt.Sprintf("must be between 0 and 1, got %v", s.DenseFraction), "")
	}
	sc := &p.Scanner
	if sc.MaxGradient == 0 {
		sc.MaxGradient = 40
	}
	if sc.MaxSlew == 0 {
		sc.MaxSlew = 150
	}
	if sc.DwellUs == 0 {
		sc.DwellUs = 4
	}
	if !(sc.MaxGradient > 0) || sc.MaxGradient > 500 {
		v.fail("scanner", -1, "max_gradient_mt_per_m", fmt.Sprintf("must be between 0 and 500 mT/m, got %v", sc.MaxGradient), "")
	}
	if !(sc.MaxSlew > 0) || sc.MaxSlew > 1000 {
		v.fail("scanner", -1, "max_slew_t_per_m_per_s", fmt.Sprintf("must be between 0 and 1000 T/m/s, got %v", sc.MaxSlew), "")
	}
	if !(sc.DwellUs > 0) || sc.DwellUs > 100 {
		v.fail("scanner", -1, "dwell_us", fmt.Sprintf("must be between 0 and 100 µs, got %v", sc.DwellUs), "")
	}
	if !(sc.MaxReadoutMs >= 0) || sc.MaxReadoutMs > 1000 {
		v.fail("scanner", -1, "max_readout_ms", fmt.Sprintf("must be between 0 (no limit) and 1000 ms, got %v", sc.MaxReadoutMs), "")
	}
	sortUnique(v, s, i)
}

// sortUnique sorts the accelerations of scheme i and refuses repeats.
func sortUnique(v *validator, s *Scheme, i int) {
	sort.Float64s(s.Accelerations)
	for j := 1; j < len(s.Accelerations); j++ {
		if s.Accelerations[j] == s.Accelerations[j-1] {
			v.fail("scheme", i, "accelerations", fmt.Sprintf("%v is listed twice", s.Accelerations[j]), "list each value once")
		}
	}
}

func (v *validator) recon(p *Plan, i int) {
	r := &p.Recons[i]
	if r.Method == "" {
		v.fail("recon", i, "method", "missing", "choose one of: "+strings.Join(methods, ", "))
		return
	}
	if !oneOf(r.Method, methods) {
		v.fail("recon", i, "method", fmt.Sprintf("unknown method %q", r.Method), "choose one of: "+strings.Join(methods, ", "))
		return
	}
	if r.Method == MethodTikhonov && r.Tikhonov == "" {
		r.Tikhonov = "gradient"
	}
	if r.Label == "" {
		r.Label = methodTitle(*r)
	}
	for j, o := range p.Recons[:i] {
		if o.Label == r.Label {
			v.fail("recon", i, "label", fmt.Sprintf("label %q is used by recon %d too", r.Label, j+1), "give each recon its own label")
		}
	}
	if r.Method == MethodFISTABox && p.Modality != ModalityODT {
		v.fail("recon", i, "method", "fista-box constrains a refractive-index contrast and applies to modality odt only", "choose one of: zero-filled, fista-wavelet")
		return
	}
	if r.Method != MethodFISTABox && r.Box != nil {
		v.fail("recon", i, "box", "applies to method fista-box only", "remove it")
	}
	if r.Method == MethodFISTABox {
		v.boxRecon(p, i)
		return
	}
	if r.Method == MethodHomodyne || r.Method == MethodPOCS {
		v.partialFourierRecon(p, i)
		return
	}
	if r.Method == MethodCGSENSE && p.Scanner.Coils < 2 {
		v.fail("recon", i, "method", "cg-sense needs a receive array", "set scanner.coils to 2 or more, or choose another method")
		return
	}
	if r.Method == MethodZeroFilled {
		for _, k := range []struct {
			set  bool
			name string
		}{{r.Wavelet != "", "wavelet"}, {r.Levels != 0, "levels"}, {r.Iterations != 0, "iterations"}, {r.Lambda != 0, "lambda"}, {r.LambdaLook != nil, "lambda_search"}, {r.LambdaRule != "", "lambda_rule"}} {
			if k.set {
				v.fail("recon", i, k.name, "does not apply to method "+MethodZeroFilled, "remove it")
			}
		}
		return
	}
	usesWavelet := r.Method == MethodFISTAWavelet || r.Method == MethodADMMWavelet
	if r.Method != MethodTikhonov && r.Tikhonov != "" {
		v.fail("recon", i, "tikhonov", "applies to method "+MethodTikhonov+" only", "remove it")
	}
	if r.Method != MethodTGV && r.TGVRatio != 0 {
		v.fail("recon", i, "tgv_ratio", "applies to method "+MethodTGV+" only", "remove it")
	}
	pnp := r.Method == MethodPnPADMM || r.Method == MethodPnPFISTA || r.Method == MethodRED
	if pnp {
		if r.Denoiser == "" {
			r.Denoiser = "tv"
		}
		if !oneOf(r.Denoiser, denoisers) {
			v.fail("recon", i, "denoiser", fmt.Sprintf("unknown denoiser %q", r.Denoiser), "choose one of: "+strings.Join(denoisers, ", "))
		}
		if r.Label == r.Method {
			r.Label = r.Method + " " + r.Denoiser
		}
	} else if r.Denoiser != "" {
		v.fail("recon", i, "denoiser", "applies to pnp-admm, pnp-fista and red only", "remove it")
	}
	if r.Method != MethodFISTAWavelet && (r.CycleSpinning || r.Restart != "") {
		v.fail("recon", i, "cycle_spinning", "cycle_spinning and restart apply to fista-wavelet only", "remove them")
	}
	if r.Restart != "" && r.Restart != "gradient" && r.Restart != "function" {
		v.fail("recon", i, "restart", fmt.Sprintf("unknown restart rule %q", r.Restart), "choose gradient or function")
	}
	if !usesWavelet && (r.Wavelet != "" || r.Levels != 0) {
		v.fail("recon", i, "wavelet", "method "+r.Method+" uses no wavelet", "remove wavelet and levels")
	}
	switch r.Method {
	case MethodTikhonov:
		if r.Tikhonov == "" {
			r.Tikhonov = "gradient"
		}
		if r.Tikhonov != "identity" && r.Tikhonov != "gradient" {
			v.fail("recon", i, "tikhonov", fmt.Sprintf("unknown regularising operator %q", r.Tikhonov), "choose identity or gradient")
		}
	case MethodTGV:
		if r.TGVRatio == 0 {
			r.TGVRatio = 2
		}
		if !(r.TGVRatio > 0) || r.TGVRatio > 100 {
			v.fail("recon", i, "tgv_ratio", fmt.Sprintf("must be between 0 and 100, got %v", r.TGVRatio), "2 is the common choice")
		}
	}
	if !usesWavelet {
		v.iterLambda(p, i)
		return
	}
	if r.Wavelet == "" {
		r.Wavelet = "db4"
	}
	if !oneOf(r.Wavelet, wavelets) {
		v.fail("recon", i, "wavelet", fmt.Sprintf("unknown wavelet %q", r.Wavelet), "choose one of: "+strings.Join(wavelets, ", "))
	}
	if r.Levels == 0 {
		r.Levels = 4
	}
	if r.Levels < 1 || r.Levels > 8 {
		v.fail("recon", i, "levels", fmt.Sprintf("must be between 1 and 8, got %d", r.Levels), "")
	}
	rows, cols := p.PlaneSize()
	for _, n := range []int{rows, cols} {
		if r.Levels >= 1 && r.Levels <= 8 && n%(1<<r.Levels) != 0 {
			v.fail("recon", i, "levels", fmt.Sprintf("%d levels need a matrix divisible by %d; %d is not", r.Levels, 1<<r.Levels, n),
				"lower levels or change object.phase_lines / object.readout_points")
		}
	}
	v.iterLambda(p, i)
}

// iterLambda checks the iteration cap and the λ choice of recon i.
func (v *validator) iterLambda(p *Plan, i int) {
	r := &p.Recons[i]
	if r.Iterations == 0 {
		r.Iterations = 60
	}
	if r.Iterations < 1 || r.Iterations > 10000 {
		v.fail("recon", i, "iterations", fmt.Sprintf("must be between 1 and 10000, got %d", r.Iterations), "")
	}
	if !finite(r.Lambda) || r.Lambda < 0 {
		v.fail("recon", i, "lambda", fmt.Sprintf("must be a finite number ≥ 0, got %v", r.Lambda), "leave it out to tune λ on a calibration noise draw")
	}
	if r.Lambda > 0 && r.LambdaLook != nil {
		v.fail("recon", i, "lambda_search", "cannot be combined with a fixed lambda", "keep one of the two")
	}
	rules := []string{RuleCalibration, RuleDiscrepancy, RuleUniversal, RuleOracle}
	switch {
	case r.LambdaRule != "" && r.Lambda > 0:
		v.fail("recon", i, "lambda_rule", "cannot be combined with a fixed lambda", "keep one of the two")
	case r.LambdaRule == "" && r.Lambda == 0:
		r.LambdaRule = RuleCalibration
	case r.LambdaRule != "" && !oneOf(r.LambdaRule, rules):
		v.fail("recon", i, "lambda_rule", fmt.Sprintf("unknown rule %q", r.LambdaRule), "choose one of: "+strings.Join(rules, ", "))
	case r.LambdaRule == RuleUniversal && r.Method != MethodFISTAWavelet && r.Method != MethodADMMWavelet:
		v.fail("recon", i, "lambda_rule", "the universal threshold is defined for wavelet shrinkage", "use it with fista-wavelet or admm-wavelet, or choose calibration or discrepancy")
	}
	if r.LambdaRule == RuleOracle && !strings.Contains(strings.ToLower(r.Label), "oracle") {
		// A truth-tuned result is never shown without saying so.
		r.Label += " [oracle]"
	}
	if r.LambdaLook == nil && r.Lambda == 0 {
		r.LambdaLook = []float64{1e-4, 1e-1}
		switch r.Method {
		case MethodTikhonov, MethodCGSENSE:
			r.LambdaLook = []float64{1e-4, 10}
		case MethodPnPADMM, MethodPnPFISTA:
			// σ of the denoiser, relative to the adjoint image's peak.
			r.LambdaLook = []float64{1e-3, 0.3}
		case MethodRED:
			r.LambdaLook = []float64{1e-3, 10}
		}
	}
	if r.LambdaLook != nil {
		l := r.LambdaLook
		if len(l) != 2 || !finite(l[0]) || !finite(l[1]) || !(l[0] > 0) || !(l[1] > l[0]) {
			v.fail("recon", i, "lambda_search", fmt.Sprintf("must be [low, high] with 0 < low < high, got %v", l), "e.g. [1e-4, 1e-1], relative to the largest zero-filled magnitude")
		}
	}
}
