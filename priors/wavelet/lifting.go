package wavelet

import (
	"math"
	"math/rand/v2"
	"sync"
)

// Lifting factorisation of the periodic two-channel filter bank
// (Daubechies I, Sweldens W, "Factoring wavelet transforms into lifting
// steps", J Fourier Anal Appl 1998;4:247-269; volume and pages from
// memory).
//
// Write the even and odd samples of a periodic signal x of length n as
// x_e[i] = x[2i], x_o[i] = x[2i+1], and let S be the cyclic advance
// (S u)[k] = u[k+1] on sequences of length n/2. The analysis of the direct
// kernels (Mallat 1989) is then a 2×2 matrix of Laurent polynomials in S
// acting on (x_e, x_o), the polyphase matrix. Its determinant is a monomial,
// so the Euclidean algorithm on its first row, carried out by column
// operations, reduces it to a diagonal of monomials; every column operation
// is a lifting step. Shifts commute past lifting steps (at the price of
// shifted taps), so the analysis takes the form used here:
//
//	u0[k] = x[2(k+a0)+p],   u1[k] = x[2(k+a1)+1−p]   (indices mod n)
//	for each step s in order:   u_t[k] += Σ_j c_j·u_{1−t}[k+off+j]   (mod n/2)
//	low-pass output = α0·u0, high-pass output = α1·u1.
//
// The synthesis runs the steps backwards with the opposite sign and undoes
// the selection. For db4 the steps have 1, 2, 2, 2 and 1 taps: 8
// multiplications per output pair instead of the 16 of the two 8-tap
// filters. The scales α are not applied inside the passes: in 2D every
// subband ends up multiplied by one constant (a product of α's), which
// Forward and Inverse apply once, and which the shrinkage of Shrink folds
// into its per-band thresholds.

// liftStep is one lifting step u_t[k] += Σ_j c[j]·u_{1−t}[k+off+j].
type liftStep struct {
	target int
	off    int
	c      []float64
}

// lifting is a factorised filter bank in the form above.
type lifting struct {
	p      int        // parity of the samples that form u0
	a      [2]int     // selection shifts a0, a1
	alpha  [2]float64 // output scales α0, α1
	steps  []liftStep
	margin [2]int // complex samples of periodic margin needed left and right of each channel
}

// liftMaxMoments is the highest order whose lifting factorisation is used.
// Beyond it the taps of the factorisation grow and its rounding error
// exceeds the 1e-14 that the direct filter bank reaches; those orders keep
// the direct kernels.
const liftMaxMoments = 6

// liftTol is the largest error of the lifting analysis, relative to the
// largest input sample, that is accepted against the direct one.
const liftTol = 1e-14

var (
	liftMu    sync.Mutex
	liftCache = map[int]*lifting{}
)

// liftingFor returns the lifting factorisation of fb, or nil when the order
// is above liftMaxMoments or no factorisation reproduces the direct analysis
// to liftTol. Results are cached per order.
func liftingFor(fb FilterBank) *lifting {
	if fb.Moments > liftMaxMoments {
		return nil
	}
	liftMu.Lock()
	defer liftMu.Unlock()
	if lf, ok := liftCache[fb.Moments]; ok {
		return lf
	}
	lf := searchLifting(fb)
	liftCache[fb.Moments] = lf
	return lf
}

// laurent is the Laurent polynomial Σ_j c[j]·S^(lo+j).
type laurent struct {
	lo int
	c  []float64
}

func (p laurent) terms() int { return len(p.c) }

// trimmed drops leading and trailing coefficients of magnitude ≤ eps.
func (p laurent) trimmed(eps float64) laurent {
	i, j := 0, len(p.c)
	for i < j && math.Abs(p.c[i]) <= eps {
		i++
	}
	for j > i && math.Abs(p.c[j-1]) <= eps {
		j--
	}
	return laurent{lo: p.lo + i, c: p.c[i:j]}
}

// axpy returns p + s·q.
func (p laurent) axpy(s float64, q laurent) laurent {
	if q.terms() == 0 {
		return p
	}
	if p.terms() == 0 {
		out := laurent{lo: q.lo, c: make([]float64, q.terms())}
		for i, v := range q.c {
			out.c[i] = s * v
		}
		return out
	}
	lo := min(p.lo, q.lo)
	hi := max(p.lo+p.terms(), q.lo+q.terms())
	out := laurent{lo: lo, c: make([]float64, hi-lo)}
	for i, v := range p.c {
		out.c[p.lo-lo+i] += v
	}
	for i, v := range q.c {
		out.c[q.lo-lo+i] += s * v
	}
	return out
}

func (p laurent) mul(q laurent) laurent {
	if p.terms() == 0 || q.terms() == 0 {
		return laurent{}
	}
	out := laurent{lo: p.lo + q.lo, c: make([]float64, p.terms()+q.terms()-1)}
	for i, u := range p.c {
		for j, v := range q.c {
			out.c[i+j] += u * v
		}
	}
	return out
}

// divide returns q with a − q·b shorter than b: q has a.terms() − b.terms()
// + 1 coefficients, of which the first nLow cancel a from its low end and
// the others from its high end. It returns the remainder cut to the
// support that is left, b.terms() − 1 coefficients.
func divide(a, b laurent, nLow int) (q, r laurent) {
	nq := a.terms() - b.terms() + 1
	rem := laurent{lo: a.lo, c: append([]float64(nil), a.c...)}
	q = laurent{lo: a.lo - b.lo, c: make([]float64, nq)}
	lo, hi := 0, len(rem.c)-1 // indices in rem.c still to cancel
	for i := range nq {
		var pos, bpos int
		if i < nLow {
			pos, bpos = lo, 0
			lo++
		} else {
			pos, bpos = hi, b.terms()-1
			hi--
		}
		coef := rem.c[pos] / b.c[bpos]
		shift := rem.lo + pos - (b.lo + bpos) // exponent of this quotient term
		q.c[shift-q.lo] += coef
		for j, v := range b.c {
			k := shift + b.lo + j - rem.lo
			rem.c[k] -= coef * v
		}
		rem.c[pos] = 0
	}
	r = laurent{lo: rem.lo + lo, c: rem.c[lo : hi+1]}
	return q, r
}

// polyphaseOf returns the polyphase matrix of the analysis of fb:
// entry [r][c] maps x_e (c = 0) or x_o (c = 1) to the low-pass (r = 0) or
// high-pass (r = 1) output.
func polyphaseOf(fb FilterBank) [2][2]laurent {
	L := fb.Len()
	base := 1 - L/2
	jmin := floorDiv(base, 2)
	var P [2][2]laurent
	for r := range 2 {
		for c := range 2 {
			P[r][c] = laurent{lo: jmin, c: make([]float64, L/2+1)}
		}
	}
	for m := range L {
		s := base + m
		j, c := floorDiv(s, 2), s-2*floorDiv(s, 2)
		P[0][c].c[j-jmin] += fb.DecLo[L-1-m]
		P[1][c].c[j-jmin] += fb.DecHi[L-1-m]
	}
	for r := range 2 {
		for c := range 2 {
			P[r][c] = P[r][c].trimmed(0)
		}
	}
	return P
}

func floorDiv(a, b int) int {
	q := a / b
	if (a%b != 0) && ((a < 0) != (b < 0)) {
		q--
	}
	return q
}

// rawStep is a column operation of the Euclidean reduction: u_small += q·u_big
// on the polyphase input (small = the column that was not reduced).
type rawStep struct {
	small int
	q     laurent
}

// factorise runs the Euclidean reduction with the cancellation ends given by
// choice (one entry per division, taken modulo the number of options). It
// returns nil when the reduction does not end in a diagonal of monomials.
func factorise(fb FilterBank, choice []int) *lifting {
	const eps = 1e-12
	P := polyphaseOf(fb)
	var raw []rawStep
	for d := 0; P[0][0].terms() > 0 && P[0][1].terms() > 0; d++ {
		big, small := 0, 1
		if P[0][1].terms() > P[0][0].terms() {
			big, small = 1, 0
		}
		nq := P[0][big].terms() - P[0][small].terms() + 1
		nLow := 0
		if d < len(choice) {
			nLow = choice[d] % (nq + 1)
		}
		q, r := divide(P[0][big], P[0][small], nLow)
		P[0][big] = r.trimmed(eps)
		P[1][big] = P[1][big].axpy(-1, q.mul(P[1][small])).trimmed(eps)
		raw = append(raw, rawStep{small: small, q: q})
	}
	piv := 0
	if P[0][0].terms() == 0 {
		piv = 1
	}
	oth := 1 - piv
	if P[0][piv].terms() != 1 || P[1][oth].terms() != 1 {
		return nil
	}
	// Clear P[1][piv] with one more column operation.
	m := P[1][oth]
	q := laurent{lo: P[1][piv].lo - m.lo, c: make([]float64, P[1][piv].terms())}
	for i, v := range P[1][piv].c {
		q.c[i] = v / m.c[0]
	}
	if q = q.trimmed(eps); q.terms() > 0 {
		raw = append(raw, rawStep{small: oth, q: q})
	}
	// Now low = c0·S^s0 u[piv], high = c1·S^s1 u[oth] after the raw steps.
	c := [2]float64{P[0][piv].c[0], m.c[0]}
	s := [2]int{P[0][piv].lo, m.lo}
	lf := &lifting{p: piv, a: s, alpha: c}
	// Relabel u[piv] as channel 0 and move the shifts to the input.
	for _, st := range raw {
		t := 1
		if st.small == piv {
			t = 0
		}
		step := liftStep{target: t, off: st.q.lo + s[t] - s[1-t], c: append([]float64(nil), st.q.c...)}
		lf.steps = append(lf.steps, step)
		lf.margin[0] = max(lf.margin[0], -step.off)
		lf.margin[1] = max(lf.margin[1], step.off+len(step.c)-1)
	}
	return lf
}

// taps returns the number of multiplications per output pair in the steps.
func (lf *lifting) taps() int {
	n := 0
	for _, s := range lf.steps {
		n += len(s.c)
	}
	return n
}

// gain returns the largest tap magnitude, a measure of how much rounding
// error the steps can amplify.
func (lf *lifting) gain() float64 {
	var g float64
	for _, s := range lf.steps {
		for _, c := range s.c {
			g = math.Max(g, math.Abs(c))
		}
	}
	return g
}

// cheaper orders factorisations by taps, then reach.
func (lf *lifting) cheaper(than *lifting) bool {
	if a, b := lf.taps(), than.taps(); a != b {
		return a < b
	}
	return lf.margin[0]+lf.margin[1] < than.margin[0]+than.margin[1]
}

// searchLifting tries every choice of cancellation ends in the Euclidean
// reduction. Among the factorisations whose analysis is close to the direct
// filter bank (1e-12) it prefers the fewest taps, then the narrowest reach
// (margins, the state a sweep must carry); among those it refines each (see
// refine) and keeps the most accurate on a few test signals (random, constant,
// ramp). It returns nil when none comes within liftTol.
func searchLifting(fb FilterBank) *lifting {
	divisions := fb.Len()/2 + 1
	n := 8 * fb.Len()
	rng := rand.New(rand.NewPCG(0x1f7b, 0x5eed))
	var signals [][]float64
	for s := range 3 {
		x := make([]float64, n)
		for i := range x {
			switch s {
			case 0:
				x[i] = rng.NormFloat64()
			case 1:
				x[i] = 3
			case 2:
				// A ramp, periodised: smooth except at the wrap.
				x[i] = float64(i) / float64(n)
			}
		}
		signals = append(signals, x)
	}
	type ref struct{ lo, hi []float64 }
	refs := make([]ref, len(signals))
	for i, x := range signals {
		refs[i].lo, refs[i].hi = directAnalysis1D(fb, x)
	}
	errorOf := func(lf *lifting) float64 {
		var e float64
		for i, x := range signals {
			var xmax float64
			for _, v := range x {
				xmax = math.Max(xmax, math.Abs(v))
			}
			lo, hi := lf.analysis1D(x)
			for k := range lo {
				e = math.Max(e, math.Max(math.Abs(lo[k]-refs[i].lo[k]), math.Abs(hi[k]-refs[i].hi[k]))/xmax)
			}
		}
		return e
	}
	var best []*lifting // the cheapest shapes seen so far
	choice := make([]int, divisions)
	for {
		if lf := factorise(fb, choice); lf != nil && lf.margin[0] <= n/2 && lf.margin[1] <= n/2 && errorOf(lf) <= 1e-12 {
			switch {
			case len(best) == 0 || lf.cheaper(best[0]):
				best = []*lifting{lf}
			case !best[0].cheaper(lf):
				best = append(best, lf)
			}
		}
		// Next choice vector (each entry 0 … 2; divide reduces it modulo its options).
		i := 0
		for i < divisions {
			choice[i]++
			if choice[i] < 3 {
				break
			}
			choice[i] = 0
			i++
		}
		if i == divisions {
			break
		}
	}
	var pick *lifting
	pickErr := liftTol
	for _, lf := range best {
		lf.refine(fb)
		if e := errorOf(lf); e <= pickErr {
			pick, pickErr = lf, e
		}
	}
	return pick
}

// directAnalysis1D is the periodic analysis with the full filters:
// lo[k] = Σ_m DecLo[L−1−m]·x[(2k + 1 − L/2 + m) mod n], hi likewise.
func directAnalysis1D(fb FilterBank, x []float64) (lo, hi []float64) {
	n, L := len(x), fb.Len()
	lo, hi = make([]float64, n/2), make([]float64, n/2)
	for k := range n / 2 {
		for m := range L {
			v := x[wrap(2*k+1-L/2+m, n)]
			lo[k] += fb.DecLo[L-1-m] * v
			hi[k] += fb.DecHi[L-1-m] * v
		}
	}
	return lo, hi
}

// analysis1D is the lifting analysis of a real periodic signal, written
// plainly (index arithmetic mod n) as the reference form of the 2D kernels.
func (lf *lifting) analysis1D(x []float64) (lo, hi []float64) {
	n := len(x)
	h := n / 2
	u := [2][]float64{make([]float64, h), make([]float64, h)}
	for k := range h {
		u[0][k] = x[wrap(2*(k+lf.a[0])+lf.p, n)]
		u[1][k] = x[wrap(2*(k+lf.a[1])+1-lf.p, n)]
	}
	for _, s := range lf.steps {
		t, o := u[s.target], u[1-s.target]
		for k := range h {
			for j, c := range s.c {
				t[k] += c * o[wrap(k+s.off+j, h)]
			}
		}
	}
	for c := range 2 {
		for k := range u[c] {
			u[c][k] *= lf.alpha[c]
		}
	}
	return u[0], u[1]
}

// params and setParams view the taps and scales of lf as one vector.
func (lf *lifting) params() []float64 {
	var p []float64
	for _, s := range lf.steps {
		p = append(p, s.c...)
	}
	return append(p, lf.alpha[0], lf.alpha[1])
}

func (lf *lifting) setParams(p []float64) {
	i := 0
	for _, s := range lf.steps {
		i += copy(s.c, p[i:])
	}
	lf.alpha = [2]float64{p[i], p[i+1]}
}

// equivalentRows returns the rows of the analysis matrix that give output 0
// of each channel, for a period of n samples: the equivalent filters.
func (lf *lifting) equivalentRows(n int) []float64 {
	out := make([]float64, 2*n)
	x := make([]float64, n)
	for m := range n {
		clear(x)
		x[m] = 1
		lo, hi := lf.analysis1D(x)
		out[m], out[n+m] = lo[0], hi[0]
	}
	return out
}

// refine polishes the taps and scales of lf by Gauss-Newton steps on the
// difference between its equivalent filters and those of fb. The
// Euclidean reduction computes the taps through cancelling differences, so
// its equivalent filters are off by some 1e-15; a high-pass whose taps do
// not sum to zero to the last bits lets smooth images leak into the detail
// bands. Two steps bring the mismatch down to the rounding of the filters
// themselves.
func (lf *lifting) refine(fb FilterBank) {
	n := 2 * fb.Len()
	x := make([]float64, n)
	target := make([]float64, 2*n)
	for m := range n {
		clear(x)
		x[m] = 1
		lo, hi := directAnalysis1D(fb, x)
		target[m], target[n+m] = lo[0], hi[0]
	}
	p := lf.params()
	np := len(p)
	resid := func() []float64 {
		r := lf.equivalentRows(n)
		for i := range r {
			r[i] -= target[i]
		}
		return r
	}
	for range 2 {
		r := resid()
		// Jacobian by central differences (the map is multilinear in p).
		J := make([][]float64, np)
		for j := range np {
			h := 1e-6 * math.Max(1, math.Abs(p[j]))
			keep := p[j]
			p[j] = keep + h
			lf.setParams(p)
			rp := lf.equivalentRows(n)
			p[j] = keep - h
			lf.setParams(p)
			rm := lf.equivalentRows(n)
			p[j] = keep
			J[j] = make([]float64, len(r))
			for i := range r {
				J[j][i] = (rp[i] - rm[i]) / (2 * h)
			}
		}
		lf.setParams(p)
		// Normal equations (JᵀJ) δ = −Jᵀr, solved by Gaussian elimination.
		A := make([][]float64, np)
		for a := range np {
			A[a] = make([]float64, np+1)
			for b := range np {
				for i := range r {
					A[a][b] += J[a][i] * J[b][i]
				}
			}
			for i := range r {
				A[a][np] -= J[a][i] * r[i]
			}
		}
		delta, ok := solve(A)
		if !ok {
			return
		}
		for j := range p {
			p[j] += delta[j]
		}
		lf.setParams(p)
	}
}

// solve solves the augmented n×(n+1) system A by Gaussian elimination with
// partial pivoting; false when it is singular.
func solve(A [][]float64) ([]float64, bool) {
	n := len(A)
	for c := range n {
		piv := c
		for r := c + 1; r < n; r++ {
			if math.Abs(A[r][c]) > math.Abs(A[piv][c]) {
				piv = r
			}
		}
		if A[piv][c] == 0 {
			return nil, false
		}
		A[c], A[piv] = A[piv], A[c]
		for r := c + 1; r < n; r++ {
			f := A[r][c] / A[c][c]
			for k := c; k <= n; k++ {
				A[r][k] -= f * A[c][k]
			}
		}
	}
	x := make([]float64, n)
	for r := n - 1; r >= 0; r-- {
		s := A[r][n]
		for k := r + 1; k < n; k++ {
			s -= A[r][k] * x[k]
		}
		x[r] = s / A[r][r]
	}
	return x, true
}
