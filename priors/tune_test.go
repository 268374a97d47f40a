package priors

import (
	"math"
	"strings"
	"testing"
)

// Golden-section search (Kiefer 1953; Numerical Recipes §10.2) finds the
// minimiser of known unimodal functions of log λ to within the bracket it
// guarantees, (log hi − log lo)·0.618^(evals−1).
func TestTuneLambdaFindsKnownMinimum(t *testing.T) {
	cases := []struct {
		name   string
		f      func(l float64) float64
		argmin float64
		lo, hi float64
		evals  int
	}{
		{"parabola in log λ", func(l float64) float64 { u := math.Log(l / 0.037); return u*u + 1 }, 0.037, 1e-4, 1, 25},
		// l/a − log(l/a) is smallest at l = a and grows unevenly on each side.
		{"skewed", func(l float64) float64 { return l/0.0021 - math.Log(l/0.0021) }, 0.0021, 1e-5, 10, 30},
		{"minimum near the low end", func(l float64) float64 { return math.Abs(math.Log10(l) + 3.9) }, math.Pow(10, -3.9), 1e-4, 1e2, 40},
	}
	for _, c := range cases {
		calls := 0
		score := func(l float64) float64 { calls++; return c.f(l) }
		best, trace, err := TuneLambda(score, c.lo, c.hi, c.evals)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if calls != c.evals || len(trace) != c.evals {
			t.Errorf("%s: %d calls and %d trace entries, want %d", c.name, calls, len(trace), c.evals)
		}
		width := math.Log(c.hi/c.lo) * math.Pow(0.6180339887498949, float64(c.evals-1))
		if e := math.Abs(math.Log(best / c.argmin)); e > width {
			t.Errorf("%s: best λ = %.6g, true %.6g: log error %.3g beyond the guaranteed %.3g", c.name, best, c.argmin, e, width)
		}
		for _, s := range trace {
			if s.Lambda <= c.lo || s.Lambda >= c.hi {
				t.Errorf("%s: evaluated λ = %g outside the open bracket", c.name, s.Lambda)
			}
			if s.Score < c.f(best) {
				t.Errorf("%s: trace holds a better score than the returned λ", c.name)
			}
		}
	}
}

func TestTuneLambdaNaNScores(t *testing.T) {
	// NaN counts as +Inf: the search moves away from it.
	best, _, err := TuneLambda(func(l float64) float64 {
		if l > 0.01 {
			return math.NaN()
		}
		return -l
	}, 1e-4, 1, 20)
	if err != nil {
		t.Fatal(err)
	}
	if best > 0.01 {
		t.Errorf("best λ %g lies where the score is NaN", best)
	}
	if _, _, err := TuneLambda(func(float64) float64 { return math.NaN() }, 1e-3, 1, 5); err == nil {
		t.Error("all-NaN scores gave no error")
	}
}

func TestTuneLambdaErrors(t *testing.T) {
	f := func(l float64) float64 { return l }
	cases := []struct {
		name   string
		score  func(float64) float64
		lo, hi float64
		evals  int
		want   string
	}{
		{"nil score", nil, 1e-3, 1, 10, "score"},
		{"zero lower bound", f, 0, 1, 10, "lower bound"},
		{"negative lower bound", f, -1, 1, 10, "lower bound"},
		{"empty bracket", f, 1, 1, 10, "bracket"},
		{"reversed bracket", f, 1, 1e-3, 10, "bracket"},
		{"infinite upper", f, 1e-3, math.Inf(1), 10, "bracket"},
		{"one evaluation", f, 1e-3, 1, 1, "evaluations"},
	}
	for _, c := range cases {
		_, _, err := TuneLambda(c.score, c.lo, c.hi, c.evals)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}
