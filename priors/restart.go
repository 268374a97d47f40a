package priors

import (
	"fmt"
	"math"

	"accelplan/simulate"
)

// RestartScheme chooses when FISTARestart resets its momentum.
type RestartScheme int

const (
	// RestartGradient resets the momentum when it points uphill, i.e. when
	// Re⟨z_k − x_k, x_k − x_{k−1}⟩ > 0 with z_k the extrapolated point at
	// which the gradient step was taken (the "gradient scheme" of
	// O'Donoghue B, Candès E, "Adaptive restart for accelerated gradient
	// schemes", Found Comput Math 2015;15:715-732, in its proximal form with
	// the generalised gradient (z_k − x_k)/step). It costs nothing extra.
	RestartGradient RestartScheme = iota
	// RestartFunction resets the momentum when the objective rises,
	// F(x_k) > F(x_{k−1}) (their "function scheme"). Here the step that
	// raised F is also discarded, so the next one is a plain proximal
	// gradient step from x_{k−1}, which cannot raise F (Beck A, Teboulle M,
	// SIAM J Imaging Sci 2009;2:183-202, Lemma 2.3): F is non-increasing, as
	// in monotone FISTA (Beck A, Teboulle M, IEEE Trans Image Process
	// 2009;18:2419-2434). It costs one more application of E and one
	// evaluation of R per iteration. With a randomised prior (CycleSpin),
	// whose Value is not what its Prox decreases, use the gradient scheme.
	RestartFunction
	// RestartNever never restarts: plain FISTA.
	RestartNever
)

// String returns "gradient", "function" or "never".
func (s RestartScheme) String() string {
	switch s {
	case RestartGradient:
		return "gradient"
	case RestartFunction:
		return "function"
	case RestartNever:
		return "never"
	}
	return fmt.Sprintf("RestartScheme(%d)", int(s))
}

// ParseRestartScheme returns the scheme named "gradient", "function" or
// "never".
func ParseRestartScheme(name string) (RestartScheme, error) {
	for _, s := range []RestartScheme{RestartGradient, RestartFunction, RestartNever} {
		if s.String() == name {
			return s, nil
		}
	}
	return 0, fmt.Errorf("priors: unknown FISTA restart scheme %q (valid: gradient, function, never)", name)
}

// FISTARestartOptions tunes FISTARestart: the options of FISTA and the
// restart scheme. The zero value is usable (gradient restart).
type FISTARestartOptions struct {
	FISTAOptions
	// Scheme selects the restart test.
	Scheme RestartScheme
}

// FISTARestartInfo reports how a FISTARestart run ended.
type FISTARestartInfo struct {
	FISTAInfo
	// Restarts counts the momentum resets.
	Restarts int
	// Rejected counts the steps discarded by the function scheme.
	Rejected int
}

// FISTARestart minimises ½‖E x − y‖² + λ R(x) like FISTA, with adaptive
// restart of the momentum (O'Donoghue B, Candès E, Found Comput Math
// 2015;15:715-732; see RestartScheme). On strongly convex problems the
// momentum of plain FISTA overshoots and the objective ripples; restarting
// recovers a linear rate close to that of the optimally tuned accelerated
// method without knowing the strong convexity constant (in the tests, a
// quadratic with condition number 10³ reached a gap of 1e-10 in 480
// iterations, where plain FISTA had not after 3000). Where the problem is
// not strongly convex the restart may not fire for hundreds of iterations,
// and then the iterates are plain FISTA's.
//
// The arguments, options, warm start, stopping rule and step are those of
// FISTA (the Tol test is skipped on a discarded step). If the prior has a
// Reset method (CycleSpin, TV) it is called first, so the run does not
// depend on earlier uses of the prior. All buffers are allocated before the
// first iteration; the iterations allocate nothing as long as the operator
// and prior do not. The returned slice is new.
func FISTARestart(op simulate.Operator, y []complex128, prior Prior, lambda float64, opt FISTARestartOptions) ([]complex128, FISTARestartInfo, error) {
	var info FISTARestartInfo
	o := opt.FISTAOptions
	if err := checkFISTA(op, y, prior, lambda, o); err != nil {
		return nil, info, err
	}
	if opt.Scheme != RestartGradient && opt.Scheme != RestartFunction && opt.Scheme != RestartNever {
		return nil, info, fmt.Errorf("priors: unknown FISTA restart scheme %d (valid: gradient, function, never)", int(opt.Scheme))
	}
	if prior != nil {
		resetIfStateful(prior)
	}
	s, err := startFISTA(op, y, lambda, o)
	if err != nil {
		return nil, info, err
	}
	x, xPrev, z, g, r := s.x, s.xPrev, s.z, s.g, s.r
	step, thr, grad, maxIter := s.step, s.thr, s.grad, s.maxIter
	info.Step = step
	usePrior := prior != nil && lambda > 0
	fPrev := math.Inf(1)
	if opt.Scheme == RestartFunction {
		fPrev = objective(op, y, prior, lambda, xPrev, r)
	}
	t := 1.0
	for k := 1; k <= maxIter; k++ {
		// x = prox(g), g = z − step·E^H(E z − y)
		grad.apply(g, z, step)
		if usePrior {
			prior.Prox(x, g, thr)
		} else {
			copy(x, g)
		}
		info.Iterations = k
		restart, rejected := false, false
		switch opt.Scheme {
		case RestartGradient:
			var s float64
			for i, v := range x {
				a, b := z[i]-v, v-xPrev[i]
				s += real(a)*real(b) + imag(a)*imag(b)
			}
			restart = s > 0
		case RestartFunction:
			f := objective(op, y, prior, lambda, x, r)
			if f > fPrev {
				restart, rejected = true, true
			} else {
				fPrev = f
			}
		}
		if rejected {
			// Keep x_{k−1}; restart from it without momentum.
			info.Rejected++
			info.Restarts++
			t = 1
			copy(z, xPrev)
			info.RelChange = 0
			if o.Monitor != nil && !o.Monitor(k, xPrev) {
				info.Stopped = true
				break
			}
			continue
		}
		if restart {
			info.Restarts++
			t = 1
		}
		tNext := (1 + math.Sqrt(1+4*t*t)) / 2
		beta := (t - 1) / tNext
		var dn, xn float64
		for i := range x {
			d := x[i] - xPrev[i]
			dn += real(d)*real(d) + imag(d)*imag(d)
			xn += real(x[i])*real(x[i]) + imag(x[i])*imag(x[i])
			z[i] = x[i] + complex(beta*real(d), beta*imag(d))
		}
		t = tNext
		x, xPrev = xPrev, x // xPrev holds x_k
		if xn > 0 {
			info.RelChange = math.Sqrt(dn / xn)
		} else {
			info.RelChange = math.Sqrt(dn)
		}
		if o.Monitor != nil && !o.Monitor(k, xPrev) {
			info.Stopped = true
			break
		}
		if o.Tol > 0 && info.RelChange <= o.Tol {
			info.Converged = true
			break
		}
	}
	x = xPrev
	info.Objective = objective(op, y, prior, lambda, x, r)
	return x, info, nil
}
