package wavelet_test

import (
	"fmt"
	"math"
	"math/rand/v2"

	"accelplan/priors/wavelet"
)

// The db4 analysis low-pass taps, as in Daubechies (1992), Table 6.1, in the
// decomposition order of the periodic transform.
func ExampleFilters() {
	fb, err := wavelet.Filters("db4")
	if err != nil {
		panic(err)
	}
	for _, h := range fb.DecLo {
		fmt.Printf("%.12f\n", h)
	}
	// Output:
	// -0.010597401785
	// 0.032883011667
	// 0.030841381836
	// -0.187034811719
	// -0.027983769417
	// 0.630880767930
	// 0.714846570553
	// 0.230377813309
}

// A plan for 64×64 images, three levels of db2: the coarse approximation is
// the top-left 8×8 block, a smooth periodic wave puts most of its energy
// there, and
// the transform is an isometry with an exact inverse.
func ExampleNew() {
	w, err := wavelet.New(64, 64, 3, "db2")
	if err != nil {
		panic(err)
	}
	x := make([]complex128, w.Len())
	for i := range 64 {
		for j := range 64 {
			x[i*64+j] = complex(math.Sin(2*math.Pi*float64(i+2*j)/64), 0)
		}
	}
	c := make([]complex128, w.Len())
	w.Forward(c, x)
	var all, approx float64
	for i, v := range c {
		e := real(v)*real(v) + imag(v)*imag(v)
		all += e
		if w.IsApprox(i) {
			approx += e
		}
	}
	back := make([]complex128, w.Len())
	w.Inverse(back, c)
	var worst float64
	for i := range x {
		worst = math.Max(worst, math.Abs(real(back[i]-x[i])))
	}
	rows, cols := w.ApproxSize()
	fmt.Printf("approximation %d×%d holds %.1f%% of the energy\n", rows, cols, 100*approx/all)
	fmt.Printf("round trip exact to 1e-12: %v\n", worst < 1e-12)
	// Output:
	// approximation 8×8 holds 93.3% of the energy
	// round trip exact to 1e-12: true
}

// Asking for more levels than the filter allows is an error, not a panic.
func ExampleNew_tooDeep() {
	_, err := wavelet.New(64, 64, 4, "db4")
	fmt.Println(err)
	// Output:
	// wavelet: 4 levels too deep for db4 (8 taps) on 64×64: at most 3 (each side must be ≥ 2^levels·7)
}

// Wavelet shrinkage of a noisy square: the soft threshold at the universal
// threshold σ·√(2 ln n) (Donoho DL, Johnstone IM, Biometrika
// 1994;81:425-455) removes a quarter of the error here; what is left sits at
// the edges of the square, which a decimated transform smears.
func ExampleTransform_Shrink() {
	const n, sigma = 64, 0.05
	w, err := wavelet.New(n, n, 3, "db4")
	if err != nil {
		panic(err)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	truth := make([]complex128, n*n)
	noisy := make([]complex128, n*n)
	for i := range n {
		for j := range n {
			if i >= 16 && i < 48 && j >= 16 && j < 48 {
				truth[i*n+j] = 1
			}
			noisy[i*n+j] = truth[i*n+j] + complex(sigma*rng.NormFloat64(), sigma*rng.NormFloat64())
		}
	}
	rms := func(x []complex128) float64 {
		var s float64
		for i, v := range x {
			d := v - truth[i]
			s += real(d)*real(d) + imag(d)*imag(d)
		}
		return math.Sqrt(s / float64(len(x)))
	}
	out := make([]complex128, n*n)
	w.Shrink(out, noisy, sigma*math.Sqrt(2*math.Log(n*n)))
	fmt.Printf("rms error: noisy %.3f, shrunk %.3f\n", rms(noisy), rms(out))
	// Output:
	// rms error: noisy 0.071, shrunk 0.053
}
