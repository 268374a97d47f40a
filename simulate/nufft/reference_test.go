package nufft

import (
	"encoding/json"
	"os"
	"testing"
)

// reference holds the values of testdata/reference.json, made by
// testdata/gen_reference.py with Debian python3-scipy 1.10.1 and
// python3-numpy 1.24.2.
type reference struct {
	I0   [][2]float64 `json:"i0"`
	KBFT []struct {
		W     int     `json:"w"`
		Alpha float64 `json:"alpha"`
		Beta  float64 `json:"beta"`
		Xi    float64 `json:"xi"`
		Value float64 `json:"value"`
	} `json:"kbft"`
	Centred []struct {
		Ny     int       `json:"ny"`
		Nx     int       `json:"nx"`
		Re     []float64 `json:"re"`
		Im     []float64 `json:"im"`
		SpecRe []float64 `json:"spec_re"`
		SpecIm []float64 `json:"spec_im"`
	} `json:"centred"`
}

func loadReference(t *testing.T) *reference {
	t.Helper()
	b, err := os.ReadFile("testdata/reference.json")
	if err != nil {
		t.Fatal(err)
	}
	var r reference
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	return &r
}
