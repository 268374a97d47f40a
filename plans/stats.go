package plans

import (
	"math"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Confidence is the one-sided confidence level of the bounds in a Summary.
const Confidence = 0.95

// Summary describes repeated measurements of one quality figure.
type Summary struct {
	N     int
	Mean  float64
	Std   float64 // sample standard deviation (n − 1)
	Lower float64 // one-sided lower 95% confidence bound of the mean
	Upper float64 // one-sided upper 95% confidence bound of the mean
}

// Summarize returns the mean, the sample standard deviation and the
// one-sided Student-t confidence bounds of the mean,
// mean ∓ t(0.95, n−1)·s/√n (any statistics textbook). With fewer than two
// values the bounds are NaN: no confidence can be claimed from one draw.
func Summarize(x []float64) Summary {
	s := Summary{N: len(x)}
	if len(x) == 0 {
		s.Mean, s.Std, s.Lower, s.Upper = math.NaN(), math.NaN(), math.NaN(), math.NaN()
		return s
	}
	s.Mean = stat.Mean(x, nil)
	if len(x) < 2 {
		s.Std, s.Lower, s.Upper = math.NaN(), math.NaN(), math.NaN()
		return s
	}
	s.Std = stat.StdDev(x, nil)
	t := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(len(x) - 1)}.Quantile(Confidence)
	half := t * s.Std / math.Sqrt(float64(len(x)))
	s.Lower, s.Upper = s.Mean-half, s.Mean+half
	return s
}
