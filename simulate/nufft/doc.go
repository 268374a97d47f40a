// Package nufft owns the non-uniform fast Fourier transform of accelplan: the
// 2D type-2 transform from an image on the FFT-centred grid to samples at
// arbitrary k-space points, its exact adjoint (type 1), and the Toeplitz
// embedding of the normal operator AᴴWA on a grid of twice the size.
//
// Conventions (shared with package simulate):
//   - Images are row-major []complex128 of ny rows by nx columns; pixel (i, l)
//     sits at x_l = (l − nx/2)/nx, y_i = (i − ny/2)/ny in FOV units (integer
//     division for nx/2 and ny/2).
//   - k-space points are in cycles per FOV, inside the band |kx| ≤ nx/2,
//     |ky| ≤ ny/2.
//   - The transform approximates the non-uniform DFT (NDFT)
//     y_j = (nx·ny)^(−1/2) Σ_{i,l} x[i,l] exp(−2πi (kx_j·x_l + ky_j·y_i)),
//     so at the integer points of the centred Cartesian grid it equals the
//     orthonormal centred FFT used everywhere else in accelplan.
//
// Method: gridding with a Kaiser-Bessel kernel (Jackson JI et al., IEEE TMI
// 1991;10:473-478), with the kernel shape parameter chosen from the width W
// and the oversampling α as β = π·√((W/α)²(α−½)² − 0.8) (Beatty PJ,
// Nishimura DG, Pauly JM, IEEE TMI 2005;24:799-808), exact deapodisation by
// the kernel's closed-form Fourier transform, and the Toeplitz embedding of
// Fessler JA et al., IEEE TSP 2005;53:3393-3402.
//
// A Plan is built once per trajectory and reused across iterations: Forward
// and Adjoint allocate nothing, and their result is bit-for-bit independent of
// the number of workers.
package nufft
