// Package odt owns the physics of two-dimensional optical diffraction
// tomography (ODT) in accelplan: refractive-index specimens with exact
// spectra, the first-Born forward model that maps an index-contrast image to
// the field spectra measured for a set of plane-wave illuminations, a
// beam-propagation simulation of the total field beyond the Born
// approximation, the Born and Rytov linearisations of a measured field, and
// measurement noise.
//
// # Geometry and units
//
// The plane is (x, z): x is transverse, z the optical axis along which the
// light travels. Lengths are in micrometres (µm) and spatial frequencies in
// cycles per µm, converted to cycles per field of view (FOV) for the grid, as
// in package simulate: the reconstruction grid has N rows (z, growing
// downwards, i.e. along the light) and N columns (x), pixel (i, j) centred at
// x = (j − N/2)·L/N, z = (i − N/2)·L/N for a FOV of side L. Time dependence
// is exp(−iωt), so a plane wave is exp(+i k·r).
//
// # Scattering potential
//
// With vacuum wavenumber k0 = 2π/λ, medium index n_m and k_m = n_m·k0, the
// total field obeys (∇² + k_m²)u = −o·u with the scattering potential
// o(r) = k0²(n(r)² − n_m²) = k_m²((n/n_m)² − 1), positive where the specimen
// is denser than the medium (the convention of Kak AC, Slaney M, Principles of
// Computerized Tomographic Imaging, IEEE Press 1988, ch. 6, as recalled from
// memory).
// The image that the encoding operator maps is the Born index contrast
//
//	c(r) = (n(r)² − n_m²)/(2·n_m) = o(r)/(2·n_m·k0²),
//
// which equals the index step δn = n − n_m to first order (c = δn + δn²/(2n_m)
// exactly). Specimen.Potential gives c exactly as a sum of ellipses, so data
// are drawn from its closed-form spectrum (no inverse crime).
//
// # Fourier diffraction theorem
//
// For an incident plane wave u_in = exp(i k_in·r) and the first Born
// approximation, the scattered field on the line z = d beyond the specimen has
// the 1D spectrum U(α) = ∫ u_s(x, d) exp(−iαx) dx
//
//	U(α) = i/(2γ) · exp(iγd) · O(α − k_in,x, γ − k_in,z),  γ = √(k_m² − α²),
//
// where O is the 2D Fourier transform of o (Wolf E, Opt Commun 1969;1:153-156;
// Kak & Slaney 1988, ch. 6). The
// object frequencies measured lie on an arc of the Ewald circle of radius
// n_m/λ shifted by the incident wave vector, limited by the detection NA to
// |α| ≤ 2π·NA_det/λ. A field refocused numerically to a plane d through the
// specimen (common practice) obeys the same relation with that d; d = 0, the
// centre of the FOV, is the default.
//
// # Data and noise
//
// The detector samples the field over the FOV with N pixels of pitch L/N and
// an incident amplitude of 1; a datum is the orthonormal DFT of the scattered
// field at the detector frequency q_j = j/L (|j| ≤ NA_det·L/λ):
// y_j = √N/L · U(2π q_j). Complex white noise of standard deviation σ per
// detector pixel (per real and imaginary channel) therefore appears with the
// same σ on every datum. The field SNR is the incident amplitude over that σ:
// σ = 1/SNR.
//
// # Beyond Born
//
// SimulateFields computes the total field by a split-step beam-propagation
// method (Feit MD, Fleck JA, Appl Opt 1978;17:3990-3998) with an exact
// angular-spectrum propagator in the medium and an obliquity weight on each
// slice's scattered part chosen so that its first-order term is the first
// Born integral (the idea of the multi-layer Born model, Chen M et al.,
// Optica 2020;7:394-403, recalled from memory). Its fields span a detector
// several FOVs wide, so that light scattered beyond the FOV is kept; noise of
// σ per grid-sized pixel then reaches each datum as σ·√Span (see
// AddFieldNoise). Linearizer turns a field into
// data for the operator, either as the Born scattered field u − u_in or as
// the Rytov field u_in·ln(u/u_in) with the phase unwrapped along x (Kak &
// Slaney 1988, ch. 6; Devaney AJ, Ultrason Imaging 1982;4:336-350; 1D
// unwrapping as in Itoh K, Appl Opt 1982;21:2470).
package odt
