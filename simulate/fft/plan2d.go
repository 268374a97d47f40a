package fft

import (
	"fmt"
	"math"
)

// blockBytes is the size aimed at for one column block of the column pass,
// ny·w values, so that the blocks a pass moves between stay in the
// second-level cache.
const blockBytes = 256 << 10

// columnBlock returns w, the number of adjacent columns transformed together:
// the largest power of two from 16 to 64 with ny·w·16 bytes ≤ blockBytes (16
// for tall images: reading at least 256 contiguous bytes of each row matters
// more than the cache fit), and at most nx. Measured on 256² to 1024².
func columnBlock(ny, nx int) int {
	w := 64
	for w > 16 && ny*w*16 > blockBytes {
		w /= 2
	}
	return min(w, nx)
}

// maxLen2D bounds ny·nx (4 GiB of complex128 per image).
const maxLen2D = 1 << 28

// Plan2D transforms row-major images of ny rows by nx columns (element (i, j)
// at index i·nx+j). Make it once with NewPlan2D and reuse it; its methods
// allocate nothing. A Plan2D owns scratch space and is not safe for concurrent
// use: give each goroutine its own Clone.
type Plan2D struct {
	ny, nx     int
	rows, cols *tables
	rowA, rowB []complex128 // row scratch, nx each
	blkA, blkB []complex128 // column blocks, ny·block each
	blkC       []complex128 // a third column block for CentredColumnFilter, made on its first call
	rowWk      work
	colWk      work
	block      int // columns per block, see columnBlock
	centre     centring
	shiftBuf   []complex128 // ny·nx, only for centring by explicit shifts
	scale      float64      // (ny·nx)^(-1/2), applied once, by the column pass
}

// centring is how a Plan2D computes its centred transforms.
type centring int

const (
	centreRotate   centring = iota // first and last radices even on both sides (multiples of 4, or 2): slot rotation, free
	centreModulate                 // other even sides: (-1)^(i+j) modulation of the input block copies and of the output rows
	centreShift                    // a side is odd: explicit IShift and Shift through shiftBuf
)

// NewPlan2D returns a plan for ny-by-nx transforms, ny, nx ≥ 1.
func NewPlan2D(ny, nx int) (*Plan2D, error) {
	if ny < 1 || nx < 1 {
		return nil, fmt.Errorf("fft: 2D transform needs at least one row and one column, got %d×%d", ny, nx)
	}
	if ny > maxLen2D/nx {
		return nil, fmt.Errorf("fft: 2D transform of %d×%d values exceeds the supported maximum %d", ny, nx, maxLen2D)
	}
	rows, err := newTables(nx, false)
	if err != nil {
		return nil, err
	}
	cols, err := newTables(ny, true)
	if err != nil {
		return nil, err
	}
	return newPlan2DFrom(ny, nx, rows, cols), nil
}

func newPlan2DFrom(ny, nx int, rows, cols *tables) *Plan2D {
	b := columnBlock(ny, nx)
	p := &Plan2D{
		ny: ny, nx: nx, rows: rows, cols: cols,
		block: b,
		rowA:  make([]complex128, nx),
		rowB:  make([]complex128, nx),
		blkA:  make([]complex128, ny*b),
		blkB:  make([]complex128, ny*b),
		rowWk: rows.newWork(),
		colWk: cols.newWork(),
		scale: 1 / math.Sqrt(float64(ny)*float64(nx)),
	}
	switch {
	case rows.rotatable && cols.rotatable:
		p.centre = centreRotate
	case ny%2 == 0 && nx%2 == 0:
		p.centre = centreModulate
	default:
		p.centre = centreShift
		p.shiftBuf = make([]complex128, ny*nx)
	}
	return p
}

// Clone returns a plan of the same shape that shares the read-only tables of
// p and owns new scratch, for use in another goroutine.
func (p *Plan2D) Clone() *Plan2D { return newPlan2DFrom(p.ny, p.nx, p.rows, p.cols) }

// Rows returns ny, the number of rows.
func (p *Plan2D) Rows() int { return p.ny }

// Cols returns nx, the number of columns.
func (p *Plan2D) Cols() int { return p.nx }

// Len returns ny·nx, the length of the slices the transforms take.
func (p *Plan2D) Len() int { return p.ny * p.nx }

// Forward writes the orthonormal 2D DFT of src into dst:
// dst[k, l] = (ny·nx)^(-1/2) Σ_{i,j} src[i, j] exp(-2πi (ik/ny + jl/nx)).
// dst may be src itself but must not overlap it otherwise. Both must have
// length ny·nx; Forward panics if they do not, as that is a programming error.
func (p *Plan2D) Forward(dst, src []complex128) {
	p.check(dst, src)
	p.transform(dst, src, false, false)
}

// Inverse writes the orthonormal inverse 2D DFT of src into dst. The aliasing
// and length rules of Forward apply.
func (p *Plan2D) Inverse(dst, src []complex128) {
	p.check(dst, src)
	p.transform(dst, src, true, false)
}

// CentredForward transforms an image on the FFT-centred grid (centre pixel
// at (ny/2, nx/2), see package simulate) to k-space with DC at (ny/2, nx/2):
// it equals Shift ∘ Forward ∘ IShift. When ny and nx are multiples of 4 it
// costs no more than Forward, the shifts becoming a relabelling of butterfly
// slots in the first and last passes; other even sides use the modulation
// identity with (-1)^(i+j), odd sides explicit shifts through a scratch image.
// The aliasing and length rules of Forward apply.
func (p *Plan2D) CentredForward(dst, src []complex128) {
	p.check(dst, src)
	p.centred(dst, src, false)
}

// CentredInverse is the inverse of CentredForward: Shift ∘ Inverse ∘ IShift.
// The aliasing and length rules of Forward apply.
func (p *Plan2D) CentredInverse(dst, src []complex128) {
	p.check(dst, src)
	p.centred(dst, src, true)
}

func (p *Plan2D) check(dst, src []complex128) {
	n := p.ny * p.nx
	if len(dst) != n || len(src) != n {
		panic(fmt.Sprintf("fft: Plan2D of %d×%d given dst of length %d and src of length %d", p.ny, p.nx, len(dst), len(src)))
	}
}

func (p *Plan2D) centred(dst, src []complex128, inv bool) {
	switch p.centre {
	case centreRotate:
		p.transform(dst, src, inv, true)
	case centreModulate:
		p.modulated(dst, src, inv)
	default:
		IShift(p.shiftBuf, src, p.ny, p.nx)
		p.transform(p.shiftBuf, p.shiftBuf, inv, false)
		Shift(dst, p.shiftBuf, p.ny, p.nx)
	}
}

// transform runs the column pass from src into dst and then the row pass in
// place on dst; centred (only for centreRotate) selects the centred
// transform. The column pass takes p.block adjacent columns at a time: the
// first pass reads them straight from src and the last one writes them
// straight to dst, the passes between work on two small blocks that stay in
// cache.
func (p *Plan2D) transform(dst, src []complex128, inv, centred bool) {
	ny, nx := p.ny, p.nx
	for c0 := 0; c0 < nx; c0 += p.block {
		w := min(p.block, nx-c0)
		a := p.blkA[:ny*w]
		b := p.blkB[:ny*w]
		p.cols.exec(dst[c0:], src[c0:], a, b, layout{s0: w, ldIn: nx, ldOut: nx}, inv, centred, p.scale, &p.colWk)
	}
	for i := range ny {
		row := dst[i*nx : (i+1)*nx]
		p.rows.exec(row, row, p.rowA, p.rowB, contiguous(1), inv, centred, 1, &p.rowWk)
	}
}

// modulated computes the centred transform for even sides where slot
// rotation is not available, as (-1)^((ny+nx)/2) (-1)^(k+l) DFT[(-1)^(i+j) x]: the input
// sign is applied while copying each column block in, the output sign to
// each row after its transform, while it is in cache.
func (p *Plan2D) modulated(dst, src []complex128, inv bool) {
	ny, nx := p.ny, p.nx
	for c0 := 0; c0 < nx; c0 += p.block {
		w := min(p.block, nx-c0)
		a := p.blkA[:ny*w]
		b := p.blkB[:ny*w]
		gatherMod(a, src, ny, nx, c0, w)
		// b is the first intermediate; a, consumed by then, the second.
		p.cols.exec(dst[c0:], a, b, a, layout{s0: w, ldIn: w, ldOut: nx}, inv, false, p.scale, &p.colWk)
	}
	sign := 1.0
	if (ny/2+nx/2)%2 == 1 {
		sign = -1
	}
	for k := range ny {
		row := dst[k*nx : (k+1)*nx]
		p.rows.exec(row, row, p.rowA, p.rowB, contiguous(1), inv, false, 1, &p.rowWk)
		sg := sign
		if k%2 == 1 {
			sg = -sg
		}
		row = row[:nx&^1] // nx is even
		for l := 0; l < len(row); l += 2 {
			row[l] *= complex(sg, 0)
			row[l+1] *= complex(-sg, 0)
		}
	}
}

// gatherMod copies columns c0..c0+w of the ny×nx image src into blk, row by
// row (w values per row), multiplying each value by (-1)^(i+j).
func gatherMod(blk, src []complex128, ny, nx, c0, w int) {
	for i := range ny {
		d := blk[i*w : (i+1)*w]
		s := src[i*nx+c0 : i*nx+c0+w]
		s = s[:len(d)]
		sg := 1.0
		if (i+c0)%2 == 1 {
			sg = -1
		}
		for c := range d {
			d[c] = s[c] * complex(sg, 0)
			sg = -sg
		}
	}
}
