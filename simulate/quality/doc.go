// Package quality owns the image-quality figures that score a reconstruction
// against the truth: normalised root-mean-square error (NRMSE), peak
// signal-to-noise ratio (PSNR), the structural similarity index (SSIM, Wang et
// al. 2004) and the high-frequency error norm (HFEN, Ravishankar & Bresler
// 2011).
//
// Every function works on magnitude images: real []float64, row-major, ny rows
// by nx columns, as everywhere in accelplan. A region of interest is a []bool
// of the same length (true = scored); a nil roi means the whole image.
//
// The plain functions (NRMSE, PSNR, SSIM, SSIMMap, HFEN) allocate their scratch
// on every call and report bad input (mismatched lengths, an empty roi, a
// non-positive data range, an image too small) by returning NaN. Callers that
// score many images of one size should build an SSIMPlan or an HFENPlan once:
// their methods allocate nothing and return errors that say what is wrong.
package quality
