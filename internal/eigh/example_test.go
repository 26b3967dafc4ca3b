package eigh_test

import (
	"fmt"
	"math/cmplx"

	"lamina/internal/eigh"
)

func ExampleWorkspace_Eigen() {
	// σ_y + 0.5·σ_z: eigenvalues ±sqrt(1 + 0.25). Only the lower triangle (a[2] = i) and the
	// real diagonal are read.
	a := []complex128{
		0.5, -1i,
		1i, -0.5,
	}
	ws, err := eigh.NewWorkspace(2)
	if err != nil {
		panic(err)
	}
	w := make([]float64, 2)
	z := make([]complex128, 4)
	if err := ws.Eigen(w, z, a); err != nil {
		panic(err)
	}
	for j := range w {
		v := z[j*2 : j*2+2] // eigenvector j, up to a phase
		fmt.Printf("λ%d = %+.4f  |v| = (%.4f, %.4f)\n", j, w[j], cmplx.Abs(v[0]), cmplx.Abs(v[1]))
	}
	// Output:
	// λ0 = -1.1180  |v| = (0.5257, 0.8507)
	// λ1 = +1.1180  |v| = (0.8507, 0.5257)
}
