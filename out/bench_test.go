package out

import "testing"

func benchImage(n int) []float64 {
	img := make([]float64, n*n)
	for i := range img {
		img[i] = float64(i%251)/125 - 1
	}
	return img
}

func BenchmarkGrayImage256(b *testing.B) {
	img := benchImage(256)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := GrayImage(img, 256, 256, -1, 1); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkDivergingImage256(b *testing.B) {
	img := benchImage(256)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := DivergingImage(img, 256, 256, 1); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkWriteGrayPNG256(b *testing.B) {
	img := benchImage(256)
	path := b.TempDir() + "/g.png"
	b.ReportAllocs()
	for b.Loop() {
		if err := WriteGrayPNG(path, img, 256, 256, -1, 1); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkMontage3x256(b *testing.B) {
	img := benchImage(256)
	g, _ := GrayImage(img, 256, 256, -1, 1)
	d, _ := DivergingImage(img, 256, 256, 1)
	tiles := []Tile{{Title: "truth", Image: g}, {Title: "reconstruction", Image: g}, {Title: "error", Image: d}}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Montage(tiles, MontageOptions{Scale: 2}); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkRenderCurvePNG(b *testing.B) {
	c := testChart()
	for b.Loop() {
		if _, err := renderCurve(c, "png"); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkRenderCurveSVG(b *testing.B) {
	c := testChart()
	for b.Loop() {
		if _, err := renderCurve(c, "svg"); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkWriteCSV1000(b *testing.B) {
	rows := make([][]string, 1000)
	for i := range rows {
		rows[i] = []string{"Poisson-disc, TV", "4", "1:36", "0.912345", "8"}
	}
	path := b.TempDir() + "/t.csv"
	for b.Loop() {
		if err := WriteCSV(path, []string{"a", "b", "c", "d", "e"}, rows); err != nil {
			b.Fatal(err)
		}
	}
}
