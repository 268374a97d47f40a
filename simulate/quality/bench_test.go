package quality_test

import (
	"testing"

	"accelplan/simulate/quality"
)

func benchPair(n int) (x, ref []float64) {
	return testImage(n, n, 1), testImage(n, n, 2)
}

func BenchmarkSSIMPlanMean256(b *testing.B) {
	x, ref := benchPair(256)
	p, _ := quality.NewSSIMPlan(256, 256, 1)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := p.Mean(x, ref, nil, quality.AverageInterior); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSSIM256(b *testing.B) {
	x, ref := benchPair(256)
	b.ReportAllocs()
	for b.Loop() {
		_ = quality.SSIM(x, ref, 256, 256, nil, 1)
	}
}

func BenchmarkHFENPlan256(b *testing.B) {
	x, ref := benchPair(256)
	p, _ := quality.NewHFENPlan(256, 256)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := p.Value(x, ref, nil); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkPSNR256(b *testing.B) {
	x, ref := benchPair(256)
	b.ReportAllocs()
	for b.Loop() {
		_ = quality.PSNR(x, ref, nil, 1)
	}
}
