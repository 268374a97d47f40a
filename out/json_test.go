package out

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

func TestWriteJSONRoundTrip(t *testing.T) {
	// Reference: Go's encoding/json decoder reads back the same values.
	type row struct {
		Scheme   string  `json:"scheme"`
		ScanTime float64 `json:"scan_time_s"`
		SSIM     float64 `json:"ssim"`
	}
	in := []row{{"Poisson-disc, R=4", 96.5, 0.91234}, {"uniform \"R=2\"", 192, 0.97}}
	path := filepath.Join(t.TempDir(), "r.json")
	if err := WriteJSON(path, in); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var out []row
	if err := json.Unmarshal(b, &out); err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(in, out) {
		t.Errorf("read back %+v, want %+v", out, in)
	}
	if !strings.HasSuffix(string(b), "}\n]\n") {
		t.Errorf("file does not end with a newline after the value: %q", b[len(b)-6:])
	}
	// NaN is not JSON: error, and the good file stays.
	if err := WriteJSON(path, map[string]float64{"x": math.NaN()}); err == nil {
		t.Error("NaN: no error")
	}
	if b2, _ := os.ReadFile(path); string(b2) != string(b) {
		t.Error("failed write changed the file")
	}
}
