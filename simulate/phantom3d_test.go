package simulate

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mat"
)

// published3D is the 3D extension of the modified Shepp-Logan table as
// recalled from memory (see ModifiedSheppLogan3D), on [-1, 1]³ with y up:
// rho, a, b, c, x0, y0, z0, phi. It is kept apart from phantom3d.go so that
// the tests apply the FOV mapping (×½, y mirrored, z kept) themselves.
var published3D = [10][8]float64{
	{1.0, 0.69, 0.92, 0.81, 0, 0, 0, 0},
	{-0.8, 0.6624, 0.874, 0.78, 0, -0.0184, 0, 0},
	{-0.2, 0.11, 0.31, 0.22, 0.22, 0, 0, -18},
	{-0.2, 0.16, 0.41, 0.28, -0.22, 0, 0, 18},
	{0.1, 0.21, 0.25, 0.41, 0, 0.35, -0.15, 0},
	{0.1, 0.046, 0.046, 0.05, 0, 0.1, 0.25, 0},
	{0.1, 0.046, 0.046, 0.05, 0, -0.1, 0.25, 0},
	{0.1, 0.046, 0.023, 0.05, -0.08, -0.605, 0, 0},
	{0.1, 0.023, 0.023, 0.02, 0, -0.606, 0, 0},
	{0.1, 0.023, 0.046, 0.02, 0.06, -0.605, 0, 0},
}

// randomEllipsoids draws n tilted, turned ellipsoids that stay inside the FOV
// (centre within ±0.2, semi-axes at most 0.2, so every point within ±0.4).
func randomEllipsoids(n int, rng *rand.Rand) Ellipsoids {
	e := make(Ellipsoids, n)
	u := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	for i := range e {
		e[i] = Ellipsoid{
			Rho: u(-1, 1),
			X0:  u(-0.2, 0.2), Y0: u(-0.2, 0.2), Z0: u(-0.2, 0.2),
			A: u(0.03, 0.2), B: u(0.03, 0.2), C: u(0.03, 0.2),
			PhiDeg: u(-180, 180), ThetaDeg: u(-90, 90),
		}
	}
	return e
}

// shapeMatrix builds S = R·diag(a², b², c²)·Rᵀ with gonum, R from rotation.
func shapeMatrix(el Ellipsoid) *mat.Dense {
	r := rotation(el)
	var rd, s mat.Dense
	d := mat.NewDiagDense(3, []float64{el.A * el.A, el.B * el.B, el.C * el.C})
	rd.Mul(r, d)
	s.Mul(&rd, r.T())
	return &s
}

// ellipseForm returns the matrix Q of an Ellipse written as
// (r−c)ᵀQ(r−c) ≤ 1, from its documented angle convention, so that two
// descriptions of one ellipse (axes swapped, angle off by 90° or 180°) compare
// equal.
func ellipseForm(el Ellipse) (qxx, qxy, qyy float64) {
	s, c := math.Sincos(el.ThetaDeg * math.Pi / 180)
	ia, ib := 1/(el.A*el.A), 1/(el.B*el.B)
	return c*c*ia + s*s*ib, c * s * (ia - ib), s*s*ia + c*c*ib
}

// rotation builds, with gonum, the rotation stated on Ellipsoid as a product
// of the two textbook axis rotations rather than the closed-form columns used
// in phantom3d.go: R = Rz(φ)·Ry(−θ), where Rz(φ) turns +x towards +y and
// Ry(−θ) (a rotation about y by −θ, right-hand rule) tips +x towards +z.
func rotation(el Ellipsoid) *mat.Dense {
	p, t := el.PhiDeg*math.Pi/180, -el.ThetaDeg*math.Pi/180
	rz := mat.NewDense(3, 3, []float64{
		math.Cos(p), -math.Sin(p), 0,
		math.Sin(p), math.Cos(p), 0,
		0, 0, 1,
	})
	ry := mat.NewDense(3, 3, []float64{
		math.Cos(t), 0, math.Sin(t),
		0, 1, 0,
		-math.Sin(t), 0, math.Cos(t),
	})
	var r mat.Dense
	r.Mul(rz, ry)
	return &r
}

func TestRotationConvention(t *testing.T) {
	// The documented orientation, point by point: the k-th semi-axis runs
	// along column k of R = Rz(φ)·Ry(−θ) (textbook axis rotations, gonum), so
	// the points c ± 0.999·aₖ·R[:,k] are inside and c ± 1.001·aₖ·R[:,k]
	// outside. With θ ≠ 0 this fixes the sense of the tilt, which no diagonal
	// entry of S can tell.
	cases := []struct{ phi, theta float64 }{
		{0, 0}, {30, 0}, {0, 30}, {0, -50}, {-70, 20}, {135, 80}, {200, -10},
	}
	for _, c := range cases {
		el := Ellipsoid{Rho: 1, X0: 0.05, Y0: -0.02, Z0: 0.1, A: 0.3, B: 0.15, C: 0.07, PhiDeg: c.phi, ThetaDeg: c.theta}
		e := Ellipsoids{el}
		r := rotation(el)
		semi := [3]float64{el.A, el.B, el.C}
		for k := range 3 {
			for _, f := range []float64{0.999, -0.999, 1.001, -1.001} {
				x := el.X0 + f*semi[k]*r.At(0, k)
				y := el.Y0 + f*semi[k]*r.At(1, k)
				z := el.Z0 + f*semi[k]*r.At(2, k)
				want := 0.0
				if math.Abs(f) < 1 {
					want = 1
				}
				if got := e.Value(x, y, z); got != want {
					t.Errorf("φ=%g θ=%g axis %d at %g·semi-axis: Value %g, want %g", c.phi, c.theta, k, f, got, want)
				}
				if got := e.SliceX(x).Value(y, z); got != want {
					t.Errorf("φ=%g θ=%g axis %d at %g·semi-axis: SliceX value %g, want %g", c.phi, c.theta, k, f, got, want)
				}
			}
		}
	}
}

func TestModifiedSheppLogan3DMapping(t *testing.T) {
	// The FOV mapping stated in the doc comment: ×½, y0 and φ negated, z0
	// kept, no tilt.
	e := ModifiedSheppLogan3D()
	if len(e) != len(published3D) {
		t.Fatalf("got %d ellipsoids, want %d", len(e), len(published3D))
	}
	for i, r := range published3D {
		want := Ellipsoid{Rho: r[0], A: r[1] / 2, B: r[2] / 2, C: r[3] / 2,
			X0: r[4] / 2, Y0: -r[5] / 2, Z0: r[6] / 2, PhiDeg: -r[7]}
		if e[i] != want {
			t.Errorf("ellipsoid %d = %+v, want %+v", i, e[i], want)
		}
	}
	if err := e.Validate(); err != nil {
		t.Fatal(err)
	}
	// Every ellipsoid lies inside the FOV [-½, ½)³.
	lo, hi := e.Bounds()
	for i := range 3 {
		if lo[i] < -0.5 || hi[i] >= 0.5 {
			t.Errorf("axis %d: bounds [%g, %g] leave the FOV", i, lo[i], hi[i])
		}
	}
}

func TestEquatorialSectionsMatch2D(t *testing.T) {
	// Outside reference: the 2D ModifiedSheppLogan (Shepp & Logan 1974 with
	// Toft's intensities), itself checked pixel for pixel against
	// scikit-image 0.19.3 in phantom_test.go. Each ellipsoid cut through its
	// own centre by z = Z0 must be the matching 2D ellipse.
	e3 := ModifiedSheppLogan3D()
	e2 := ModifiedSheppLogan()
	for i, el := range e3 {
		sec := Ellipsoids{el}.SliceZ(el.Z0)
		if len(sec) != 1 {
			t.Fatalf("ellipsoid %d: %d sections, want 1", i, len(sec))
		}
		got, want := sec[0], e2[i]
		gxx, gxy, gyy := ellipseForm(got)
		wxx, wxy, wyy := ellipseForm(want)
		for _, d := range [...][2]float64{
			{got.Rho, want.Rho}, {got.X0, want.X0}, {got.Y0, want.Y0},
			{gxx / wxx, 1}, {gxy / wxx, wxy / wxx}, {gyy / wyy, 1},
		} {
			if math.Abs(d[0]-d[1]) > 1e-12 {
				t.Errorf("ellipsoid %d: section %+v, 2D ellipse %+v", i, got, want)
				break
			}
		}
	}
}

func TestSliceZMatchesSkimage(t *testing.T) {
	// Outside reference: scikit-image 0.19.3 shepp_logan_phantom(), 400×400,
	// point-sampled at −½ + j/399 in FOV units (see TestSkimagePointSampled).
	// The section z = 0 of the 3D phantom differs from the 2D image only as
	// documented: ellipsoid 5 (centre z0 = −0.15, c = 0.41 on the published
	// cube) is cut off-centre, so its section is the 2D ellipse 5 scaled by
	// √(1 − (0.15/0.41)²) (section of an ellipsoid, handbook), and ellipsoids
	// 6 and 7 (z0 = 0.25, c = 0.05) do not reach z = 0. The expected value is
	// the scikit-image pixel corrected by exactly those three terms, with the
	// 2D ellipses taken from the published table in phantom_test.go.
	ref, n := loadSkimage(t)
	f := math.Sqrt(1 - (0.15/0.41)*(0.15/0.41))
	ell := func(k int, scale float64) Ellipses {
		r := publishedSheppLogan[k]
		return Ellipses{{Rho: 1, X0: r[1] / 2, Y0: -r[2] / 2, A: scale * r[3] / 2, B: scale * r[4] / 2, ThetaDeg: -r[5]}}
	}
	e5, c5, e6, e7 := ell(4, 1), ell(4, f), ell(5, 1), ell(6, 1)
	sec := ModifiedSheppLogan3D().SliceZ(0)
	if len(sec) != 8 {
		t.Fatalf("section z = 0 has %d ellipses, want 8 (all but rows 6 and 7)", len(sec))
	}
	bad := 0
	for i := range n {
		y := -0.5 + float64(i)/float64(n-1)
		for j := range n {
			x := -0.5 + float64(j)/float64(n-1)
			want := ref[i*n+j] + 0.1*(c5.Value(x, y)-e5.Value(x, y)-e6.Value(x, y)-e7.Value(x, y))
			if got := sec.Value(x, y); math.Abs(got-want) > 0.5/255+1e-12 {
				if bad < 5 {
					t.Errorf("pixel (%d,%d): section %.4f, expected from scikit-image %.4f", i, j, got, want)
				}
				bad++
			}
		}
	}
	if bad > 0 {
		t.Errorf("%d of %d pixels differ", bad, n*n)
	}
}

// quadricMargin returns min over ellipsoids of |(r−c)ᵀM(r−c) − 1|, how far a
// point is from every surface in the quadric's own measure.
func quadricMargin(e Ellipsoids, r [3]float64) float64 {
	m := math.Inf(1)
	for _, el := range e {
		u := el.axes()
		d := [3]float64{r[0] - el.X0, r[1] - el.Y0, r[2] - el.Z0}
		semi := [3]float64{el.A, el.B, el.C}
		var q float64
		for k := range 3 {
			p := (u[k][0]*d[0] + u[k][1]*d[1] + u[k][2]*d[2]) / semi[k]
			q += p * p
		}
		m = min(m, math.Abs(q-1))
	}
	return m
}

func TestSliceAgreesWithValue(t *testing.T) {
	// Point membership, two independent routes: Value tests the quadric in
	// the ellipsoid's own axes; the sections come from the 2×2
	// eigen-decomposition and are tested by Ellipses.Value (phantom.go).
	// 10⁴ random points per phantom and plane orientation, half uniform in
	// the FOV, half near a randomly chosen ellipsoid so that the small
	// features are hit; points within 1e-9 of a surface are skipped, and at
	// least a tenth of the points must fall inside the phantom.
	phantoms := map[string]Ellipsoids{
		"SheppLogan3D": ModifiedSheppLogan3D(),
		"random":       randomEllipsoids(12, rand.New(rand.NewPCG(3, 30))),
	}
	planes := []struct {
		name     string
		ax, a, b int
		slice    func(Ellipsoids, float64) Ellipses
	}{
		{"x", 0, 1, 2, Ellipsoids.SliceX},
		{"y", 1, 0, 2, Ellipsoids.SliceY},
		{"z", 2, 0, 1, Ellipsoids.SliceZ},
	}
	for name, e := range phantoms {
		for _, pl := range planes {
			t.Run(name+"/"+pl.name, func(t *testing.T) {
				rng := rand.New(rand.NewPCG(7, uint64(pl.ax)))
				const points = 10000
				skipped, inside := 0, 0
				for k := range points {
					var r [3]float64
					if k%2 == 0 {
						for i := range r {
							r[i] = rng.Float64() - 0.5
						}
					} else {
						el := e[rng.IntN(len(e))]
						s := [3]float64{el.A, el.B, el.C}
						w := 1.3 * max(s[0], s[1], s[2])
						c := [3]float64{el.X0, el.Y0, el.Z0}
						for i := range r {
							r[i] = c[i] + w*(2*rng.Float64()-1)
						}
					}
					if quadricMargin(e, r) < 1e-9 {
						skipped++
						continue
					}
					want := e.Value(r[0], r[1], r[2])
					got := pl.slice(e, r[pl.ax]).Value(r[pl.a], r[pl.b])
					if math.Abs(got-want) > 1e-12 {
						t.Fatalf("point %v: section value %g, 3D value %g", r, got, want)
					}
					if want != 0 {
						inside++
					}
				}
				if skipped > points/100 {
					t.Errorf("%d points skipped as too near a surface", skipped)
				}
				if inside < points/10 {
					t.Errorf("only %d of %d points inside the phantom; the test hardly checks membership", inside, points)
				}
			})
		}
	}
}

func TestSectionArea(t *testing.T) {
	// Area of the section of an ellipsoid by a plane with unit normal n at
	// signed distance δ from its centre: π·abc/√(nᵀSn)·(1 − δ²/(nᵀSn)),
	// S = R·diag(a², b², c²)·Rᵀ (standard result for plane sections of an
	// ellipsoid, from memory; confirmed below by Cavalieri's principle, whose
	// integral of the section areas must give the volume (4/3)πabc —
	// Archimedes). S is built with gonum from the documented rotation
	// convention; the integral uses gonum's Gauss-Legendre rule, exact here
	// because the area is a quadratic in the plane position.
	e := randomEllipsoids(8, rand.New(rand.NewPCG(11, 12)))
	slices := [3]func(Ellipsoids, float64) Ellipses{Ellipsoids.SliceX, Ellipsoids.SliceY, Ellipsoids.SliceZ}
	for i, el := range e {
		s := shapeMatrix(el)
		c := [3]float64{el.X0, el.Y0, el.Z0}
		vol := 4.0 / 3 * math.Pi * el.A * el.B * el.C
		for ax, slice := range slices {
			area := func(p float64) float64 {
				sec := slice(Ellipsoids{el}, p)
				if len(sec) == 0 {
					return 0
				}
				return math.Pi * sec[0].A * sec[0].B
			}
			nsn := s.At(ax, ax)
			h := math.Sqrt(nsn)
			for _, frac := range []float64{-0.999, -0.7, -0.3, 0, 0.25, 0.6, 0.95} {
				d := frac * h
				want := math.Pi * el.A * el.B * el.C / h * (1 - d*d/nsn)
				if got := area(c[ax] + d); math.Abs(got-want) > 1e-12*math.Max(want, 1e-3) {
					t.Errorf("ellipsoid %d axis %d δ=%.3f·h: area %.15g, formula %.15g", i, ax, frac, got, want)
				}
				// The section's centre lies on the diameter conjugate to the
				// plane, c + δ·S·n/(nᵀSn) (standard result, from memory;
				// confirmed by the membership tests above).
				sec := slice(Ellipsoids{el}, c[ax]+d)
				in := [3][2]int{{1, 2}, {0, 2}, {0, 1}}[ax]
				wx := c[in[0]] + d*s.At(in[0], ax)/nsn
				wy := c[in[1]] + d*s.At(in[1], ax)/nsn
				if len(sec) != 1 || math.Abs(sec[0].X0-wx) > 1e-14 || math.Abs(sec[0].Y0-wy) > 1e-14 {
					t.Errorf("ellipsoid %d axis %d δ=%.3f·h: section %v, centre want (%g, %g)", i, ax, frac, sec, wx, wy)
				}
			}
			for _, frac := range []float64{1.0001, -1.0001, 3} {
				if got := area(c[ax] + frac*h); got != 0 {
					t.Errorf("ellipsoid %d axis %d: plane at %g·h beyond the extent has area %g", i, ax, frac, got)
				}
			}
			if got := quad.Fixed(area, c[ax]-h, c[ax]+h, 4, quad.Legendre{}, 0); math.Abs(got-vol) > 1e-12*vol {
				t.Errorf("ellipsoid %d axis %d: ∫ area = %.15g, volume (4/3)πabc = %.15g", i, ax, got, vol)
			}
		}
	}
}

func TestBoundsMatchSurface(t *testing.T) {
	// The bounding box against the surface itself: points
	// c + R·(a·cosα·sinβ, b·sinα·sinβ, c·cosβ) (the ellipsoid's parametric
	// surface, R from gonum as in shapeMatrix) never leave it and come
	// within 1e-4 of every face on a 400×200 parameter grid.
	e := randomEllipsoids(5, rand.New(rand.NewPCG(5, 6)))
	for i, el := range e {
		lo, hi := Ellipsoids{el}.Bounds()
		p, tt := el.PhiDeg*math.Pi/180, el.ThetaDeg*math.Pi/180
		// R columns from the product Rz(φ)·Ry(−θ) applied to the unit axes.
		r := func(v [3]float64) [3]float64 {
			x := math.Cos(tt)*v[0] - math.Sin(tt)*v[2]
			z := math.Sin(tt)*v[0] + math.Cos(tt)*v[2]
			y := v[1]
			return [3]float64{math.Cos(p)*x - math.Sin(p)*y, math.Sin(p)*x + math.Cos(p)*y, z}
		}
		var smin, smax [3]float64
		for k := range 3 {
			smin[k], smax[k] = math.Inf(1), math.Inf(-1)
		}
		for ia := range 400 {
			a := 2 * math.Pi * float64(ia) / 400
			for ib := range 201 {
				b := math.Pi * float64(ib) / 200
				q := r([3]float64{el.A * math.Cos(a) * math.Sin(b), el.B * math.Sin(a) * math.Sin(b), el.C * math.Cos(b)})
				q = [3]float64{q[0] + el.X0, q[1] + el.Y0, q[2] + el.Z0}
				for k := range 3 {
					smin[k], smax[k] = min(smin[k], q[k]), max(smax[k], q[k])
				}
			}
		}
		for k := range 3 {
			if smin[k] < lo[k]-1e-12 || smax[k] > hi[k]+1e-12 {
				t.Errorf("ellipsoid %d axis %d: surface [%g, %g] outside bounds [%g, %g]", i, k, smin[k], smax[k], lo[k], hi[k])
			}
			if smin[k]-lo[k] > 1e-4 || hi[k]-smax[k] > 1e-4 {
				t.Errorf("ellipsoid %d axis %d: bounds [%g, %g] loose against surface [%g, %g]", i, k, lo[k], hi[k], smin[k], smax[k])
			}
		}
	}
	if lo, hi := (Ellipsoids{}).Bounds(); lo[0] <= hi[0] {
		t.Errorf("empty phantom has bounds %v %v", lo, hi)
	}
}

func TestSpectrum3DAtZero(t *testing.T) {
	// At k = 0 the transform is the integral Σ ρ·(4/3)π·abc (volume of an
	// ellipsoid, Archimedes), whatever the rotations and shifts.
	for name, e := range map[string]Ellipsoids{
		"SheppLogan3D": ModifiedSheppLogan3D(),
		"random":       randomEllipsoids(9, rand.New(rand.NewPCG(1, 2))),
	} {
		var want float64
		for _, el := range e {
			want += el.Rho * 4.0 / 3 * math.Pi * el.A * el.B * el.C
		}
		got := e.Spectrum3D(0, 0, 0)
		if math.Abs(real(got)-want) > 1e-14 || imag(got) != 0 {
			t.Errorf("%s: F(0) = %v, want %.16g", name, got, want)
		}
	}
}

func TestBallFTRadialIntegral(t *testing.T) {
	// The 3D transform of a radial function is F(q) = ∫ f(r)·4πr²·sinc(2qr) dr
	// with sinc(x) = sin(πx)/(πx) (Bracewell, The Fourier Transform and Its
	// Applications, from memory); for the unit ball, ∫₀¹ 4πr²·sinc(2qr) dr,
	// evaluated here with gonum's 200-point Gauss-Legendre rule. The list
	// straddles the switch from power series to closed form at 2πq = 0.2.
	integrand := func(q float64) func(float64) float64 {
		return func(r float64) float64 {
			x := 2 * math.Pi * q * r
			if x == 0 {
				return 4 * math.Pi * r * r
			}
			return 4 * math.Pi * r * r * math.Sin(x) / x
		}
	}
	for _, q := range []float64{0, 1e-7, 0.004, 0.0318, 0.03183, 0.0319, 0.1, 0.7153, 1.43, 7.7, 20.25} {
		want := quad.Fixed(integrand(q), 0, 1, 200, quad.Legendre{}, 0)
		if got := ballFT(q); math.Abs(got-want) > 1e-14*4*math.Pi/3 {
			t.Errorf("ballFT(%g) = %.16g, radial integral %.16g", q, got, want)
		}
	}
}

// hybridReference returns ∫ F(kx, ky, kz)·exp(2πi·kx·x) dkx over |kx| ≤ K for
// every x, by Gauss-Legendre rules of order 8 on panels of width 1/2 (gonum),
// evaluating F once per node.
func hybridReference(e Ellipsoids, ky, kz float64, xs []float64, K int) []complex128 {
	nodes, weights := make([]float64, 8), make([]float64, 8)
	quad.Legendre{}.FixedLocations(nodes, weights, 0, 0.5)
	out := make([]complex128, len(xs))
	for p := -2 * K; p < 2*K; p++ {
		k0 := float64(p) / 2
		for i, u := range nodes {
			kx := k0 + u
			f := e.Spectrum3D(kx, ky, kz) * complex(weights[i], 0)
			for j, x := range xs {
				s, c := math.Sincos(2 * math.Pi * kx * x)
				out[j] += f * complex(c, s)
			}
		}
	}
	return out
}

func TestSliceSpectrumMatchesReadoutTransform(t *testing.T) {
	// SliceX(x).Spectrum (2D ellipse transforms of the sections, Koay 2007 /
	// Guerquin-Kern 2012, phantom.go) against the numerical inverse transform
	// along kx of Spectrum3D (ball transform, Koay 2007), two ways:
	//   quadrature: ∫ over |kx| ≤ 600 cycles/FOV by order-8 Gauss-Legendre
	//     panels 1/2 wide (gonum); the panels resolve the integrand to
	//     ~1e-15, so the error is the truncated tail, which decays as
	//     F(K)/(2π·distance to the nearest section edge) ≈ 1e-6 here;
	//   readout lattice: Σ over integer |n| ≤ 600 of F(n, ky, kz)·e^{2πinx},
	//     the unit-step sum that the inverse DFT along a fully sampled readout
	//     performs, equal to the integral by Poisson summation because the
	//     object lies inside (−½, ½) (Bracewell, from memory); same tail.
	// Tolerance 2e-5 absolute against values up to ~0.25: it bounds the tail
	// with room (the measured worst errors are printed with -v).
	const K = 600
	const tol = 2e-5
	xs := []float64{-0.31, -0.12, 0, 0.045, 0.2}
	ks := [][2]float64{{0, 0}, {3, -1}, {-7.5, 12}, {20, 5}}
	for name, e := range map[string]Ellipsoids{
		"SheppLogan3D": ModifiedSheppLogan3D(),
		"random":       randomEllipsoids(6, rand.New(rand.NewPCG(9, 10))),
	} {
		var worstQ, worstL float64
		for _, k := range ks {
			ref := hybridReference(e, k[0], k[1], xs, K)
			lattice := make([]complex128, len(xs))
			for n := -K; n <= K; n++ {
				f := e.Spectrum3D(float64(n), k[0], k[1])
				for j, x := range xs {
					s, c := math.Sincos(2 * math.Pi * float64(n) * x)
					lattice[j] += f * complex(c, s)
				}
			}
			for j, x := range xs {
				got := e.SliceX(x).Spectrum(k[0], k[1])
				dq, dl := cmplx.Abs(got-ref[j]), cmplx.Abs(got-lattice[j])
				worstQ, worstL = max(worstQ, dq), max(worstL, dl)
				if dq > tol || dl > tol {
					t.Errorf("%s x=%g k=(%g,%g): section %.8f, quadrature %.8f, lattice %.8f",
						name, x, k[0], k[1], got, ref[j], lattice[j])
				}
			}
		}
		t.Logf("%s: worst |section − quadrature| %.2e, |section − lattice| %.2e", name, worstQ, worstL)
	}
}

func TestEllipsoidsValidate(t *testing.T) {
	good := Ellipsoid{Rho: 1, A: 0.1, B: 0.2, C: 0.3}
	cases := []struct {
		name string
		e    Ellipsoids
		ok   bool
	}{
		{"good", Ellipsoids{good}, true},
		{"Shepp-Logan", ModifiedSheppLogan3D(), true},
		{"empty", Ellipsoids{}, false},
		{"zero A", Ellipsoids{{Rho: 1, A: 0, B: 0.2, C: 0.3}}, false},
		{"negative C", Ellipsoids{good, {Rho: 1, A: 0.1, B: 0.2, C: -0.3}}, false},
		{"NaN centre", Ellipsoids{{Rho: 1, Z0: math.NaN(), A: 0.1, B: 0.2, C: 0.3}}, false},
		{"Inf angle", Ellipsoids{{Rho: 1, A: 0.1, B: 0.2, C: 0.3, ThetaDeg: math.Inf(1)}}, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if err := c.e.Validate(); (err == nil) != c.ok {
				t.Errorf("Validate() = %v, want ok=%v", err, c.ok)
			}
		})
	}
	// Invalid ellipsoids are skipped by every method, as in Ellipses.
	bad := Ellipsoids{good, {Rho: 5, A: -1, B: 1, C: 1}}
	if got := bad.Value(0, 0, 0); got != 1 {
		t.Errorf("Value with an invalid ellipsoid = %g, want 1", got)
	}
	if got, want := bad.Spectrum3D(1, 2, 3), (Ellipsoids{good}).Spectrum3D(1, 2, 3); got != want {
		t.Errorf("Spectrum3D with an invalid ellipsoid = %v, want %v", got, want)
	}
	if got := bad.SliceX(0); len(got) != 1 {
		t.Errorf("SliceX with an invalid ellipsoid gave %d sections, want 1", len(got))
	}
	if got := (Ellipsoids{good}).SliceX(math.NaN()); got != nil {
		t.Errorf("SliceX(NaN) = %v, want nil", got)
	}
}

func ExampleEllipsoids_SliceX() {
	// The ky–kz plane at readout position x = 0: y runs along the columns,
	// z along the rows of an nz-by-ny image.
	sec := ModifiedSheppLogan3D().SliceX(0)
	fmt.Printf("%d sections; outer one: semi-axes %.4f (z) and %.4f (y)\n", len(sec), sec[0].A, sec[0].B)
	img := sec.Rasterize(64, 48) // 48 rows (z) × 64 columns (y)
	fmt.Printf("truth image %d pixels, centre value %.1f\n", len(img), img[24*64+32])
	// Output:
	// 6 sections; outer one: semi-axes 0.4050 (z) and 0.4600 (y)
	// truth image 3072 pixels, centre value 0.2
}

func ExampleEllipsoids_Spectrum3D() {
	e := ModifiedSheppLogan3D()
	// F(0) is the phantom's integral, Σ ρ·(4/3)π·abc.
	fmt.Printf("integral %.6f\n", real(e.Spectrum3D(0, 0, 0)))
	// Output:
	// integral 0.078508
}

func BenchmarkSliceX(b *testing.B) {
	e := ModifiedSheppLogan3D()
	for i := 0; b.Loop(); i++ {
		_ = e.SliceX(float64(i%64-32) / 64)
	}
}

func BenchmarkSpectrum3D(b *testing.B) {
	e := ModifiedSheppLogan3D()
	for i := 0; b.Loop(); i++ {
		_ = e.Spectrum3D(float64(i%64-32), 3, -7)
	}
}

// BenchmarkHybridData64 builds the exact hybrid-space data of a 64³ scan, one
// 64×64 ky–kz plane per readout position, by SliceX and CartesianSpectrum.
func BenchmarkHybridData64(b *testing.B) {
	e := ModifiedSheppLogan3D()
	for b.Loop() {
		for j := range 64 {
			_ = CartesianSpectrum(e.SliceX(float64(j-32)/64), 64, 64)
		}
	}
}

// BenchmarkSpectrum3DGrid64 evaluates Spectrum3D on the 64³ integer k-space
// lattice, the direct route to the same amount of data as
// BenchmarkHybridData64 (before the readout FFT).
func BenchmarkSpectrum3DGrid64(b *testing.B) {
	e := ModifiedSheppLogan3D()
	for b.Loop() {
		for z := range 64 {
			for y := range 64 {
				for x := range 64 {
					_ = e.Spectrum3D(float64(x-32), float64(y-32), float64(z-32))
				}
			}
		}
	}
}
