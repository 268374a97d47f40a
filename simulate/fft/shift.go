package fft

import "fmt"

// Shift writes into dst the ny×nx row-major image src rolled by (ny/2, nx/2):
// dst[(i+ny/2) mod ny, (j+nx/2) mod nx] = src[i, j]. It moves the DC sample
// of an FFT-ordered spectrum to (ny/2, nx/2), like fftshift in array
// libraries. For even ny and nx it is its own inverse; for odd sizes undo it
// with IShift. dst may be src itself (the roll is then done in place without
// allocating) but must not overlap it otherwise. Shift panics if either slice
// does not have length ny·nx, as that is a programming error.
func Shift(dst, src []complex128, ny, nx int) {
	roll(dst, src, ny, nx, ny/2, nx/2)
}

// IShift is the inverse of Shift: it rolls by ((ny+1)/2, (nx+1)/2), moving the
// sample at (ny/2, nx/2) to (0, 0), like ifftshift in array libraries. The
// rules of Shift apply.
func IShift(dst, src []complex128, ny, nx int) {
	roll(dst, src, ny, nx, (ny+1)/2, (nx+1)/2)
}

// roll writes dst[(i+hy) mod ny, (j+hx) mod nx] = src[i, j] for hy, hx ≥ 0.
func roll(dst, src []complex128, ny, nx, hy, hx int) {
	if ny < 0 || nx < 0 || len(dst) != ny*nx || len(src) != ny*nx {
		panic(fmt.Sprintf("fft: shift of %d×%d given dst of length %d and src of length %d", ny, nx, len(dst), len(src)))
	}
	if ny == 0 || nx == 0 {
		return
	}
	hy %= ny
	hx %= nx
	if &dst[0] != &src[0] {
		for i := range ny {
			d := dst[((i+hy)%ny)*nx : ((i+hy)%ny+1)*nx]
			s := src[i*nx : (i+1)*nx]
			copy(d[hx:], s[:nx-hx])
			copy(d[:hx], s[nx-hx:])
		}
		return
	}
	// In place: rotate each row right by hx, then the rows down by hy, each
	// rotation done as three reversals.
	if hx != 0 {
		for i := range ny {
			row := dst[i*nx : (i+1)*nx]
			reverse(row)
			reverse(row[:hx])
			reverse(row[hx:])
		}
	}
	if hy != 0 {
		reverseRows(dst, nx, 0, ny)
		reverseRows(dst, nx, 0, hy)
		reverseRows(dst, nx, hy, ny)
	}
}

func reverse(x []complex128) {
	for i, j := 0, len(x)-1; i < j; i, j = i+1, j-1 {
		x[i], x[j] = x[j], x[i]
	}
}

// reverseRows reverses the order of rows lo..hi-1 of a row-major image with
// nx columns, swapping rows element by element.
func reverseRows(x []complex128, nx, lo, hi int) {
	for i, j := lo, hi-1; i < j; i, j = i+1, j-1 {
		a := x[i*nx : (i+1)*nx]
		b := x[j*nx : (j+1)*nx]
		for k := range a {
			a[k], b[k] = b[k], a[k]
		}
	}
}
