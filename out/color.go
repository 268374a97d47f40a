package out

import (
	"image/color"
	"math"
	"sync"
)

// Colour science used here (sRGB transfer curve and primaries, CIELAB with
// the D65 white point):
//   - IEC 61966-2-1:1999, default RGB colour space sRGB;
//   - CIE 15:2004, Colorimetry, 3rd ed. (CIELAB).
// The matrix and white point are the ones scikit-image 0.19 uses in
// skimage.color, against which the tests check this file.

// d65 is the CIE 1931 2° D65 reference white (X, Y, Z), Y normalised to 1.
var d65 = [3]float64{0.95047, 1.0, 1.08883}

// xyzFromLinearRGB maps linear sRGB to CIE XYZ (IEC 61966-2-1).
var xyzFromLinearRGB = [3][3]float64{
	{0.412453, 0.357580, 0.180423},
	{0.212671, 0.715160, 0.072169},
	{0.019334, 0.119193, 0.950227},
}

// linearRGBFromXYZ is the inverse of xyzFromLinearRGB, computed once.
var linearRGBFromXYZ = invert3(xyzFromLinearRGB)

func invert3(m [3][3]float64) [3][3]float64 {
	a, b, c := m[0][0], m[0][1], m[0][2]
	d, e, f := m[1][0], m[1][1], m[1][2]
	g, h, i := m[2][0], m[2][1], m[2][2]
	det := a*(e*i-f*h) - b*(d*i-f*g) + c*(d*h-e*g)
	return [3][3]float64{
		{(e*i - f*h) / det, (c*h - b*i) / det, (b*f - c*e) / det},
		{(f*g - d*i) / det, (a*i - c*g) / det, (c*d - a*f) / det},
		{(d*h - e*g) / det, (b*g - a*h) / det, (a*e - b*d) / det},
	}
}

// labToLinearRGB converts CIELAB (D65) to linear sRGB, without clipping.
func labToLinearRGB(l, a, b float64) [3]float64 {
	fy := (l + 16) / 116
	fx := fy + a/500
	fz := fy - b/200
	finv := func(t float64) float64 {
		const delta = 6.0 / 29
		if t > delta {
			return t * t * t
		}
		return 3 * delta * delta * (t - 4.0/29)
	}
	xyz := [3]float64{d65[0] * finv(fx), d65[1] * finv(fy), d65[2] * finv(fz)}
	var rgb [3]float64
	for r := range 3 {
		for c := range 3 {
			rgb[r] += linearRGBFromXYZ[r][c] * xyz[c]
		}
	}
	return rgb
}

// linearRGBToLab converts linear sRGB to CIELAB (D65).
func linearRGBToLab(rgb [3]float64) (l, a, b float64) {
	var xyz [3]float64
	for r := range 3 {
		for c := range 3 {
			xyz[r] += xyzFromLinearRGB[r][c] * rgb[c]
		}
	}
	f := func(t float64) float64 {
		const delta = 6.0 / 29
		if t > delta*delta*delta {
			return math.Cbrt(t)
		}
		return t/(3*delta*delta) + 4.0/29
	}
	fx, fy, fz := f(xyz[0]/d65[0]), f(xyz[1]/d65[1]), f(xyz[2]/d65[2])
	return 116*fy - 16, 500 * (fx - fy), 200 * (fy - fz)
}

// srgbEncode applies the sRGB transfer curve to a linear value in [0, 1].
func srgbEncode(c float64) float64 {
	if c <= 0.0031308 {
		return 12.92 * c
	}
	return 1.055*math.Pow(c, 1/2.4) - 0.055
}

// srgbDecode inverts srgbEncode.
func srgbDecode(c float64) float64 {
	if c <= 0.04045 {
		return c / 12.92
	}
	return math.Pow((c+0.055)/1.055, 2.4)
}

// to8 quantises a value in [0, 1] to 8 bits, clamping outside values.
func to8(v float64) uint8 {
	switch {
	case !(v > 0): // also NaN
		return 0
	case v >= 1:
		return 255
	}
	return uint8(math.Round(v * 255))
}

// Diverging colour map for signed maps (errors, differences). It is this
// project's own design: a straight path in CIELAB from a dark blue
// (negative end) through a near-white neutral at zero to a dark brown-orange
// (positive end). Both ends have the same lightness, so lightness encodes
// |value| identically on both sides and the sign is carried by the
// blue-yellow opponent axis, which red-green colour-vision deficiencies
// leave intact. Every entry is inside the sRGB gamut (checked by the tests).
var (
	divergingNeutral  = [3]float64{97, 0, 0}
	divergingNegative = [3]float64{33, 10, -42}
	divergingPositive = [3]float64{33, 28, 40}
)

// DivergingSteps is the number of entries in the diverging colour map. It is
// odd, so that zero has an entry of its own (the middle one).
const DivergingSteps = 257

var (
	divergingOnce sync.Once
	divergingLUT  [DivergingSteps]color.RGBA
)

// divergingAt returns the Lab coordinates of the map at t in [-1, 1].
func divergingAt(t float64) [3]float64 {
	end := divergingPositive
	if t < 0 {
		end, t = divergingNegative, -t
	}
	var lab [3]float64
	for i := range 3 {
		lab[i] = divergingNeutral[i] + t*(end[i]-divergingNeutral[i])
	}
	return lab
}

func buildDiverging() {
	for i := range DivergingSteps {
		t := 2*float64(i)/float64(DivergingSteps-1) - 1
		lab := divergingAt(t)
		lin := labToLinearRGB(lab[0], lab[1], lab[2])
		divergingLUT[i] = color.RGBA{
			R: to8(srgbEncode(lin[0])),
			G: to8(srgbEncode(lin[1])),
			B: to8(srgbEncode(lin[2])),
			A: 255,
		}
	}
}

// DivergingColor returns the colour the diverging map gives to v when the
// map spans [-limit, +limit]; values beyond ±limit get the end colours. It
// never panics: a non-positive or NaN limit, or a NaN v, yields the neutral
// colour.
func DivergingColor(v, limit float64) color.RGBA {
	divergingOnce.Do(buildDiverging)
	return divergingLUT[divergingIndex(v, limit)]
}

func divergingIndex(v, limit float64) int {
	const mid = (DivergingSteps - 1) / 2
	if !(limit > 0) || math.IsNaN(v) {
		return mid
	}
	t := v / limit
	if t > 1 {
		t = 1
	} else if t < -1 {
		t = -1
	}
	return mid + int(math.Round(t*mid))
}

// palette is the line colour set of the charts, in the order curves use it.
// It is this project's own set, found by a greedy max-min search over an
// 18-level sRGB grid (lightness J' between 38 and 68 in CAM02-UCS, so that
// every colour reads on white) that maximises the smallest pairwise CAM02-UCS
// distance under normal vision and under simulated full deuteranomaly,
// protanomaly and tritanomaly (simulation: Machado GM, Oliveira MM,
// Fernandes LAF, IEEE TVCG 2009;15:1291-1298). The smallest distance of the
// set, over all four conditions, is about 15 (checked by the tests against
// a fixture made with the colorspacious library). Charts also vary marker
// shape, so no curve is told apart by colour alone.
var palette = [...]color.RGBA{
	{0x2D, 0x5A, 0xB4, 0xFF}, // deep blue
	{0xE1, 0x78, 0x00, 0xFF}, // orange
	{0x78, 0x4B, 0x4B, 0xFF}, // maroon brown
	{0xA5, 0x96, 0xA5, 0xFF}, // greyed mauve
	{0x5A, 0x96, 0xFF, 0xFF}, // sky blue
	{0xB4, 0x3C, 0x00, 0xFF}, // rust
	{0x78, 0x69, 0x87, 0xFF}, // slate violet
	{0x69, 0x96, 0x69, 0xFF}, // sage green
}

// CurveColor returns the chart colour of curve i (0-based), cycling through
// the project's colour-blind-safe palette of 8 colours.
func CurveColor(i int) color.RGBA {
	n := len(palette)
	return palette[((i%n)+n)%n]
}
