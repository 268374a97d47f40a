package out

import (
	"encoding/json"
	"fmt"
	"io"
)

// WriteJSON writes v as indented JSON (RFC 8259, Go's encoding/json, two
// spaces, a final newline) to path atomically. Values encoding/json cannot
// represent, such as NaN or ±Inf floats, are reported as an error and the
// file is left untouched.
func WriteJSON(path string, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return fmt.Errorf("out: encoding %s: %w", path, err)
	}
	b = append(b, '\n')
	return WriteFileAtomic(path, func(w io.Writer) error {
		_, err := w.Write(b)
		return err
	})
}
