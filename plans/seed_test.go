package plans

import "testing"

// Every random draw is seeded from the plan (house rule): masks and noise
// must not change when the program is rebuilt, although the journal, which
// is keyed by the binary too, must then recompute. Checked by computing the
// candidates of the default plan under two different build identities.
func TestSeedsDoNotDependOnTheBinary(t *testing.T) {
	p, err := Parse("builtin", Builtin())
	if err != nil {
		t.Fatal(err)
	}
	first, err := Candidates(p)
	if err != nil {
		t.Fatal(err)
	}
	recon := reconSeedKey(p.Recons[0])
	saved := buildID
	buildID = func() string { return "another-build" }
	defer func() { buildID = saved }()
	second, err := Candidates(p)
	if err != nil {
		t.Fatal(err)
	}
	if len(first) != len(second) || len(first) == 0 {
		t.Fatalf("%d and %d candidates", len(first), len(second))
	}
	seeds := map[uint64]bool{}
	for i := range first {
		a, b := first[i], second[i]
		if a.MaskSeed != b.MaskSeed || a.SeedKey() != b.SeedKey() {
			t.Errorf("candidate %d: mask seed %x / seed key %s under one build, %x / %s under another", i, a.MaskSeed, a.SeedKey(), b.MaskSeed, b.SeedKey())
		}
		if a.Key() == b.Key() {
			t.Errorf("candidate %d: journal key %s is the same under two builds", i, a.Key())
		}
		seeds[a.MaskSeed] = true
	}
	if len(seeds) != len(first) {
		t.Errorf("%d distinct mask seeds for %d candidates", len(seeds), len(first))
	}
	if reconSeedKey(p.Recons[0]) != recon {
		t.Error("the seed key of a reconstruction depends on the binary")
	}
}
