package bands_test

import (
	"context"
	"fmt"
	"math"

	"lamina/bands"
	"lamina/lattice"
)

// The gap of a biased bilayer: |U| γ1/sqrt(γ1² + U²) at the rim of the "Mexican hat".
func ExampleFindGap() {
	st, _ := lattice.ParseStack("AB")
	p := lattice.Minimal()
	const u = 0.1 // eV between the layers
	h, err := bands.NewContinuum(st, p, bands.K, []float64{-u / 2, u / 2})
	if err != nil {
		fmt.Println(err)
		return
	}
	g, err := bands.FindGap(context.Background(), h, bands.GapOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("gap %.4f meV, formula %.4f meV\n", 1e3*g.Gap, 1e3*u*p.Gamma1/math.Hypot(p.Gamma1, u))
	// Output:
	// gap 96.8664 meV, formula 96.8664 meV
}
