package fft

import (
	"fmt"
	"math"
)

// Plan transforms sequences of one fixed length. Make it once with NewPlan
// and reuse it; Forward and Inverse allocate nothing. A Plan owns scratch
// space and is not safe for concurrent use: give each goroutine its own
// Clone.
type Plan struct {
	t     *tables
	a, b  []complex128 // scratch for the intermediate passes, length n each
	wk    work
	scale float64
}

// NewPlan returns a plan for transforms of length n ≥ 1.
func NewPlan(n int) (*Plan, error) {
	t, err := newTables(n, false)
	if err != nil {
		return nil, err
	}
	return newPlanFrom(t), nil
}

func newPlanFrom(t *tables) *Plan {
	return &Plan{
		t:     t,
		a:     make([]complex128, t.n),
		b:     make([]complex128, t.n),
		wk:    t.newWork(),
		scale: 1 / math.Sqrt(float64(t.n)),
	}
}

// Len returns the transform length.
func (p *Plan) Len() int { return p.t.n }

// Clone returns a plan of the same length that shares the read-only tables of
// p and owns new scratch, for use in another goroutine.
func (p *Plan) Clone() *Plan { return newPlanFrom(p.t) }

// Forward writes the orthonormal DFT of src into dst:
// dst[k] = n^(-1/2) Σ_j src[j] exp(-2πi jk/n). dst may be src itself but must
// not overlap it otherwise. Both must have length Len(); Forward panics if
// they do not, as that is a programming error.
func (p *Plan) Forward(dst, src []complex128) { p.transform(dst, src, false) }

// Inverse writes the orthonormal inverse DFT of src into dst:
// dst[j] = n^(-1/2) Σ_k src[k] exp(+2πi jk/n). The aliasing and length rules
// of Forward apply.
func (p *Plan) Inverse(dst, src []complex128) { p.transform(dst, src, true) }

func (p *Plan) transform(dst, src []complex128, inv bool) {
	n := p.t.n
	if len(dst) != n || len(src) != n {
		panic(fmt.Sprintf("fft: Plan of length %d given dst of length %d and src of length %d", n, len(dst), len(src)))
	}
	p.t.exec(dst, src, p.a, p.b, contiguous(1), inv, false, p.scale, &p.wk)
}
