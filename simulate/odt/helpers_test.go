package odt

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

// relErr returns ‖a − b‖/‖b‖.
func relErr(a, b []complex128) float64 {
	var n, d float64
	for i := range a {
		x := a[i] - b[i]
		n += real(x)*real(x) + imag(x)*imag(x)
		d += real(b[i])*real(b[i]) + imag(b[i])*imag(b[i])
	}
	return math.Sqrt(n / d)
}

// scaled returns sp with every index step multiplied by f.
func scaled(sp Specimen, f float64) Specimen {
	out := Specimen{Medium: sp.Medium}
	for _, b := range sp.Bodies {
		b.DeltaN *= f
		out.Bodies = append(out.Bodies, b)
	}
	return out
}

// readJSON decodes a fixture from testdata.
func readJSON(t *testing.T, name string, v any) {
	t.Helper()
	raw, err := os.ReadFile("testdata/" + name)
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(raw, v); err != nil {
		t.Fatal(err)
	}
}

// tilted returns an in-plane illumination at deg degrees from the optical
// axis, towards +x for positive deg.
func tilted(deg float64) [3]float64 {
	s, c := math.Sincos(deg * math.Pi / 180)
	return [3]float64{s, 0, c}
}
