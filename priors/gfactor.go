package priors

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"

	"accelplan/simulate"
)

// SENSEGFactor returns the geometry factor g per pixel of SENSE for uniform
// Cartesian undersampling by ry along y (every ry-th k-space row kept) and rx
// along x (every rx-th column), on the ny-by-nx grid of the sensitivity maps:
// the analytic formula of Pruessmann KP, Weiger M, Scheidegger MB, Boesiger P,
// MRM 1999;42:952-962 (Eq. 23),
//
//	g_ρ = √([(SᴴΨ⁻¹S)⁻¹]_ρρ · [SᴴΨ⁻¹S]_ρρ) ≥ 1,
//
// where, for each set of R = ry·rx pixels that fold onto one another (FOV/ry
// apart in y and FOV/rx apart in x), S is the N×R matrix of the coils'
// sensitivities at those pixels and Ψ the coils' noise covariance (noise nil
// means Ψ = I). The SNR of the SENSE image is then SNR_full/(g·√R). The
// result does not depend on which row and column offset the mask starts at.
//
// ny must be a multiple of ry, nx of rx, and the array needs at least R coils
// (simulate.CheckSENSEFactor). A pixel set the coils cannot separate at all
// (SᴴΨ⁻¹S singular) gets g = +Inf.
func SENSEGFactor(maps [][]complex128, ny, nx, ry, rx int, noise *simulate.NoiseCovariance) ([]float64, error) {
	N := len(maps)
	if ny < 1 || nx < 1 {
		return nil, fmt.Errorf("priors: g-factor: grid %d×%d; both sizes must be ≥ 1", ny, nx)
	}
	if ry < 1 || rx < 1 {
		return nil, fmt.Errorf("priors: g-factor: acceleration %d×%d; both factors must be ≥ 1", ry, rx)
	}
	if ny%ry != 0 || nx%rx != 0 {
		return nil, fmt.Errorf("priors: g-factor: uniform undersampling needs the matrix %d×%d to be a multiple of the acceleration %d×%d", ny, nx, ry, rx)
	}
	R := ry * rx
	if err := simulate.CheckSENSEFactor(N, float64(R)); err != nil {
		return nil, err
	}
	for c, m := range maps {
		if len(m) != ny*nx {
			return nil, fmt.Errorf("priors: g-factor: sensitivity map %d has %d pixels, want %d×%d = %d", c, len(m), ny, nx, ny*nx)
		}
	}
	var pinv []complex128
	if noise != nil {
		if noise.Coils() != N {
			return nil, fmt.Errorf("priors: g-factor: noise covariance for %d coils, %d maps given", noise.Coils(), N)
		}
		if !noise.IsIdentity() {
			pinv = noise.Inverse()
		}
	}
	g := make([]float64, ny*nx)
	py, px := ny/ry, nx/rx
	idx := make([]int, R)
	S := make([]complex128, N*R)
	B := make([]complex128, N*R)
	A := make([]complex128, R*R)
	L := make([]complex128, R*R)
	Li := make([]complex128, R*R)
	for i := range py {
		for j := range px {
			for a := range ry {
				for b := range rx {
					idx[a*rx+b] = (i+a*py)*nx + j + b*px
				}
			}
			for c, m := range maps {
				for k, p := range idx {
					S[c*R+k] = m[p]
				}
			}
			if pinv == nil {
				copy(B, S)
			} else {
				for c := range N {
					for k := range R {
						var s complex128
						for d := range N {
							s += pinv[c*N+d] * S[d*R+k]
						}
						B[c*R+k] = s
					}
				}
			}
			for k := range R {
				for l := range R {
					var s complex128
					for c := range N {
						s += cmplx.Conj(S[c*R+k]) * B[c*R+l]
					}
					A[k*R+l] = s
				}
			}
			if !smallCholesky(A, L, R) {
				for _, p := range idx {
					g[p] = math.Inf(1)
				}
				continue
			}
			smallLowerInverse(L, Li, R)
			for k, p := range idx {
				// [A⁻¹]_kk = Σ_i |(L⁻¹)_ik|², since A⁻¹ = L⁻ᴴL⁻¹.
				var d float64
				for r := k; r < R; r++ {
					v := Li[r*R+k]
					d += real(v)*real(v) + imag(v)*imag(v)
				}
				g[p] = math.Sqrt(d * real(A[k*R+k]))
			}
		}
	}
	return g, nil
}

// smallCholesky writes into l the lower-triangular factor of the Hermitian
// n×n matrix a = l·lᴴ (Golub GH, Van Loan CF, Matrix Computations, 4th ed.,
// 2013, Algorithm 4.2.1) and reports whether a is numerically positive
// definite.
func smallCholesky(a, l []complex128, n int) bool {
	clear(l)
	var scale float64
	for j := range n {
		scale = max(scale, real(a[j*n+j]))
	}
	for j := range n {
		d := real(a[j*n+j])
		for k := range j {
			v := l[j*n+k]
			d -= real(v)*real(v) + imag(v)*imag(v)
		}
		if !(d > 1e-13*scale) {
			return false
		}
		ljj := math.Sqrt(d)
		l[j*n+j] = complex(ljj, 0)
		for i := j + 1; i < n; i++ {
			s := a[i*n+j]
			for k := range j {
				s -= l[i*n+k] * cmplx.Conj(l[j*n+k])
			}
			l[i*n+j] = s / complex(ljj, 0)
		}
	}
	return true
}

// smallLowerInverse writes the inverse of the lower-triangular n×n matrix l
// into inv by forward substitution.
func smallLowerInverse(l, inv []complex128, n int) {
	clear(inv)
	for j := range n {
		inv[j*n+j] = 1 / l[j*n+j]
		for i := j + 1; i < n; i++ {
			var s complex128
			for k := j; k < i; k++ {
				s += l[i*n+k] * inv[k*n+j]
			}
			inv[i*n+j] = -s / l[i*n+i]
		}
	}
}

// ReplicaStd estimates the noise standard deviation of a reconstruction per
// pixel by the pseudo-replica method of Robson PM, Grant AK, Madhuranthakam
// AJ, Lattanzi R, Sodickson DK, McKenzie CA, MRM 2008;60:895-907: it
// reconstructs replicas data = clean + noise, the noise drawn afresh each
// time by draw from rng = rand.New(rand.NewPCG(seed, 0x5eed)), and returns
// for each pixel √(Σ_m |x_m − x̄|² / (2(M − 1))) over the M replicas, the
// standard deviation per real and imaginary channel. It works for any
// reconstruction, linear or not (for a nonlinear one the noise depends on the
// signal, so pass the clean data; for a linear one zero data give the same
// answer). For complex Gaussian noise the estimate has 2(M − 1) degrees of
// freedom, so its relative standard error is about 1/√(4(M − 1)).
//
// recon writes the image of data y into x (x holds the previous image on
// entry, usable as a warm start, or zeros the first time).
func ReplicaStd(recon func(x, y []complex128) error, clean []complex128, imageLen int,
	draw func(y []complex128, rng *rand.Rand) error, replicas int, seed uint64) ([]float64, error) {
	if recon == nil || draw == nil {
		return nil, errors.New("priors: pseudo-replicas need a reconstruction and a noise draw")
	}
	if replicas < 2 {
		return nil, fmt.Errorf("priors: pseudo-replicas: %d replicas; at least 2 are needed for a standard deviation", replicas)
	}
	if imageLen < 1 || len(clean) < 1 {
		return nil, fmt.Errorf("priors: pseudo-replicas: image of %d values, data of %d; both must be ≥ 1", imageLen, len(clean))
	}
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	y := make([]complex128, len(clean))
	x := make([]complex128, imageLen)
	mean := make([]complex128, imageLen)
	m2 := make([]float64, imageLen)
	for r := range replicas {
		copy(y, clean)
		if err := draw(y, rng); err != nil {
			return nil, err
		}
		clear(x)
		if err := recon(x, y); err != nil {
			return nil, err
		}
		// Welford's running mean and sum of squared deviations (Welford BP,
		// Technometrics 1962;4:419-420), per pixel.
		inv := complex(1/float64(r+1), 0)
		for i, v := range x {
			d := v - mean[i]
			mean[i] += d * inv
			e := v - mean[i]
			m2[i] += real(d)*real(e) + imag(d)*imag(e)
		}
	}
	std := make([]float64, imageLen)
	for i, v := range m2 {
		std[i] = math.Sqrt(v / (2 * float64(replicas-1)))
	}
	return std, nil
}

// ReplicaGFactor returns g = σ_R/(σ_full·√R) per pixel from the noise
// standard deviations of an accelerated and a fully sampled reconstruction
// (Robson 2008, Eq. 5). Pixels where σ_full is 0 get NaN.
func ReplicaGFactor(stdAccel, stdFull []float64, r float64) ([]float64, error) {
	if len(stdAccel) != len(stdFull) {
		return nil, fmt.Errorf("priors: g-factor: %d accelerated and %d fully sampled standard deviations", len(stdAccel), len(stdFull))
	}
	if !(r >= 1) || math.IsInf(r, 0) {
		return nil, fmt.Errorf("priors: g-factor: acceleration R = %v must be a finite number ≥ 1", r)
	}
	g := make([]float64, len(stdAccel))
	sr := math.Sqrt(r)
	for i, a := range stdAccel {
		if stdFull[i] > 0 {
			g[i] = a / (stdFull[i] * sr)
		} else {
			g[i] = math.NaN()
		}
	}
	return g, nil
}

// ReplicaOptions tune SENSEReplicaGFactor.
type ReplicaOptions struct {
	// Replicas is the number M of noise replicas per reconstruction, ≥ 2;
	// 0 means 100.
	Replicas int
	// Seed seeds the noise: the fully sampled replicas draw from
	// rand.NewPCG(Seed, 0x5eed), the accelerated ones from
	// rand.NewPCG(Seed+1, 0x5eed).
	Seed uint64
	// Lambda is the Tikhonov damping of both CG-SENSE reconstructions.
	Lambda float64
	// CG controls both solves; the zero value means 500 iterations and a
	// relative residual of 1e-10, close enough to convergence that the
	// replicas measure the noise of the exact SENSE solution.
	CG CGOptions
}

// SENSEReplicaGFactor measures the g-factor of CG-SENSE by pseudo-replicas
// (Robson 2008): it reconstructs opt.Replicas noise-only data sets with the
// fully sampled operator full and as many with the accelerated operator
// accel (same maps, same image grid), the noise of σ = 1 per channel drawn
// with covariance noise (nil means white) and whitened when the operators
// whiten, and returns ReplicaGFactor of the two standard deviation maps with
// R = full.DataLen()/accel.DataLen(). Both reconstructions use the intensity
// correction of the maps as preconditioner.
func SENSEReplicaGFactor(full, accel *simulate.SENSE, noise *simulate.NoiseCovariance, opt ReplicaOptions) ([]float64, error) {
	if full == nil || accel == nil {
		return nil, errors.New("priors: g-factor: need both a fully sampled and an accelerated SENSE operator")
	}
	if full.ImageLen() != accel.ImageLen() || full.Coils() != accel.Coils() {
		return nil, fmt.Errorf("priors: g-factor: operators differ: %d and %d pixels, %d and %d coils", full.ImageLen(), accel.ImageLen(), full.Coils(), accel.Coils())
	}
	if opt.Replicas == 0 {
		opt.Replicas = 100
	}
	if opt.CG == (CGOptions{}) {
		opt.CG = CGOptions{MaxIter: 500, Tol: 1e-10}
	}
	if noise == nil {
		var err error
		if noise, err = simulate.NewNoiseCovariance(full.Coils(), nil); err != nil {
			return nil, err
		}
	}
	if noise.Coils() != full.Coils() {
		return nil, fmt.Errorf("priors: g-factor: noise covariance for %d coils, operators have %d", noise.Coils(), full.Coils())
	}
	std := func(op *simulate.SENSE, seed uint64) ([]float64, error) {
		d, err := IntensityCorrection(op.Maps())
		if err != nil {
			return nil, err
		}
		s, err := NewCGSENSE(op, d)
		if err != nil {
			return nil, err
		}
		whiten := op.Noise() != nil
		draw := func(y []complex128, rng *rand.Rand) error {
			if err := noise.AddNoise(y, 1, rng); err != nil {
				return err
			}
			if whiten {
				return op.Noise().Whiten(y)
			}
			return nil
		}
		recon := func(x, y []complex128) error {
			_, err := s.Solve(x, y, opt.Lambda, opt.CG)
			return err
		}
		return ReplicaStd(recon, make([]complex128, op.DataLen()), op.ImageLen(), draw, opt.Replicas, seed)
	}
	sf, err := std(full, opt.Seed)
	if err != nil {
		return nil, err
	}
	sa, err := std(accel, opt.Seed+1)
	if err != nil {
		return nil, err
	}
	return ReplicaGFactor(sa, sf, float64(full.DataLen())/float64(accel.DataLen()))
}
