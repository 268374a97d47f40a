package out

import (
	"bytes"
	"fmt"
	"image"
	"image/png"
	"math"
)

// checkGrid validates the shape of a row-major ny×nx grid held in n values.
func checkGrid(what string, n, ny, nx int) error {
	if ny <= 0 || nx <= 0 {
		return fmt.Errorf("out: %s size %d×%d: both sides must be positive", what, ny, nx)
	}
	if ny > 1<<15 || nx > 1<<15 {
		return fmt.Errorf("out: %s size %d×%d exceeds the %d-pixel limit per side", what, ny, nx, 1<<15)
	}
	if n != ny*nx {
		return fmt.Errorf("out: %s has %d values, want ny×nx = %d×%d = %d", what, n, ny, nx, ny*nx)
	}
	return nil
}

// firstNonFinite returns the index of the first NaN or ±Inf value, or -1.
func firstNonFinite(img []float64) int {
	for i, v := range img {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return i
		}
	}
	return -1
}

// GrayImage renders a row-major ny×nx image as 8-bit grey levels: lo maps
// to 0 (black), hi to 255 (white), values in between linearly with rounding
// to the nearest level, and values outside [lo, hi] are clamped. It returns
// an error for a shape mismatch, lo ≥ hi, or a NaN or infinite pixel (which
// always means a fault upstream that a picture should not hide).
func GrayImage(img []float64, ny, nx int, lo, hi float64) (*image.Gray, error) {
	if err := checkGrid("image", len(img), ny, nx); err != nil {
		return nil, err
	}
	if !(lo < hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil, fmt.Errorf("out: grey window [%g, %g] must be finite with lo < hi", lo, hi)
	}
	if i := firstNonFinite(img); i >= 0 {
		return nil, fmt.Errorf("out: image pixel (row %d, column %d) is %g", i/nx, i%nx, img[i])
	}
	g := image.NewGray(image.Rect(0, 0, nx, ny))
	scale := 1 / (hi - lo)
	for i := range ny {
		row := g.Pix[i*g.Stride : i*g.Stride+nx]
		src := img[i*nx : (i+1)*nx]
		for j, v := range src {
			row[j] = to8((v - lo) * scale)
		}
	}
	return g, nil
}

// DivergingImage renders a signed row-major ny×nx map (an error or a
// difference image) with the project's diverging colour map: zero is the
// near-white neutral, −limit and below the dark blue end, +limit and above
// the dark brown-orange end. limit must be positive and finite; NaN or
// infinite pixels are an error.
func DivergingImage(img []float64, ny, nx int, limit float64) (*image.RGBA, error) {
	if err := checkGrid("signed map", len(img), ny, nx); err != nil {
		return nil, err
	}
	if !(limit > 0) || math.IsInf(limit, 0) {
		return nil, fmt.Errorf("out: diverging limit %g must be positive and finite", limit)
	}
	if i := firstNonFinite(img); i >= 0 {
		return nil, fmt.Errorf("out: signed map pixel (row %d, column %d) is %g", i/nx, i%nx, img[i])
	}
	divergingOnce.Do(buildDiverging)
	m := image.NewRGBA(image.Rect(0, 0, nx, ny))
	for i := range ny {
		row := m.Pix[i*m.Stride : i*m.Stride+4*nx]
		src := img[i*nx : (i+1)*nx]
		for j, v := range src {
			c := divergingLUT[divergingIndex(v, limit)]
			row[4*j], row[4*j+1], row[4*j+2], row[4*j+3] = c.R, c.G, c.B, c.A
		}
	}
	return m, nil
}

// MaskImage renders a row-major ny×nx sampling mask: true (sampled) is
// white, false is black.
func MaskImage(mask []bool, ny, nx int) (*image.Gray, error) {
	if err := checkGrid("mask", len(mask), ny, nx); err != nil {
		return nil, err
	}
	g := image.NewGray(image.Rect(0, 0, nx, ny))
	for i := range ny {
		row := g.Pix[i*g.Stride : i*g.Stride+nx]
		for j, on := range mask[i*nx : (i+1)*nx] {
			if on {
				row[j] = 255
			} else {
				row[j] = 0
			}
		}
	}
	return g, nil
}

// WritePNG encodes m as PNG (ISO/IEC 15948, Go's image/png) and writes it
// to path atomically.
func WritePNG(path string, m image.Image) error {
	var buf bytes.Buffer
	enc := png.Encoder{CompressionLevel: png.BestSpeed}
	if err := enc.Encode(&buf, m); err != nil {
		return fmt.Errorf("out: encoding %s: %w", path, err)
	}
	return writeBytesAtomic(path, buf.Bytes())
}

// WriteGrayPNG writes a row-major ny×nx image as an 8-bit greyscale PNG with
// the window [lo, hi] (see GrayImage).
func WriteGrayPNG(path string, img []float64, ny, nx int, lo, hi float64) error {
	g, err := GrayImage(img, ny, nx, lo, hi)
	if err != nil {
		return fmt.Errorf("%w (writing %s)", err, path)
	}
	return WritePNG(path, g)
}

// WriteDivergingPNG writes a signed row-major ny×nx map as a colour PNG with
// the diverging map spanning [−limit, +limit] (see DivergingImage).
func WriteDivergingPNG(path string, img []float64, ny, nx int, limit float64) error {
	m, err := DivergingImage(img, ny, nx, limit)
	if err != nil {
		return fmt.Errorf("%w (writing %s)", err, path)
	}
	return WritePNG(path, m)
}

// WriteMaskPNG writes a row-major ny×nx sampling mask as an 8-bit PNG,
// sampled positions white (see MaskImage).
func WriteMaskPNG(path string, mask []bool, ny, nx int) error {
	g, err := MaskImage(mask, ny, nx)
	if err != nil {
		return fmt.Errorf("%w (writing %s)", err, path)
	}
	return WritePNG(path, g)
}
