package out

import (
	"image"
	"image/color"
	"path/filepath"
	"strings"
	"testing"
)

func TestMontageLayoutAndPixels(t *testing.T) {
	// Each tile must appear magnified by nearest neighbour at its cell's
	// centre, read back through Go's image/png; titles put dark pixels
	// above their tile and nowhere else.
	const ny, nx, scale, gap = 6, 8, 3, 5
	img := make([]float64, ny*nx)
	for i := range img {
		img[i] = float64(i) / float64(len(img)-1)
	}
	gray, err := GrayImage(img, ny, nx, 0, 1)
	if err != nil {
		t.Fatal(err)
	}
	signed := make([]float64, ny*nx)
	for i := range signed {
		signed[i] = float64(i%5-2) / 2
	}
	div, err := DivergingImage(signed, ny, nx, 1)
	if err != nil {
		t.Fatal(err)
	}
	small := image.NewGray(image.Rect(0, 0, 4, 2)) // smaller tile, centred in its cell
	for i := range small.Pix {
		small.Pix[i] = uint8(60 * i)
	}
	tiles := []Tile{
		{Title: "truth", Image: gray},
		{Title: "error", Note: "±1", Image: div},
		{Title: "", Image: small},
	}
	path := filepath.Join(t.TempDir(), "montage.png")
	if err := WriteMontagePNG(path, tiles, MontageOptions{Columns: 2, Scale: scale, Gap: gap}); err != nil {
		t.Fatal(err)
	}
	m := decodePNG(t, path)

	titleH := faceHeight(captionFace(13))
	noteH := faceHeight(captionFace(11)) + 2
	cellW, cellH := nx*scale, ny*scale
	blockH := titleH + 4 + cellH + noteH
	wantW, wantH := gap+2*(cellW+gap), gap+2*(blockH+gap)
	if b := m.Bounds(); b.Dx() != wantW || b.Dy() != wantH {
		t.Fatalf("montage %v, want %d×%d", b, wantW, wantH)
	}
	check := func(k int, src image.Image) {
		b := src.Bounds()
		r, c := k/2, k%2
		x0 := gap + c*(cellW+gap) + (cellW-b.Dx()*scale)/2
		y0 := gap + r*(blockH+gap) + titleH + 4 + (cellH-b.Dy()*scale)/2
		for y := 0; y < b.Dy()*scale; y++ {
			for x := 0; x < b.Dx()*scale; x++ {
				want := color.RGBAModel.Convert(src.At(x/scale, y/scale))
				got := color.RGBAModel.Convert(m.At(x0+x, y0+y))
				if got != want {
					t.Fatalf("tile %d pixel (%d,%d): %v, want %v", k, y, x, got, want)
				}
			}
		}
	}
	for k, tl := range tiles {
		check(k, tl.Image)
	}
	darkIn := func(r image.Rectangle) int {
		n := 0
		for y := r.Min.Y; y < r.Max.Y; y++ {
			for x := r.Min.X; x < r.Max.X; x++ {
				if rr, _, _, _ := m.At(x, y).RGBA(); rr < 0x8000 {
					n++
				}
			}
		}
		return n
	}
	title0 := image.Rect(gap, gap, gap+cellW, gap+titleH)
	title2 := image.Rect(gap, gap+blockH+gap, gap+cellW, gap+blockH+gap+titleH)
	if n := darkIn(title0); n < 10 {
		t.Errorf("title \"truth\" drew only %d dark pixels", n)
	}
	if n := darkIn(title2); n != 0 {
		t.Errorf("empty title area has %d dark pixels", n)
	}
}

func TestMontageAutoScaleAndTruncation(t *testing.T) {
	g := image.NewGray(image.Rect(0, 0, 40, 30))
	m, err := Montage([]Tile{{Title: strings.Repeat("a very long title ", 10), Image: g}}, MontageOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// 40 px on the longer side → scale ⌈192/40⌉ = 5 → 200 px cell, plus gaps.
	if w := m.Bounds().Dx(); w != 12+200+12 {
		t.Errorf("auto-scaled width %d, want 224", w)
	}
	face := captionFace(13)
	s := fitText(face, strings.Repeat("wide ", 50), 120)
	if !strings.HasSuffix(s, "…") || len(s) < 4 {
		t.Errorf("fitText = %q, want a shortened text ending in …", s)
	}
	if w := measure(face, s); w > 120 {
		t.Errorf("fitText result is %d px wide, over 120", w)
	}
}

func TestMontageErrors(t *testing.T) {
	g := image.NewGray(image.Rect(0, 0, 4, 4))
	tests := []struct {
		name  string
		tiles []Tile
		opt   MontageOptions
		want  string
	}{
		{"none", nil, MontageOptions{}, "no tiles"},
		{"nil image", []Tile{{Title: "x"}}, MontageOptions{}, `tile 1 ("x") has no image`},
		{"empty image", []Tile{{Image: image.NewGray(image.Rect(0, 0, 0, 3))}}, MontageOptions{}, "empty"},
		{"negative", []Tile{{Image: g}}, MontageOptions{Gap: -1}, "negative"},
		{"too big", []Tile{{Image: image.NewGray(image.Rect(0, 0, 5000, 10))}}, MontageOptions{Scale: 8}, "limit"},
	}
	for _, tc := range tests {
		_, err := Montage(tc.tiles, tc.opt)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one mentioning %q", tc.name, err, tc.want)
		}
	}
}
