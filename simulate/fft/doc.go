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
// self-sorting (Stockham) mixed-radix decimation-in-frequency algorithm, so no
// bit-reversal pass is needed: radix-8 and radix-4 butterflies for the power of
// two, radix-3 and radix-5 butterflies, and a direct butterfly in symmetric
// form for other primes up to 37. Twiddle factors are tabulated once per stage
// when the plan is made, each computed directly from its angle (reduced to the
// first octant) rather than by recurrence. Lengths with a larger prime factor
// use Bluestein's chirp-z algorithm over a power-of-two transform. Sources:
// Cooley JW, Tukey JW, Math Comput 1965;19:297-301; Stockham TG, AFIPS SJCC
// 1966;28:229-233 (the self-sorting formulation as laid out in Van Loan C,
// Computational Frameworks for the Fast Fourier Transform, SIAM 1992, §1.7);
// Bluestein LI, IEEE Trans Audio Electroacoust 1970;18:451-455.
//
// Two dimensions. The column pass takes a block of adjacent columns at a
// time (as many as keep the block in the second-level cache) and transforms
// them together, so that every inner loop runs over a contiguous stretch: its
// first pass reads the block straight from the source image and its last pass
// writes it straight to the destination, with the passes between working on
// two small scratch blocks. Column passes use radix 4, whose butterfly keeps
// all its pointers in registers over these long loops; the row pass, one
// short sequence at a time, uses radix 8 for fewer passes. The centred
// transforms cost nothing extra when both sides are multiples of 4: for even
// n, ifftshift of the input is a rotation of the butterfly input slots by r/2
// in the first pass and fftshift of the output the same rotation of the
// output slots in the last one. Other even sides use the modulation identity
// fftshift(DFT(ifftshift(x)))[k] = (-1)^(n/2) (-1)^k DFT((-1)^j x)[k], odd
// sides explicit shifts.
//
// Plans are built once and reused: a call allocates nothing. A plan owns
// scratch space and is therefore not safe for concurrent use; give each
// goroutine its own, made with Clone, which shares the read-only tables.
package fft
