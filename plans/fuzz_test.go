package plans

import (
	"math"
	"strings"
	"testing"
)

// FuzzParse feeds arbitrary text to the plan parser: it must never panic,
// and whatever it accepts must satisfy the invariants the runner relies on.
func FuzzParse(f *testing.F) {
	f.Add(string(Builtin()))
	f.Add(minimal)
	f.Add(smallPlan)
	f.Add("")
	f.Add("[object]\nphase_lines = 1e309\n")
	f.Add(strings.Replace(minimal, "[1, 2]", "[nan, inf]", 1))
	f.Fuzz(func(t *testing.T, text string) {
		p, err := Parse("fuzz.toml", []byte(text))
		if err != nil {
			if p != nil {
				t.Fatal("a plan and an error")
			}
			if err.Error() == "" {
				t.Fatal("empty error message")
			}
			return
		}
		if p.Repeats < 2 || len(p.Schemes) == 0 || len(p.Recons) == 0 {
			t.Fatalf("accepted an unusable plan: %+v", p)
		}
		if !(p.Scanner.ReferenceSNR > 0) || math.IsInf(p.Scanner.ReferenceSNR, 0) || !(p.Scanner.TRms > 0) {
			t.Fatalf("accepted scanner %+v", p.Scanner)
		}
		for _, s := range p.Schemes {
			for _, r := range s.Accelerations {
				if !(r >= 1) || math.IsInf(r, 0) {
					t.Fatalf("accepted R = %v", r)
				}
			}
		}
	})
}
