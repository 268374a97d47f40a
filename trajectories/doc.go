// Package trajectories owns the sampling schemes that accelplan compares: which
// k-space samples (or which illumination directions) an acquisition measures,
// how many shots that costs and the acceleration it achieves against its
// family's fully sampled reference, and the point-spread function (PSF) and
// incoherence figures that describe the aliasing it causes.
//
// Conventions (shared with package simulate):
//   - k-space coordinates are in cycles per field of view (FOV). On the centred
//     Cartesian grid, row m of an ny-by-nx mask is ky = m − ny/2 and column n is
//     kx = n − nx/2 (integer division), so the DC sample sits at (ny/2, nx/2).
//   - Masks and images are row-major, ny rows by nx columns.
//   - A 2D Cartesian sampling is undersampled along the phase-encode direction
//     (rows, ky); the readout (kx) is always fully sampled, so one acquired row
//     is one shot.
//
// The package reports shots only; scan-time models (TR, echo train length,
// averages) belong to package plans.
package trajectories
