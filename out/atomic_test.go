package out

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"
)

// leftovers lists the files in dir other than keep.
func leftovers(t *testing.T, dir string, keep ...string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var extra []string
outer:
	for _, e := range es {
		for _, k := range keep {
			if e.Name() == k {
				continue outer
			}
		}
		extra = append(extra, e.Name())
	}
	return extra
}

func TestAtomicWriteKeepsOldFileWhenWritingFails(t *testing.T) {
	// A write that fails half way (the producer errors after emitting
	// bytes, as an encoder would on a full disk) must leave the old file
	// byte for byte and no temporary file.
	dir := t.TempDir()
	path := filepath.Join(dir, "results.csv")
	if err := WriteCSV(path, []string{"a", "b"}, [][]string{{"1", "2"}}); err != nil {
		t.Fatal(err)
	}
	old, _ := os.ReadFile(path)
	boom := errors.New("disk full")
	err := WriteFileAtomic(path, func(w io.Writer) error {
		if _, err := w.Write([]byte("half a ta")); err != nil {
			return err
		}
		big := make([]byte, 200<<10) // past the buffer, so bytes reach the temp file
		if _, err := w.Write(big); err != nil {
			return err
		}
		return boom
	})
	if !errors.Is(err, boom) {
		t.Fatalf("error %v, want it to wrap %v", err, boom)
	}
	now, _ := os.ReadFile(path)
	if string(now) != string(old) {
		t.Errorf("old file changed to %q", now)
	}
	if extra := leftovers(t, dir, "results.csv"); len(extra) != 0 {
		t.Errorf("temporary files left behind: %v", extra)
	}
}

func TestAtomicWriteFailures(t *testing.T) {
	// Tests run as root, so a read-only folder would not stop a write;
	// these paths fail for every user.
	dir := t.TempDir()
	regular := filepath.Join(dir, "plain-file")
	if err := os.WriteFile(regular, []byte("keep me"), 0o644); err != nil {
		t.Fatal(err)
	}
	sub := filepath.Join(dir, "a-folder")
	if err := os.Mkdir(sub, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(sub, "inside"), []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	img := []float64{0, 0.5, 1, 0.25}
	tests := []struct {
		name string
		path string
	}{
		{"parent is a regular file", filepath.Join(regular, "x.png")},
		{"missing parent", filepath.Join(dir, "no-such-folder", "x.png")},
		{"destination is a folder", sub},
		{"path names a folder", dir + string(filepath.Separator)},
		{"empty path", ""},
	}
	for _, tc := range tests {
		if err := WriteGrayPNG(tc.path, img, 2, 2, 0, 1); err == nil {
			t.Errorf("%s: no error", tc.name)
		}
	}
	if b, _ := os.ReadFile(regular); string(b) != "keep me" {
		t.Errorf("regular file changed to %q", b)
	}
	if fi, err := os.Stat(sub); err != nil || !fi.IsDir() {
		t.Errorf("folder destination damaged: %v %v", fi, err)
	}
	if extra := leftovers(t, dir, "plain-file", "a-folder"); len(extra) != 0 {
		t.Errorf("temporary files left behind: %v", extra)
	}
	if extra := leftovers(t, sub, "inside"); len(extra) != 0 {
		t.Errorf("temporary files left in the folder: %v", extra)
	}
}

func TestAtomicWriteReplacesAndSetsMode(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "m.png")
	for _, n := range []int{2, 3} {
		if err := WriteMaskPNG(path, make([]bool, n*n), n, n); err != nil {
			t.Fatal(err)
		}
		if b := decodePNG(t, path).Bounds(); b.Dx() != n {
			t.Errorf("after rewrite: width %d, want %d", b.Dx(), n)
		}
	}
	fi, err := os.Stat(path)
	if err != nil {
		t.Fatal(err)
	}
	if fi.Mode().Perm() != 0o644 {
		t.Errorf("mode %v, want 0644", fi.Mode().Perm())
	}
	if extra := leftovers(t, dir, "m.png"); len(extra) != 0 {
		t.Errorf("temporary files left behind: %v", extra)
	}
}
