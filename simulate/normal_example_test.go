package simulate_test

import (
	"fmt"
	"math/cmplx"

	"accelplan/simulate"
)

// Normal applies EᴴE without going through the data: for a mask of whole
// phase-encode rows, every other row here, it equals Adjoint∘Forward and
// needs only the column transforms.
func ExampleCartesian_Normal() {
	const ny, nx = 8, 8
	mask := make([]bool, ny*nx)
	for i := range mask {
		mask[i] = (i/nx)%2 == 0
	}
	op, err := simulate.NewCartesian(ny, nx, mask)
	if err != nil {
		panic(err)
	}
	x := make([]complex128, ny*nx)
	x[3*nx+5] = 1 // a point
	viaData := make([]complex128, ny*nx)
	y := make([]complex128, op.DataLen())
	op.Forward(y, x)
	op.Adjoint(viaData, y)
	direct := make([]complex128, ny*nx)
	op.Normal(direct, x)
	worst := 0.0
	for i := range direct {
		worst = max(worst, cmplx.Abs(direct[i]-viaData[i]))
	}
	fmt.Printf("%d of %d samples; |Normal − Adjoint∘Forward| ≤ 1e-12: %v; EᴴE of the point at (3, 5): %.2f at (3, 5), %.2f at (7, 5)\n",
		op.DataLen(), ny*nx, worst <= 1e-12, real(direct[3*nx+5]), real(direct[7*nx+5]))
	// Output:
	// 32 of 64 samples; |Normal − Adjoint∘Forward| ≤ 1e-12: true; EᴴE of the point at (3, 5): 0.50 at (3, 5), 0.50 at (7, 5)
}
