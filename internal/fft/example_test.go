package fft_test

import (
	"fmt"
	"math"

	"lamina/internal/fft"
)

func ExamplePlan2D() {
	const nx, ny = 4, 6
	p, err := fft.NewPlan2D(nx, ny)
	if err != nil {
		panic(err)
	}
	x := make([]complex128, nx*ny)
	x[1*ny+2] = 1 // a unit impulse at (1, 2)
	if err := p.Forward(x); err != nil {
		panic(err)
	}
	// X_kl = exp(−2πi(k/4 + 2l/6)); at (k, l) = (1, 0) that is −i.
	fmt.Printf("%.3f\n", x[1*ny+0])
	if err := p.Inverse(x); err != nil {
		panic(err)
	}
	fmt.Printf("%.3f\n", x[1*ny+2])
	// Output:
	// (0.000-1.000i)
	// (1.000+0.000i)
}

func ExampleConvolver() {
	const l1, l2 = 3, 4
	c, err := fft.NewConvolver(l1, l2)
	if err != nil {
		panic(err)
	}
	// A kernel that depends on the distance only, hence real and even.
	err = c.SetKernel(func(di, dj int) float64 { return math.Exp(-math.Hypot(float64(di), float64(dj))) })
	if err != nil {
		panic(err)
	}
	in := make([]complex128, l1*l2)
	in[0] = 1 // unit source at (0, 0): the output is K(i, j)
	out := make([]complex128, l1*l2)
	if err := c.Convolve(out, in); err != nil {
		panic(err)
	}
	fmt.Printf("%.4f %.4f\n", real(out[0*l2+1]), math.Exp(-1))
	fmt.Printf("%.4f %.4f\n", real(out[2*l2+3]), math.Exp(-math.Hypot(2, 3)))
	// Output:
	// 0.3679 0.3679
	// 0.0272 0.0272
}
