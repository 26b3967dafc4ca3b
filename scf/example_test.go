package scf_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"

	"lamina/scf"
)

// The componentwise fixed point of cos is the Dottie number 0.7390851332...
func ExampleSolve() {
	p := scf.Problem{Update: func(_ context.Context, dst, x []float64) error {
		for i, v := range x {
			dst[i] = math.Cos(v)
		}
		return nil
	}}
	res, err := scf.Solve(context.Background(), p, []float64{0, 1, 2}, scf.Settings{Tol: 1e-10})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("status:", res.Status)
	fmt.Printf("x = %.10f\n", res.X)
	fmt.Println("residual <= 1e-10:", res.Residual <= 1e-10)
	// Output:
	// status: Converged
	// x = [0.7390851332 0.7390851332 0.7390851332]
	// residual <= 1e-10: true
}

// A run that does not converge returns its last iterate together with an
// error that wraps ErrNotConverged.
func ExampleSolve_notConverged() {
	p := scf.Problem{Update: func(_ context.Context, dst, x []float64) error {
		dst[0] = math.Cos(x[0])
		return nil
	}}
	res, err := scf.Solve(context.Background(), p, []float64{0}, scf.Settings{MaxIter: 3, Mixer: scf.Linear{Beta: 1}})
	fmt.Println(errors.Is(err, scf.ErrNotConverged), res.Status, res.Iterations)
	fmt.Printf("last iterate %.4f, residual %.4f\n", res.X[0], res.Residual)
	// Output:
	// true IterationLimit 3
	// last iterate 0.5403, residual 0.3173
}

// Anderson mixing against plain linear mixing, both with their default
// β = 0.3, on x = cos x.
func ExampleAnderson() {
	p := scf.Problem{Update: func(_ context.Context, dst, x []float64) error {
		for i, v := range x {
			dst[i] = math.Cos(v)
		}
		return nil
	}}
	x0 := []float64{0, 0.5, 1, 1.5}
	for _, m := range []scf.Mixer{scf.Linear{}, scf.Anderson{}} {
		res, err := scf.Solve(context.Background(), p, x0, scf.Settings{Tol: 1e-10, Mixer: m})
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("%-28v %2d evaluations, x[0] = %.8f\n", m, res.Iterations, res.X[0])
	}
	// Output:
	// linear(beta=0.3)             35 evaluations, x[0] = 0.73908513
	// anderson(depth=8, beta=0.3)  10 evaluations, x[0] = 0.73908513
}

// A TableRecorder prints one row per iteration. Here G(x) = x/2, whose
// iterates under linear mixing with β = 1 are x_k = 2^-k.
func ExampleSettings_recorder() {
	p := scf.Problem{Update: func(_ context.Context, dst, x []float64) error {
		dst[0] = x[0] / 2
		return nil
	}}
	s := scf.Settings{
		Tol:      0.1,
		Mixer:    scf.Linear{Beta: 1},
		Recorder: scf.NewTableRecorder(os.Stdout),
	}
	if _, err := scf.Solve(context.Background(), p, []float64{1}, s); err != nil {
		fmt.Println(err)
	}
	// Output:
	//   iter  residual [problem units]  step [problem units]  history
	//      1              5.000000e-01          5.000000e-01        0
	//      2              2.500000e-01          2.500000e-01        0
	//      3              1.250000e-01          1.250000e-01        0
	//      4              6.250000e-02          0.000000e+00        0
}
