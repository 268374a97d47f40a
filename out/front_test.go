package out

import (
	"math"
	"testing"
)

// The Pareto front (Deb 2001, from memory; common practice in trade-off
// plots) keeps the points no other point beats in both scan time and
// quality; it is drawn in order of scan time.
func TestFrontPoints(t *testing.T) {
	c := CurveChart{HigherIsBetter: true, Threshold: math.NaN(), Curves: []Curve{
		{Points: []CurvePoint{{ScanTime: 10, Mean: 0.5}, {ScanTime: 20, Mean: 0.7}, {ScanTime: 40, Mean: 0.9}}},
		{Points: []CurvePoint{{ScanTime: 15, Mean: 0.4}, {ScanTime: 20, Mean: 0.8}, {ScanTime: 50, Mean: 0.85}}},
	}}
	got := frontPoints(c)
	want := []pointXY{{x: 10, y: 0.5}, {x: 20, y: 0.8}, {x: 40, y: 0.9}}
	if len(got) != len(want) {
		t.Fatalf("front %v, want %v", got, want)
	}
	for i := range want {
		if got[i].x != want[i].x || got[i].y != want[i].y {
			t.Errorf("front point %d = %v, want %v", i, got[i], want[i])
		}
	}
	c.HigherIsBetter = false // NRMSE: lower is better
	got = frontPoints(c)
	// Now (10 s, 0.5) is fastest and (15 s, 0.4) lowest; nothing else is
	// both faster and lower than every other point.
	if len(got) != 2 || got[0].x != 10 || got[1].x != 15 {
		t.Errorf("lower-is-better front %v, want the 10 s and 15 s points", got)
	}
}
