package plans

import (
	"context"
	"errors"
	"strings"
	"testing"
)

func TestEstimateAndMemoryRefusal(t *testing.T) {
	p, err := Parse("small.toml", []byte(smallPlan))
	if err != nil {
		t.Fatal(err)
	}
	e, err := EstimatePlan(context.Background(), p, 2)
	if err != nil {
		t.Fatal(err)
	}
	// 4 candidates × (2 draws + 2 draws and a 12-evaluation λ search).
	if e.Candidates != 4 || e.Recons != 4*(2+2+tuneEvals) || !(e.Seconds > 0) || e.Bytes <= 0 {
		t.Errorf("implausible estimate %+v", e)
	}
	// Memory grows with the matrix: a 4× larger matrix needs more.
	big := strings.NewReplacer("phase_lines = 64", "phase_lines = 256", "readout_points = 64", "readout_points = 256").Replace(smallPlan)
	pb, err := Parse("big.toml", []byte(big))
	if err != nil {
		t.Fatal(err)
	}
	nb, _ := MemoryNeeded(pb, 2)
	ns, _ := MemoryNeeded(p, 2)
	if nb <= ns {
		t.Errorf("memory for 256² (%d) not above 64² (%d)", nb, ns)
	}
	err = CheckMemory(pb, nb, 64<<20)
	var pe *Error
	if !errors.As(err, &pe) || pe.Key != "object.phase_lines" || !strings.Contains(pe.Msg, "available") {
		t.Errorf("want a refusal naming the key and the figure, got %v", err)
	}
	if err := CheckMemory(p, ns, 64<<30); err != nil {
		t.Errorf("refused a plan that fits: %v", err)
	}
}
