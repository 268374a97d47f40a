package plans

import (
	"fmt"
	"math"
	"sync"

	"accelplan/priors"
	"accelplan/simulate"
	"accelplan/simulate/nufft"
	"accelplan/simulate/odt"
)

// encoding is what one worker needs to simulate and reconstruct one
// candidate: its own operator (with scratch), the shared noiseless data, the
// density-compensation weights of a non-Cartesian trajectory, and the
// gradient step of first-order solvers.
type encoding struct {
	op      simulate.Operator
	clean   []complex128 // shared read-only by every worker
	weights []float64    // nil for Cartesian masks
	step    float64      // 1/L with L ≥ ‖EᴴE‖
	mask    []bool       // the Cartesian mask, nil off the grid
	// toeplitz is EᴴE of a single-coil non-Cartesian encoding by Toeplitz
	// embedding, built when a plan's method solves normal equations.
	toeplitz *nufft.Toeplitz
}

// cleanData holds the noiseless data of every candidate, each computed once
// from the analytic phantom and then shared.
type cleanData struct {
	once []sync.Once
	data [][]complex128
	err  []error
}

func newCleanData(n int) *cleanData {
	return &cleanData{once: make([]sync.Once, n), data: make([][]complex128, n), err: make([]error, n)}
}

// encodingFor returns the worker's encoding of candidate ci, building it on
// first use.
func (w *workerState) encodingFor(ci int) (*encoding, error) {
	if e, ok := w.encs[ci]; ok {
		return e, nil
	}
	env := w.env
	s := env.out.Candidates[ci].Sampling
	e := &encoding{}
	if env.plan.Is3D() {
		if err := w.encoding3D(ci, e); err != nil {
			return nil, err
		}
	} else if env.plan.Modality == ModalityODT {
		if err := w.odtEncoding(ci, e); err != nil {
			return nil, err
		}
	} else if env.coils != nil {
		if err := w.senseEncoding(ci, e); err != nil {
			return nil, err
		}
	} else if s.Mask != nil {
		op, err := simulate.NewCartesian(env.ny, env.nx, s.Mask)
		if err != nil {
			return nil, err
		}
		e.op, e.step, e.mask = op, 1, s.Mask // a masked orthonormal FFT has ‖E‖ = 1
		env.clean.once[ci].Do(func() {
			d := make([]complex128, op.DataLen())
			op.Gather(d, env.spectrum)
			env.clean.data[ci] = d
		})
	} else {
		kx, ky := splitK(s.K)
		op, err := nufft.New(env.ny, env.nx, kx, ky, nufft.Options{})
		if err != nil {
			return nil, fmt.Errorf("candidate %s: %w", env.out.Candidates[ci].Key(), err)
		}
		e.op, e.weights = op, s.Weights
		if usesNormalEquations(env.plan) {
			if e.toeplitz, err = nufft.NewToeplitz(env.ny, env.nx, kx, ky, nil, nufft.Options{}); err != nil {
				return nil, err
			}
		}
		env.clean.once[ci].Do(func() {
			// The exact spectrum of the analytic phantom at every
			// trajectory point: no gridding of the truth is involved.
			if im, ok := env.phantom.(*simulate.ImagePhantom); ok {
				// A gridded object: its batch path, scaled like
				// CartesianSample.
				d, err := im.SpectrumPoints(kx, ky)
				scale := complex(math.Sqrt(float64(env.nx*env.ny)), 0)
				for j := range d {
					d[j] *= scale
				}
				env.clean.data[ci], env.clean.err[ci] = d, err
				return
			}
			d := make([]complex128, len(s.K))
			for j, k := range s.K {
				d[j] = simulate.CartesianSample(env.phantom, k[0], k[1], env.nx, env.ny)
			}
			env.clean.data[ci] = d
		})
	}
	if e.step == 0 {
		// The power iteration is seeded from the candidate, so every
		// worker finds the same step.
		l, err := priors.NormalNorm(e.op, 60, 1e-9, seedFor(env.plan.Seed, "norm|"+env.out.Candidates[ci].SeedKey()))
		if err != nil {
			return nil, err
		}
		e.step = 1 / (1.01 * l)
	}
	if err := env.clean.err[ci]; err != nil {
		return nil, err
	}
	e.clean = env.clean.data[ci]
	w.encs[ci] = e
	return e, nil
}

// senseEncoding builds the multi-coil encoding E = [F·S_1; …; F·S_N] of
// candidate ci over its mask or trajectory, with the exact coil-weighted
// spectrum of the phantom as data (each exponential term of a sensitivity
// shifts the phantom's spectrum) and prewhitening when the coil noise is
// correlated.
func (w *workerState) senseEncoding(ci int, e *encoding) error {
	env := w.env
	s := env.out.Candidates[ci].Sampling
	if s.Mask != nil {
		op, err := simulate.NewCartesianSENSE(env.ny, env.nx, s.Mask, env.maps, env.coilNoise)
		if err != nil {
			return err
		}
		e.op = op
		env.clean.once[ci].Do(func() {
			env.clean.data[ci], env.clean.err[ci] = env.coils.CartesianData(env.phantom, env.ny, env.nx, s.Mask)
		})
	} else {
		kx, ky := splitK(s.K)
		op, err := simulate.NewNUFFTSENSE(env.ny, env.nx, kx, ky, nufft.Options{}, env.maps, env.coilNoise)
		if err != nil {
			return fmt.Errorf("candidate %s: %w", env.out.Candidates[ci].Key(), err)
		}
		e.op = op
		// The density weights repeat for every coil (data are coil-major).
		e.weights = make([]float64, 0, len(s.Weights)*len(env.maps))
		for range env.maps {
			e.weights = append(e.weights, s.Weights...)
		}
		env.clean.once[ci].Do(func() {
			env.clean.data[ci], env.clean.err[ci] = env.coils.Samples(env.phantom, env.ny, env.nx, kx, ky, 1)
		})
	}
	return nil
}

// odtEncoding builds the diffraction-tomography operator of candidate ci:
// the Ewald arcs of its illuminations, the Born data of the specimen drawn
// from its exact spectrum on those arcs, and gridding weights that undo the
// physical factor of each sample (w/|F|², so that Eᴴ(w/|F|²·y) grids y/F).
func (w *workerState) odtEncoding(ci int, e *encoding) error {
	env := w.env
	c := env.out.Candidates[ci]
	pattern := env.plan.Schemes[c.Scheme].Pattern
	ill, err := odt.Illuminations(env.setup, pattern, c.Sampling.Shots)
	if err != nil {
		return err
	}
	arcs, err := odt.NewArcs(env.setup, ill)
	if err != nil {
		return err
	}
	op, err := odt.NewOperator(arcs, nufft.Options{})
	if err != nil {
		return err
	}
	if len(c.Sampling.Weights) != arcs.Len() {
		return fmt.Errorf("candidate %s: %d density weights for %d arc samples", c.Key(), len(c.Sampling.Weights), arcs.Len())
	}
	e.op = op
	e.weights = make([]float64, arcs.Len())
	for j, f := range arcs.Factor {
		a := real(f)*real(f) + imag(f)*imag(f)
		if a == 0 {
			return fmt.Errorf("candidate %s: arc sample %d has no signal factor", c.Key(), j)
		}
		e.weights[j] = c.Sampling.Weights[j] / a
	}
	env.clean.once[ci].Do(func() {
		env.clean.data[ci], env.clean.err[ci] = odt.BornData(arcs, env.specimen)
	})
	return nil
}

// usesNormalEquations reports whether a plan has a method that solves the
// normal equations by CG, which the Toeplitz embedding speeds up off the
// grid.
func usesNormalEquations(p *Plan) bool {
	for _, r := range p.Recons {
		if r.Method == MethodTikhonov {
			return true
		}
	}
	return false
}
