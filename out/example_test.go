package out_test

import (
	"fmt"
	"image/png"
	"os"
	"path/filepath"

	"accelplan/out"
)

func ExampleFormatMinSec() {
	for _, s := range []float64{0, 59.4, 187, 3723} {
		fmt.Println(out.FormatMinSec(s))
	}
	// Output:
	// 0:00
	// 0:59
	// 3:07
	// 1:02:03
}

func ExampleWriteCSV() {
	dir, _ := os.MkdirTemp("", "accelplan-example")
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "results.csv")
	err := out.WriteCSV(path,
		[]string{"scheme", "R", "scan time", "SSIM"},
		[][]string{{"Poisson-disc, TV", "4", out.FormatMinSec(96), "0.912"}})
	if err != nil {
		fmt.Println(err)
		return
	}
	b, _ := os.ReadFile(path)
	fmt.Print(string(b))
	// Output:
	// scheme,R,scan time,SSIM
	// "Poisson-disc, TV",4,1:36,0.912
}

func ExamplePlotCurve() {
	dir, _ := os.MkdirTemp("", "accelplan-example")
	defer os.RemoveAll(dir)
	chart := out.CurveChart{
		Title:          "Invented scenario: SSIM versus scan time",
		Metric:         "SSIM",
		Threshold:      0.90,
		HigherIsBetter: true,
		Curves: []out.Curve{{
			Name: "Poisson-disc, wavelet-L1",
			Points: []out.CurvePoint{
				{Label: "R=6", ScanTime: 64, Mean: 0.87, Std: 0.010, Lower: 0.858, N: 8},
				{Label: "R=4", ScanTime: 96, Mean: 0.92, Std: 0.008, Lower: 0.911, N: 8},
				{Label: "R=2", ScanTime: 192, Mean: 0.97, Std: 0.004, Lower: 0.966, N: 8},
			},
		}},
		Pick: &out.PointRef{Curve: 0, Point: 1},
		Bars: out.BarsBound,
	}
	pngPath := filepath.Join(dir, "curve.png")
	if err := out.PlotCurve(pngPath, filepath.Join(dir, "curve.svg"), chart); err != nil {
		fmt.Println(err)
		return
	}
	f, _ := os.Open(pngPath)
	defer f.Close()
	cfg, err := png.DecodeConfig(f)
	fmt.Println(cfg.Width, cfg.Height, err)
	// Output:
	// 1350 810 <nil>
}

func ExampleWriteMontagePNG() {
	dir, _ := os.MkdirTemp("", "accelplan-example")
	defer os.RemoveAll(dir)
	const n = 32
	truth, recon, diff := make([]float64, n*n), make([]float64, n*n), make([]float64, n*n)
	for i := range truth {
		if r, c := i/n-n/2, i%n-n/2; r*r+c*c < 100 {
			truth[i] = 1
		}
		recon[i] = truth[i] + 0.02*float64(i%3-1)
		diff[i] = recon[i] - truth[i]
	}
	t1, _ := out.GrayImage(truth, n, n, 0, 1)
	t2, _ := out.GrayImage(recon, n, n, 0, 1)
	t3, _ := out.DivergingImage(diff, n, n, 0.05)
	path := filepath.Join(dir, "montage.png")
	err := out.WriteMontagePNG(path, []out.Tile{
		{Title: "truth", Image: t1},
		{Title: "reconstruction", Image: t2},
		{Title: "error", Note: "±0.05", Image: t3},
	}, out.MontageOptions{})
	fmt.Println(err)
	// Output:
	// <nil>
}
