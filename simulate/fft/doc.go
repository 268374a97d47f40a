// Package fft owns the discrete Fourier transforms that every encoding
// operator and reconstruction in accelplan runs on: complex128, one- and
// two-dimensional, any length, with orthonormal scaling
//
//	X[k] = n^(-1/2) Σ_j x[j] exp(-2πi jk/n),   x[j] = n^(-1/2) Σ_k X[k] exp(+2πi jk/n),
//
// so that Parseval's identity ‖X‖ = ‖x‖ holds and white noise keeps its
// standard deviation through a transform. It also owns the centred-spectrum
// helpers (Shift, IShift, Plan2D.CentredForward) that move between the
// FFT-centred image grid of package simulate and k-space with DC in the middle.
//
// Method. Lengths whose prime factors are all small are transformed by a
// self-sorting (Stockham) mixed-radix decimation-in-frequency algorithm with
// radix-4, 2, 3 and 5 butterflies and a direct butterfly for other primes up to
// 37; no bit-reversal pass is needed. Twiddle factors are tabulated once per
// stage when the plan is made, each computed directly from its angle rather
// than by recurrence. Lengths with a larger prime factor use Bluestein's chirp-z
// algorithm over a power-of-two transform. Sources: Cooley JW, Tukey JW, Math
// Comput 1965;19:297-301; Stockham TG, AFIPS SJCC 1966;28:229-233 (self-sorting
// formulation as laid out in Van Loan C, Computational Frameworks for the Fast
// Fourier Transform, SIAM 1992, §1.7); Bluestein LI, IEEE Trans Audio
// Electroacoust 1970;18:451-455. A two-dimensional transform runs the columns in
// blocks of a few adjacent columns, transformed together so that every inner
// loop is a contiguous run, and then the rows.
//
// Plans are built once and reused: a call allocates nothing. A plan owns
// scratch space and is therefore not safe for concurrent use; give each
// goroutine its own, made with Clone, which shares the read-only tables.
package fft
