package out_test

import (
	"fmt"
	"log"
	"os"
	"path/filepath"
	"strings"

	"accelplan/out"
)

// An invented two-candidate study: a 16×16 square object, one scheme, one
// method. Real reports come from a run; these numbers are made up.
func ExampleWriteReport() {
	const n = 16
	truth := make([]float64, n*n)
	mask := make([]bool, n*n)
	for i := range n {
		for j := range n {
			if i > 3 && i < 12 && j > 3 && j < 12 {
				truth[i*n+j] = 0.8
			}
			mask[i*n+j] = i%2 == 0 || (i > 5 && i < 10)
		}
	}
	png := func(img []float64, lo, hi float64) []byte {
		g, err := out.GrayImage(img, n, n, lo, hi)
		if err != nil {
			log.Fatal(err)
		}
		b, err := out.EncodeReportPNG(g)
		if err != nil {
			log.Fatal(err)
		}
		return b
	}
	m, _ := out.MaskImage(mask, n, n)
	maskPNG, _ := out.EncodeReportPNG(m)
	errMap := make([]float64, n*n)
	e, _ := out.DivergingImage(errMap, n, n, 0.1)
	errPNG, _ := out.EncodeReportPNG(e)

	r := out.Report{
		Title: "Example study", Caution: "Invented numbers.", Version: "dev", PlanName: "example.toml",
		Metric: "SSIM", Threshold: 0.9, HigherIsBetter: true, ReferenceTime: 120,
		ErrorLimit: 0.1, GrayLo: 0, GrayHi: 1, Truth: png(truth, 0, 1),
		Recommendation: out.ReportPick{Found: true, Protocol: "uniform lines, R = 1.6", Scheme: "uniform",
			Method: "zero-filled", R: 1.6, Lines: 10, ScanTime: 75, Mean: 0.95, Bound: 0.93, Lambda: "none (zero-filled)"},
		Candidates: []out.ReportCandidate{
			{Label: "R = 1.6", Scheme: "uniform", Method: "zero-filled", R: 1.6, Lines: 10, ScanTime: 75,
				Values: []out.ReportValue{{Metric: "SSIM", Mean: 0.95, Std: 0.01, Bound: 0.93, N: 8}},
				Meets:  true, Pick: true, Recon: png(truth, 0, 1), Error: errPNG, Mask: maskPNG},
			{Label: "R = 1", Scheme: "uniform", Method: "zero-filled", R: 1, Lines: 16, ScanTime: 120,
				Values: []out.ReportValue{{Metric: "SSIM", Mean: 0.99, Std: 0.002, Bound: 0.988, N: 8}},
				Meets:  true, Recon: png(truth, 0, 1), Error: errPNG, Mask: maskPNG},
		},
	}
	dir, err := os.MkdirTemp("", "report-example-")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "report.html")
	if err := out.WriteReport(path, r); err != nil {
		log.Fatal(err)
	}
	page, _ := os.ReadFile(path)
	fmt.Println(strings.Contains(string(page), "saves 0:45 (37.5%)"))
	fmt.Println(strings.Count(string(page), `<article class="cand`), "candidate sections")
	// Output:
	// true
	// 2 candidate sections
}
