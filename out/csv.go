package out

import (
	"encoding/csv"
	"fmt"
	"io"
)

// WriteCSV writes a table as RFC 4180 CSV (Go's encoding/csv, comma
// separated, fields quoted where needed, lines ending in "\n") to path
// atomically. header may be nil for a table without a header line; otherwise
// every row must have as many fields as the header, and without a header all
// rows must have as many fields as the first one, so that any CSV reader sees
// a rectangular table.
func WriteCSV(path string, header []string, rows [][]string) error {
	width := len(header)
	if header == nil && len(rows) > 0 {
		width = len(rows[0])
	}
	if width == 0 {
		return fmt.Errorf("out: table for %s has no columns", path)
	}
	for i, r := range rows {
		if len(r) != width {
			return fmt.Errorf("out: table for %s: row %d has %d fields, want %d", path, i+1, len(r), width)
		}
	}
	return WriteFileAtomic(path, func(w io.Writer) error {
		cw := csv.NewWriter(w)
		if header != nil {
			if err := cw.Write(header); err != nil {
				return err
			}
		}
		if err := cw.WriteAll(rows); err != nil {
			return err
		}
		return cw.Error()
	})
}
