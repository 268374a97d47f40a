package nufft

import (
	"math"
	"math/rand/v2"
)

// This file holds the exact references the tests compare against: the
// non-uniform DFT written out as the direct sum of its definition (package
// doc), and seeded random inputs.

// ndft returns y_j = (nx·ny)^(−1/2) Σ_{i,l} x[i,l] exp(−2πi(kx_j·x_l + ky_j·y_i))
// with x_l = (l − nx/2)/nx, y_i = (i − ny/2)/ny, summed directly.
func ndft(ny, nx int, kx, ky []float64, x []complex128) []complex128 {
	y := make([]complex128, len(kx))
	ex := make([]complex128, nx)
	ey := make([]complex128, ny)
	s := 1 / math.Sqrt(float64(nx*ny))
	for j := range kx {
		phasors(ex, kx[j], nx, -1)
		phasors(ey, ky[j], ny, -1)
		var acc complex128
		for i := range ny {
			var r complex128
			for l, v := range x[i*nx : (i+1)*nx] {
				r += v * ex[l]
			}
			acc += r * ey[i]
		}
		y[j] = acc * complex(s, 0)
	}
	return y
}

// ndftAdjoint returns the adjoint sum x[i,l] = (nx·ny)^(−1/2) Σ_j y_j
// exp(+2πi(kx_j·x_l + ky_j·y_i)).
func ndftAdjoint(ny, nx int, kx, ky []float64, y []complex128) []complex128 {
	x := make([]complex128, nx*ny)
	ex := make([]complex128, nx)
	ey := make([]complex128, ny)
	s := 1 / math.Sqrt(float64(nx*ny))
	for j := range kx {
		phasors(ex, kx[j], nx, +1)
		phasors(ey, ky[j], ny, +1)
		v := y[j] * complex(s, 0)
		for i := range ny {
			a := v * ey[i]
			row := x[i*nx : (i+1)*nx]
			for l := range row {
				row[l] += a * ex[l]
			}
		}
	}
	return x
}

// phasors writes exp(sign·2πi·k·(l − n/2)/n) for l = 0 … n−1 into e.
func phasors(e []complex128, k float64, n, sign int) {
	c := n / 2
	for l := range e {
		s, co := math.Sincos(float64(sign) * 2 * math.Pi * k * float64(l-c) / float64(n))
		e[l] = complex(co, s)
	}
}

// randomPoints draws m points uniformly in the band |kx| ≤ nx/2, |ky| ≤ ny/2
// and puts a few exactly on its corners and edges.
func randomPoints(ny, nx, m int, seed uint64) (kx, ky []float64) {
	r := rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15))
	kx, ky = make([]float64, m), make([]float64, m)
	hx, hy := float64(nx)/2, float64(ny)/2
	for j := range kx {
		kx[j] = (2*r.Float64() - 1) * hx
		ky[j] = (2*r.Float64() - 1) * hy
	}
	edges := [][2]float64{{-hx, -hy}, {hx, hy}, {-hx, hy}, {hx, -hy}, {0, hy}, {hx, 0}, {0, 0}}
	for j, e := range edges {
		if j < m {
			kx[j], ky[j] = e[0], e[1]
		}
	}
	return kx, ky
}

// randomComplex draws n standard complex Gaussian values.
func randomComplex(n int, seed uint64) []complex128 {
	r := rand.New(rand.NewPCG(seed, 0x2545f4914f6cdd1d))
	v := make([]complex128, n)
	for i := range v {
		v[i] = complex(r.NormFloat64(), r.NormFloat64())
	}
	return v
}

// relErr returns ‖a − b‖/‖b‖.
func relErr(a, b []complex128) float64 {
	var num, den float64
	for i := range a {
		d := a[i] - b[i]
		num += real(d)*real(d) + imag(d)*imag(d)
		den += real(b[i])*real(b[i]) + imag(b[i])*imag(b[i])
	}
	return math.Sqrt(num / den)
}

// dot returns ⟨a, b⟩ = Σ conj(a_i)·b_i.
func dot(a, b []complex128) complex128 {
	var s complex128
	for i := range a {
		s += complex(real(a[i]), -imag(a[i])) * b[i]
	}
	return s
}
