// Package priors owns the regularisers used to reconstruct undersampled data
// (Tikhonov, wavelet sparsity, total variation and kin) and the iterative
// solvers that use them (conjugate gradients, FISTA, ADMM, primal-dual). Every
// solver takes any simulate.Operator.
package priors

// Prior is a regulariser R used through its proximal map.
type Prior interface {
	// Prox writes argmin_u ½‖u − src‖² + t·R(u) into dst. dst and src may alias.
	Prox(dst, src []complex128, t float64)
	// Value returns R(x).
	Value(x []complex128) float64
}
