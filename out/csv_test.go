package out

import (
	"bytes"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

func TestCSVRoundTrip(t *testing.T) {
	// Reference: Go's encoding/csv reader (RFC 4180) reads back exactly
	// the fields written, including commas, quotes, newlines, leading
	// spaces and non-ASCII text.
	header := []string{"scheme", "R", "scan time", "SSIM", "note"}
	rows := [][]string{
		{"uniform, 24 calibration lines", "4", "1:36", "0.9123", ""},
		{`variable-density "VD"`, "6", "1:04", "0.8891", "two\nlines"},
		{" leading space", "8", "0:48", "0.85", "µ, ±σ"},
	}
	path := filepath.Join(t.TempDir(), "t.csv")
	if err := WriteCSV(path, header, rows); err != nil {
		t.Fatal(err)
	}
	got := readCSVFile(t, path)
	want := append([][]string{header}, rows...)
	if !reflect.DeepEqual(got, want) {
		t.Errorf("read back %q,\nwant %q", got, want)
	}
}

func TestCSVBytesMatchPythonCsvModule(t *testing.T) {
	// Reference: Python 3.11 csv.writer (excel dialect, "\n" line ends),
	// fixture testdata/table_pycsv.csv made by testdata/gen_csv.py from the
	// same table.
	want, err := os.ReadFile("testdata/table_pycsv.csv")
	if err != nil {
		t.Fatal(err)
	}
	header := []string{"scheme", "R", "scan time", "SSIM mean", "note"}
	rows := [][]string{
		{"uniform, 24 calibration lines", "4", "1:36", "0.9123", ""},
		{`variable-density "VD" random`, "6", "1:04", "0.8891", "two\nlines"},
		{"Poisson-disc", "8", "0:48", "0.85", "µ-scale, ±σ"},
	}
	path := filepath.Join(t.TempDir(), "t.csv")
	if err := WriteCSV(path, header, rows); err != nil {
		t.Fatal(err)
	}
	got, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("WriteCSV wrote\n%s\nPython's csv module wrote\n%s", got, want)
	}
}

func TestCSVErrors(t *testing.T) {
	path := filepath.Join(t.TempDir(), "t.csv")
	tests := []struct {
		name   string
		header []string
		rows   [][]string
		want   string
	}{
		{"ragged row", []string{"a", "b"}, [][]string{{"1", "2"}, {"3"}}, "row 2 has 1 fields, want 2"},
		{"ragged without header", nil, [][]string{{"1", "2"}, {"3", "4", "5"}}, "row 2 has 3 fields"},
		{"nothing", nil, nil, "no columns"},
	}
	for _, tc := range tests {
		err := WriteCSV(path, tc.header, tc.rows)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one mentioning %q", tc.name, err, tc.want)
		}
	}
	if _, err := os.Stat(path); !os.IsNotExist(err) {
		t.Errorf("a rejected table left a file (stat: %v)", err)
	}
	// A header-only table is valid.
	if err := WriteCSV(path, []string{"a"}, nil); err != nil {
		t.Errorf("header-only table: %v", err)
	}
}
