package priors

import (
	"errors"
	"fmt"
	"math"

	"accelplan/simulate"
)

// CGSENSE reconstructs multi-coil data by conjugate gradients on the normal
// equations of (optionally damped) least squares,
//
//	(EᴴE + λI)·x = Eᴴy,
//
// for any encoding operator E, typically a simulate.SENSE (Cartesian or
// non-Cartesian): the CG-SENSE method of Pruessmann KP, Weiger M, Börnert P,
// Boesiger P, MRM 2001;46:638-651. With λ = 0 it is the SENSE solution
// (Pruessmann KP et al., MRM 1999;42:952-962) when EᴴE is invertible; λ > 0
// is Tikhonov damping (Tikhonov AN, Soviet Math Dokl 1963;4:1035-1038) that
// keeps it stable when the coils cannot separate aliased pixels well.
//
// Optional diagonal weights d > 0 precondition the system as in the
// intensity correction of Pruessmann 2001: CG runs on
// (D(EᴴE + λI)D)·z = D·Eᴴy and returns x = D·z, the same solution, reached in
// fewer iterations when d ≈ (Σ_c |S_c|²)^(−1/2) (IntensityCorrection), which
// makes the fully sampled system the identity. The residual in the report is
// the one of the preconditioned system.
//
// A CGSENSE holds its work space and allocates nothing per solve; make one per
// goroutine.
type CGSENSE struct {
	op     simulate.Operator
	d      []float64
	lambda float64
	cg     *CG
	rhs    []complex128
	data   []complex128
	z      []complex128
	tmp    []complex128
}

// NewCGSENSE returns a solver for operator op with diagonal preconditioning
// weights d (nil for none; otherwise ImageLen positive finite values).
func NewCGSENSE(op simulate.Operator, d []float64) (*CGSENSE, error) {
	if op == nil {
		return nil, errors.New("priors: CG-SENSE: no encoding operator")
	}
	n, m := op.ImageLen(), op.DataLen()
	if m < 1 {
		return nil, errors.New("priors: CG-SENSE: the operator measures no sample")
	}
	if d != nil {
		if len(d) != n {
			return nil, fmt.Errorf("priors: CG-SENSE: %d preconditioning weights for %d pixels", len(d), n)
		}
		for i, v := range d {
			if !(v > 0) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("priors: CG-SENSE: preconditioning weight %d is %v; weights must be positive and finite", i, v)
			}
		}
	}
	cg, err := NewCG(n)
	if err != nil {
		return nil, err
	}
	return &CGSENSE{op: op, d: d, cg: cg, rhs: make([]complex128, n), data: make([]complex128, m),
		z: make([]complex128, n), tmp: make([]complex128, n)}, nil
}

// IntensityCorrection returns (Σ_c |S_c|²)^(−1/2) per pixel, the
// preconditioner of Pruessmann 2001 for CGSENSE built from sensitivity maps;
// pixels where every coil is blind get weight 1.
func IntensityCorrection(maps [][]complex128) ([]float64, error) {
	if len(maps) == 0 {
		return nil, errors.New("priors: intensity correction needs at least one sensitivity map")
	}
	d := make([]float64, len(maps[0]))
	if err := RootSumOfSquares(d, maps); err != nil {
		return nil, err
	}
	for i, v := range d {
		if v > 0 && !math.IsInf(v, 0) {
			d[i] = 1 / v
		} else {
			d[i] = 1
		}
	}
	return d, nil
}

// Len returns the number of image values.
func (s *CGSENSE) Len() int { return s.op.ImageLen() }

// Apply writes D(EᴴE + λI)D·src into dst (D = I without weights), making
// CGSENSE the Hermitian map that CG iterates on.
func (s *CGSENSE) Apply(dst, src []complex128) {
	in := src
	if s.d != nil {
		for i, v := range src {
			s.tmp[i] = complex(s.d[i], 0) * v
		}
		in = s.tmp
	}
	applyNormal(s.op, dst, in, s.data)
	if s.lambda != 0 {
		l := complex(s.lambda, 0)
		for i, v := range in {
			dst[i] += l * v
		}
	}
	if s.d != nil {
		for i, v := range dst {
			dst[i] = complex(s.d[i], 0) * v
		}
	}
}

// Solve writes the solution of (EᴴE + λI)x = Eᴴy into x, starting from the
// guess in x (zero it for a cold start). λ must be finite and ≥ 0; λ = 0 is
// refused when the operator measures fewer values than there are pixels
// (more unknowns than equations, as for uniform Cartesian SENSE at R above the
// number of coils), because the least-squares solution is then not unique.
func (s *CGSENSE) Solve(x, y []complex128, lambda float64, opt CGOptions) (CGReport, error) {
	n, m := s.op.ImageLen(), s.op.DataLen()
	if len(y) != m {
		return CGReport{}, fmt.Errorf("priors: CG-SENSE: %d samples given, the operator measures %d", len(y), m)
	}
	if len(x) != n {
		return CGReport{}, fmt.Errorf("priors: CG-SENSE: image has %d values, the operator wants %d", len(x), n)
	}
	if !(lambda >= 0) || math.IsInf(lambda, 0) {
		return CGReport{}, fmt.Errorf("priors: CG-SENSE: λ must be a finite number ≥ 0, got %v", lambda)
	}
	if lambda == 0 && m < n {
		return CGReport{}, fmt.Errorf("priors: CG-SENSE: %d measured values for %d unknown pixels (R above the number of coils); unregularised SENSE needs at least as many values as pixels: give λ > 0 or sample more", m, n)
	}
	s.lambda = lambda
	s.op.Adjoint(s.rhs, y)
	if s.d == nil {
		return s.cg.Solve(s, x, s.rhs, opt)
	}
	for i, v := range x {
		s.z[i] = v / complex(s.d[i], 0)
		s.rhs[i] *= complex(s.d[i], 0)
	}
	rep, err := s.cg.Solve(s, s.z, s.rhs, opt)
	if err != nil {
		return rep, err
	}
	for i, v := range s.z {
		x[i] = complex(s.d[i], 0) * v
	}
	return rep, nil
}

// RootSumOfSquares writes √(Σ_c |img_c|²) per pixel into dst: the
// root-sum-of-squares combination of coil images (Roemer PB, Edelstein WA,
// Hayes CE, Souza SP, Mueller OM, MRM 1990;16:192-225). Applied to coil
// images S_c·f it returns √(Σ_c |S_c|²)·|f|, the object weighted by the
// array's RSS sensitivity; applied to sensitivity maps it returns that
// sensitivity.
func RootSumOfSquares(dst []float64, coilImages [][]complex128) error {
	if len(coilImages) == 0 {
		return errors.New("priors: root-sum-of-squares of no coil image")
	}
	for c, img := range coilImages {
		if len(img) != len(dst) {
			return fmt.Errorf("priors: coil image %d has %d pixels, the result %d", c, len(img), len(dst))
		}
	}
	clear(dst)
	for _, img := range coilImages {
		for i, v := range img {
			dst[i] += real(v)*real(v) + imag(v)*imag(v)
		}
	}
	for i, v := range dst {
		dst[i] = math.Sqrt(v)
	}
	return nil
}
