// Package out owns everything accelplan writes for people and for other
// tools: CSV tables, 8-bit PNG pictures of images, signed error maps and
// sampling masks, side-by-side montages with titles, and the
// quality-versus-scan-time chart (PNG and SVG, drawn with gonum.org/v1/plot).
//
// out computes no quality and makes no decisions: it takes plain data (slices,
// numbers, strings) and turns them into files. Every file is written
// atomically (a temporary file in the destination folder, fsync, rename), so a
// run that fails or is interrupted never leaves a half-written file behind and
// never clobbers a good file from an earlier run.
//
// Images follow the project conventions: row-major slices of ny rows by nx
// columns, row 0 at the top of the picture.
package out
