package out

import (
	"fmt"
	"math"
	"testing"
)

func TestDivergingMatchesSkimageLab2rgb(t *testing.T) {
	// Reference: skimage.color.lab2rgb (scikit-image 0.19.3) of the map's
	// Lab path, fixture testdata/diverging_skimage.csv made by
	// testdata/gen_color.py. Tolerance: 1e-4 in sRGB before quantisation,
	// and at most 1 level after it.
	recs := readCSVFile(t, "testdata/diverging_skimage.csv")[1:]
	if len(recs) != DivergingSteps {
		t.Fatalf("fixture has %d entries, want %d", len(recs), DivergingSteps)
	}
	divergingOnce.Do(buildDiverging)
	for _, r := range recs {
		i := atoi(t, r[0])
		tt := atof(t, r[1])
		if want := 2*float64(i)/float64(DivergingSteps-1) - 1; math.Abs(tt-want) > 1e-6 {
			t.Fatalf("entry %d: fixture t = %v, map t = %v", i, tt, want)
		}
		lab := divergingAt(tt)
		lin := labToLinearRGB(lab[0], lab[1], lab[2])
		lut := divergingLUT[i]
		got8 := [3]uint8{lut.R, lut.G, lut.B}
		for c := range 3 {
			want := atof(t, r[2+c])
			if got := srgbEncode(lin[c]); math.Abs(got-want) > 1e-4 {
				t.Errorf("entry %d channel %d: sRGB %.6f, skimage %.6f", i, c, got, want)
			}
			if d := int(got8[c]) - int(math.Round(want*255)); d < -1 || d > 1 {
				t.Errorf("entry %d channel %d: level %d, skimage %.1f", i, c, got8[c], want*255)
			}
		}
	}
}

func TestLabMatchesSkimageRgb2lab(t *testing.T) {
	// Reference: skimage.color.rgb2lab (scikit-image 0.19.3), fixture
	// testdata/lab_skimage.csv made by testdata/gen_color.py.
	for _, r := range readCSVFile(t, "testdata/lab_skimage.csv")[1:] {
		var rgb [3]float64
		for c := range 3 {
			var v int
			fmt.Sscanf(r[0][2*c:2*c+2], "%02x", &v)
			rgb[c] = srgbDecode(float64(v) / 255)
		}
		l, a, b := linearRGBToLab(rgb)
		got := [3]float64{l, a, b}
		for c := range 3 {
			if want := atof(t, r[1+c]); math.Abs(got[c]-want) > 0.01 {
				t.Errorf("%s component %d: %.4f, skimage %.4f", r[0], c, got[c], want)
			}
		}
	}
}

func TestDivergingMapShape(t *testing.T) {
	// Properties of this package's own design, measured with the Lab
	// conversion checked above: every entry inside the sRGB gamut (no
	// clipping hides a lightness error), lightness falls strictly from the
	// neutral middle towards both ends, and +t and -t have equal lightness.
	divergingOnce.Do(buildDiverging)
	const mid = (DivergingSteps - 1) / 2
	for i := range DivergingSteps {
		lab := divergingAt(2*float64(i)/float64(DivergingSteps-1) - 1)
		lin := labToLinearRGB(lab[0], lab[1], lab[2])
		for c := range 3 {
			if lin[c] < 0 || lin[c] > 1 {
				t.Errorf("entry %d outside the sRGB gamut: linear %v", i, lin)
			}
		}
	}
	lightness := func(i int) float64 {
		c := divergingLUT[i]
		l, _, _ := linearRGBToLab([3]float64{
			srgbDecode(float64(c.R) / 255), srgbDecode(float64(c.G) / 255), srgbDecode(float64(c.B) / 255)})
		return l
	}
	for k := 1; k <= mid; k++ {
		// The 8-bit quantisation can make neighbours tie; require a strict
		// fall over every 4 steps and no rise between neighbours.
		for _, i := range []int{mid + k, mid - k} {
			prev := mid + k - 1
			if i < mid {
				prev = mid - k + 1
			}
			if lightness(i) > lightness(prev)+0.05 {
				t.Errorf("lightness rises from entry %d (%.2f) to %d (%.2f)", prev, lightness(prev), i, lightness(i))
			}
		}
		if k >= 4 && !(lightness(mid+k) < lightness(mid+k-4)) {
			t.Errorf("lightness does not fall over entries %d..%d", mid+k-4, mid+k)
		}
		if d := math.Abs(lightness(mid+k) - lightness(mid-k)); d > 1 {
			t.Errorf("entries ±%d differ in lightness by %.2f", k, d)
		}
	}
	if c := DivergingColor(0, 1); c != divergingLUT[mid] {
		t.Errorf("DivergingColor(0) = %v, want the neutral %v", c, divergingLUT[mid])
	}
	if c := DivergingColor(math.NaN(), 1); c != divergingLUT[mid] {
		t.Errorf("DivergingColor(NaN) = %v, want the neutral", c)
	}
}

// cvdRows reads testdata/palette_colorspacious.csv (colorspacious 1.1.2,
// made by testdata/gen_palette.py).
func cvdRows(t *testing.T) [][]string {
	return readCSVFile(t, "testdata/palette_colorspacious.csv")
}

func TestPaletteIsColourBlindSafe(t *testing.T) {
	// Reference: colorspacious 1.1.2 (CAM02-UCS distances; CVD simulation
	// after Machado, Oliveira & Fernandes, IEEE TVCG 2009). A CAM02-UCS
	// distance of ~15 is many just-noticeable differences (a JND is ~1-2);
	// 15 as the floor is this package's choice. J' within [38, 68] keeps
	// every line visible on white.
	lightness := map[string]float64{}
	conds := 0
	for _, r := range cvdRows(t) {
		switch r[0] {
		case "palette_min":
			conds++
			if d := atof(t, r[2]); d < 15 {
				t.Errorf("%s: smallest palette distance %.2f < 15", r[1], d)
			}
		case "lightness":
			lightness[r[1]] = atof(t, r[2])
		}
	}
	if conds != 4 {
		t.Fatalf("fixture has %d vision conditions, want 4", conds)
	}
	if len(lightness) != len(palette) {
		t.Fatalf("fixture covers %d colours, palette has %d: regenerate testdata with gen_palette.py", len(lightness), len(palette))
	}
	for i, c := range palette {
		hex := fmt.Sprintf("%02X%02X%02X", c.R, c.G, c.B)
		j, ok := lightness[hex]
		if !ok {
			t.Errorf("palette colour %d (%s) is not the one the fixture checked: regenerate it", i, hex)
			continue
		}
		if j < 38 || j > 68 {
			t.Errorf("palette colour %s has J' %.1f outside [38, 68]", hex, j)
		}
		if CurveColor(i) != c || CurveColor(i+len(palette)) != c || CurveColor(i-len(palette)) != c {
			t.Errorf("CurveColor does not cycle the palette at %d", i)
		}
	}
}

func TestDivergingSignSurvivesColourBlindness(t *testing.T) {
	// Reference: colorspacious 1.1.2, as above: the colours of +t and −t
	// must stay apart (CAM02-UCS distance ≥ 40·t, this package's floor)
	// under every simulated deficiency, so the sign of an error is readable
	// by everyone.
	n := 0
	for _, r := range cvdRows(t) {
		if r[0] != "diverging" {
			continue
		}
		n++
		tt, d := atof(t, r[2]), atof(t, r[3])
		if d < 40*tt {
			t.Errorf("%s, t=%.2f: ±t colours only %.2f apart", r[1], tt, d)
		}
	}
	if n != 16 {
		t.Fatalf("fixture has %d diverging rows, want 16", n)
	}
}
