package priors

import (
	"errors"
	"fmt"
	"math"
)

// LambdaScore is one evaluation made by TuneLambda.
type LambdaScore struct {
	Lambda float64
	Score  float64
}

// TuneLambda searches [lo, hi] for the λ that minimises score, by
// golden-section search over log λ (Kiefer J, "Sequential minimax search for
// a maximum", Proc Am Math Soc 1953;4:502-506; Press WH et al., Numerical
// Recipes, 3rd ed., CUP 2007, §10.2, section from memory). It calls score exactly evals times
// (at least 2) and returns the best λ seen together with every evaluation in
// the order made. After evals calls the bracket around the minimiser has
// shrunk to (log hi − log lo)·0.618^(evals−1) in log λ.
//
// The score is assumed unimodal in log λ within the bracket; the end points
// themselves are never evaluated. The search is over whatever λ the caller's
// score uses: with RelativeLambda that is the relative weight, which makes
// one bracket (say 1e-4 … 1e-1) fit every data set. The caller should score
// on a calibration noise realisation and report quality on other
// realisations, which never take part in the tuning. A score that returns
// NaN counts as +Inf.
func TuneLambda(score func(lambda float64) float64, lo, hi float64, evals int) (best float64, trace []LambdaScore, err error) {
	switch {
	case score == nil:
		return 0, nil, errors.New("priors: TuneLambda needs a score function")
	case !(lo > 0) || math.IsInf(lo, 0):
		return 0, nil, fmt.Errorf("priors: TuneLambda lower bound %g, want a finite value > 0", lo)
	case !(hi > lo) || math.IsInf(hi, 0):
		return 0, nil, fmt.Errorf("priors: TuneLambda bracket [%g, %g] is empty or unbounded", lo, hi)
	case evals < 2:
		return 0, nil, fmt.Errorf("priors: TuneLambda with %d evaluations, want at least 2", evals)
	}
	const g = 0.6180339887498949 // (√5 − 1)/2
	trace = make([]LambdaScore, 0, evals)
	eval := func(u float64) float64 {
		l := math.Exp(u)
		s := score(l)
		if math.IsNaN(s) {
			s = math.Inf(1)
		}
		trace = append(trace, LambdaScore{Lambda: l, Score: s})
		return s
	}
	a, b := math.Log(lo), math.Log(hi)
	c, d := b-g*(b-a), a+g*(b-a)
	fc, fd := eval(c), eval(d)
	for len(trace) < evals {
		if fc <= fd {
			b, d, fd = d, c, fc
			c = b - g*(b-a)
			fc = eval(c)
		} else {
			a, c, fc = c, d, fd
			d = a + g*(b-a)
			fd = eval(d)
		}
	}
	bestScore := math.Inf(1)
	best = math.NaN()
	for _, e := range trace {
		if e.Score < bestScore {
			best, bestScore = e.Lambda, e.Score
		}
	}
	if math.IsNaN(best) {
		return 0, trace, errors.New("priors: TuneLambda: every score was NaN or +Inf")
	}
	return best, trace, nil
}
