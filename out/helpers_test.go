package out

import (
	"bytes"
	"encoding/csv"
	"image"
	"image/png"
	"os"
	"strconv"
	"testing"

	xfont "golang.org/x/image/font"
)

// readCSVFile parses a whole CSV file with encoding/csv (rows may differ in
// length).
func readCSVFile(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.FieldsPerRecord = -1
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return recs
}

func atof(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

func atoi(t *testing.T, s string) int {
	t.Helper()
	v, err := strconv.Atoi(s)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

func decodeBytes(b []byte) (image.Image, error) { return png.Decode(bytes.NewReader(b)) }

func measure(face xfont.Face, s string) int { return xfont.MeasureString(face, s).Ceil() }
