package quality

import (
	"encoding/json"
	"os"
	"path/filepath"
	"testing"
)

// readKernelFixture returns hfen_kernel of testdata/quality_fixture.json
// (NumPy 1.24.2, see testdata/make_quality_fixture.py).
func readKernelFixture(t *testing.T) []float64 {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", "quality_fixture.json"))
	if err != nil {
		t.Fatal(err)
	}
	var f struct {
		Kernel []float64 `json:"hfen_kernel"`
	}
	if err := json.Unmarshal(b, &f); err != nil {
		t.Fatal(err)
	}
	if len(f.Kernel) != 225 {
		t.Fatalf("fixture hfen_kernel has %d values, want 225", len(f.Kernel))
	}
	return f.Kernel
}
