package priors

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"accelplan/simulate"
)

// A worked example derived by hand from the formula of Pruessmann 1999: two
// coils, two pixels folded onto each other (R = 2), sensitivities (1, a) and
// (a, 1). Then SᴴS = [[1+a², 2a], [2a, 1+a²]], [(SᴴS)⁻¹]_11 =
// (1+a²)/((1+a²)² − 4a²) and g = (1+a²)/(1−a²) at both pixels.
func TestSENSEGFactorTwoCoils(t *testing.T) {
	for _, a := range []float64{0, 0.3, 0.7, -0.5} {
		maps := [][]complex128{{1, complex(a, 0)}, {complex(a, 0), 1}}
		g, err := SENSEGFactor(maps, 2, 1, 2, 1, nil)
		if err != nil {
			t.Fatal(err)
		}
		want := (1 + a*a) / (1 - a*a)
		for i, v := range g {
			if math.Abs(v-want) > 1e-14*want {
				t.Errorf("a = %g, pixel %d: g = %.16g, want %.16g", a, i, v, want)
			}
		}
	}
	// Identical sensitivities cannot be separated at all.
	g, err := SENSEGFactor([][]complex128{{1, 1}, {2i, 2i}}, 2, 1, 2, 1, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsInf(g[0], 1) || !math.IsInf(g[1], 1) {
		t.Errorf("coils with the same profile: g = %v, want +Inf", g)
	}
}

// g against a dense evaluation of the same formula with gonum: for pixel sets
// of the default 8-coil ring at R = 3×1 and 2×2, with a correlated noise
// covariance, SᴴΨ⁻¹S is formed and inverted through its real embedding with
// gonum's mat.Dense Inverse, Ψ⁻¹ too. Bound 1e-10 relative.
func TestSENSEGFactorMatchesGonum(t *testing.T) {
	const n = 24
	_, maps, _, _ := senseSetup(t, n, 8)
	psi := simulate.RingNoiseCovariance(8, 0.3)
	nc, err := simulate.NewNoiseCovariance(8, psi)
	if err != nil {
		t.Fatal(err)
	}
	var pinv mat.Dense
	if err := pinv.Inverse(gfEmbed(psi, 8, 8)); err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(61, 62))
	for _, r := range [][2]int{{3, 1}, {2, 2}, {1, 4}} {
		ry, rx := r[0], r[1]
		g, err := SENSEGFactor(maps, n, n, ry, rx, nc)
		if err != nil {
			t.Fatal(err)
		}
		R := ry * rx
		for range 6 {
			i0, j0 := rng.IntN(n/ry), rng.IntN(n/rx)
			var idx []int
			for a := range ry {
				for b := range rx {
					idx = append(idx, (i0+a*n/ry)*n+j0+b*n/rx)
				}
			}
			s := make([]complex128, 8*R)
			for c := range 8 {
				for k, p := range idx {
					s[c*R+k] = maps[c][p]
				}
			}
			se := gfEmbed(s, 8, R)
			var tmp, a, ainv mat.Dense
			tmp.Mul(&pinv, se)
			a.Mul(se.T(), &tmp)
			if err := ainv.Inverse(&a); err != nil {
				t.Fatal(err)
			}
			for k, p := range idx {
				want := math.Sqrt(ainv.At(k, k) * a.At(k, k))
				if math.Abs(g[p]-want) > 1e-10*want {
					t.Errorf("R=%d×%d pixel %d: g = %.12g, gonum %.12g", ry, rx, p, g[p], want)
				}
			}
		}
	}
}

// gfEmbed returns the real 2r×2c embedding [[Re, −Im], [Im, Re]] of a complex
// r×c matrix.
func gfEmbed(a []complex128, r, c int) *mat.Dense {
	m := mat.NewDense(2*r, 2*c, nil)
	for i := range r {
		for j := range c {
			v := a[i*c+j]
			m.Set(i, j, real(v))
			m.Set(i, j+c, -imag(v))
			m.Set(i+r, j, imag(v))
			m.Set(i+r, j+c, real(v))
		}
	}
	return m
}

// g ≥ 1 everywhere, with equality only for a single pixel per set, and
// g = 1 exactly at R = 1: properties of the formula (Pruessmann 1999; by
// Cauchy-Schwarz [A⁻¹]_kk·A_kk ≥ 1 for a positive definite A), for white and
// correlated noise. The mean and largest g over the Shepp-Logan support of
// the default 8-coil ring are logged.
func TestSENSEGFactorBounds(t *testing.T) {
	const n = 48
	_, maps, _, sup := senseSetup(t, n, 8)
	nc, _ := simulate.NewNoiseCovariance(8, simulate.RingNoiseCovariance(8, 0.3))
	for _, noise := range []*simulate.NoiseCovariance{nil, nc} {
		for _, r := range [][2]int{{1, 1}, {2, 1}, {1, 2}, {3, 1}, {2, 2}, {4, 1}} {
			g, err := SENSEGFactor(maps, n, n, r[0], r[1], noise)
			if err != nil {
				t.Fatal(err)
			}
			var sum, hi float64
			var cnt int
			for i, v := range g {
				if r == [2]int{1, 1} && math.Abs(v-1) > 1e-12 {
					t.Fatalf("R = 1: g = %.15g at pixel %d, want 1", v, i)
				}
				if !(v >= 1-1e-12) {
					t.Fatalf("R = %d×%d: g = %.15g < 1 at pixel %d", r[0], r[1], v, i)
				}
				if sup[i] {
					sum += v
					hi = math.Max(hi, v)
					cnt++
				}
			}
			t.Logf("correlated noise %v, R = %d×%d: g over the object mean %.3f, max %.3f", noise != nil, r[0], r[1], sum/float64(cnt), hi)
		}
	}
}

// The analytic g-factor against pseudo-replicas (Robson 2008) of CG-SENSE:
// M = 100 noise-only replicas per reconstruction on a 24² grid, 8 coils,
// uniform R = 2 and R = 3 with white noise and R = 2 with correlated noise
// (whitened), CG run to a relative residual of 1e-8. (R = 4, where g reaches
// 20 and CG needs hundreds of iterations, agreed as well when run once —
// z mean −0.017, std 0.968, max |z| 3.06 — but takes 6 s and is left out.) Statistical error: a standard deviation estimated from ν
// degrees of freedom has a relative standard error of about 1/√(2ν) (for M
// real samples ν = M − 1, giving 1/√(2(M−1)); here each replica gives a real
// and an imaginary value, so ν = 2(M−1)); g is the ratio of two independent
// such estimates, so its relative standard error is
// se = √2/√(4(M−1)) = 1/√(2(M−1)) ≈ 0.071. With z = (g_replica/g_analytic −
// 1)/se per pixel, the test asks that the mean of z over the image be within
// 4/√(N/R) of 0 (pixels of one aliased set share their noise), that the
// standard deviation of z be within 0.8…1.2 (it is 1 when the analytic
// formula and the replicas agree and se is right), and that no |z| exceed 5.
func TestSENSEReplicaGFactorAgreesWithAnalytic(t *testing.T) {
	const n, M = 24, 100
	_, maps, _, _ := senseSetup(t, n, 8)
	nc, _ := simulate.NewNoiseCovariance(8, simulate.RingNoiseCovariance(8, 0.3))
	se := 1 / math.Sqrt(2*(M-1))
	for _, tc := range []struct {
		name  string
		r     int
		noise *simulate.NoiseCovariance
		seed  uint64
	}{
		{"R=2 white", 2, nil, 100},
		{"R=3 white", 3, nil, 200},
		{"R=2 correlated", 2, nc, 300},
	} {
		full, err := simulate.NewCartesianSENSE(n, n, senseUniformMask(n, n, 1, 1), maps, tc.noise)
		if err != nil {
			t.Fatal(err)
		}
		accel, err := simulate.NewCartesianSENSE(n, n, senseUniformMask(n, n, tc.r, 1), maps, tc.noise)
		if err != nil {
			t.Fatal(err)
		}
		gr, err := SENSEReplicaGFactor(full, accel, tc.noise, ReplicaOptions{Replicas: M, Seed: tc.seed, CG: CGOptions{MaxIter: 500, Tol: 1e-8}})
		if err != nil {
			t.Fatal(err)
		}
		ga, err := SENSEGFactor(maps, n, n, tc.r, 1, tc.noise)
		if err != nil {
			t.Fatal(err)
		}
		var sz, szz, zmax, gmean float64
		for i := range ga {
			z := (gr[i]/ga[i] - 1) / se
			sz += z
			szz += z * z
			zmax = math.Max(zmax, math.Abs(z))
			gmean += ga[i]
		}
		N := float64(len(ga))
		mean := sz / N
		std := math.Sqrt(szz/N - mean*mean)
		t.Logf("%s: mean analytic g %.3f; z = (g_replica/g_analytic − 1)/%.3f has mean %.3f, std %.3f, max |z| %.2f", tc.name, gmean/N, se, mean, std, zmax)
		if math.Abs(mean) > 4/math.Sqrt(N/float64(tc.r)) {
			t.Errorf("%s: mean z = %.3f, want within ±%.3f", tc.name, mean, 4/math.Sqrt(N/float64(tc.r)))
		}
		if std < 0.8 || std > 1.2 {
			t.Errorf("%s: std of z = %.3f, want 0.8 … 1.2", tc.name, std)
		}
		if zmax > 5 {
			t.Errorf("%s: largest |z| = %.2f, want ≤ 5", tc.name, zmax)
		}
	}
}

// ReplicaStd on the identity reconstruction measures the noise it is given:
// σ = 0.3 per channel, M = 50 replicas of 2000 pixels; the mean estimate must
// be within 4 standard errors (0.3·(1/√(4(M−1)))/√2000) of σ.
func TestReplicaStdOfIdentity(t *testing.T) {
	const n, M, sigma = 2000, 50, 0.3
	std, err := ReplicaStd(func(x, y []complex128) error { copy(x, y); return nil },
		make([]complex128, n), n,
		func(y []complex128, rng *rand.Rand) error {
			simulate.AddNoise(y, sigma, rng)
			return nil
		}, M, 7)
	if err != nil {
		t.Fatal(err)
	}
	var mean float64
	for _, v := range std {
		mean += v
	}
	mean /= n
	bound := 4 * sigma / math.Sqrt(4*(M-1)) / math.Sqrt(n)
	if math.Abs(mean-sigma) > bound {
		t.Errorf("mean std %.5f, want %.3f ± %.5f", mean, sigma, bound)
	}
}

func TestGFactorRejects(t *testing.T) {
	const n = 16
	_, maps, _, _ := senseSetup(t, n, 4)
	cases := []struct {
		name string
		err  func() error
		want string
	}{
		{"R above the coil count", func() error { _, err := SENSEGFactor(maps, n, n, 8, 1, nil); return err },
			"needs at least that many receive coils; this array has 4 coils (allowed: R ≤ 4)"},
		{"2D R above the coil count", func() error { _, err := SENSEGFactor(maps, n, n, 2, 4, nil); return err }, "R = 8"},
		{"matrix not a multiple of R", func() error { _, err := SENSEGFactor(maps, n, n, 3, 1, nil); return err }, "multiple of the acceleration"},
		{"short map", func() error {
			_, err := SENSEGFactor([][]complex128{make([]complex128, 3), maps[1]}, n, n, 2, 1, nil)
			return err
		}, "has 3 pixels"},
		{"noise size", func() error {
			nc, _ := simulate.NewNoiseCovariance(3, nil)
			_, err := SENSEGFactor(maps, n, n, 2, 1, nc)
			return err
		}, "noise covariance for 3 coils"},
		{"one replica", func() error {
			_, err := ReplicaStd(func(x, y []complex128) error { return nil }, make([]complex128, 4), 4,
				func([]complex128, *rand.Rand) error { return nil }, 1, 1)
			return err
		}, "at least 2"},
		{"ratio lengths", func() error { _, err := ReplicaGFactor(make([]float64, 3), make([]float64, 4), 2); return err }, "3 accelerated and 4"},
		{"ratio R", func() error { _, err := ReplicaGFactor(make([]float64, 3), make([]float64, 3), 0.5); return err }, "R = 0.5"},
		{"operators differ", func() error {
			a, _ := simulate.NewCartesianSENSE(n, n, senseUniformMask(n, n, 1, 1), maps, nil)
			b, _ := simulate.NewCartesianSENSE(n, n, senseUniformMask(n, n, 2, 1), maps[:2], nil)
			_, err := SENSEReplicaGFactor(a, b, nil, ReplicaOptions{})
			return err
		}, "operators differ"},
	}
	for _, c := range cases {
		err := c.err()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}

// g-factor of the default 8-coil ring at R = 2 along y on a 64² grid.
func ExampleSENSEGFactor() {
	const n = 64
	coils, _ := simulate.DefaultCoilRing(8).Build()
	maps, _ := coils.Maps(n, n)
	g, err := SENSEGFactor(maps, n, n, 2, 1, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	sup := simulate.ModifiedSheppLogan().Support(n, n)
	var hi float64
	for i, v := range g {
		if sup[i] {
			hi = math.Max(hi, v)
		}
	}
	fmt.Printf("largest g over the object at R = 2: %.2f\n", hi)
	_, err = SENSEGFactor(maps, n, n, 16, 1, nil)
	fmt.Println(err)
	// Output:
	// largest g over the object at R = 2: 1.15
	// simulate: uniform Cartesian SENSE at R = 16 folds 16 pixels onto each measured one and needs at least that many receive coils; this array has 8 coils (allowed: R ≤ 8)
}
