package bands

import (
	"context"
	"fmt"

	"lamina/internal/par"
)

// Structure holds the bands of one Hamiltonian at a list of k-points.
type Structure struct {
	Path
	// Energies[k][b] is band b (ascending) at point k, in eV.
	Energies [][]float64
	// Weights[k][b][l] is the weight of that state on layer l+1 (sums to 1 over l).
	Weights [][][]float64
}

// Options controls parallel k-point loops. The zero value is ready to use.
type Options struct {
	// Workers is the number of goroutines; 0 means GOMAXPROCS. Results are identical for any
	// value.
	Workers int
}

// Compute diagonalises h at every point of path and returns energies and layer weights.
// It stops early, returning ctx's error, when ctx is cancelled.
func Compute(ctx context.Context, h Hamiltonian, path Path, opt Options) (*Structure, error) {
	nk, dim := len(path.Points), h.Dim()
	if nk == 0 {
		return nil, fmt.Errorf("bands: empty path")
	}
	if dim < 2 || dim%2 != 0 {
		return nil, fmt.Errorf("bands: Hamiltonian order %d is not 2N", dim)
	}
	s := &Structure{Path: path, Energies: make([][]float64, nk), Weights: make([][][]float64, nk)}
	workers := par.Workers(opt.Workers, nk)
	solvers := make([]*Solver, workers)
	for i := range solvers {
		var err error
		if solvers[i], err = NewSolver(dim); err != nil {
			return nil, err
		}
	}
	err := par.For(ctx, workers, nk, func(w, i int) error {
		k := path.Points[i]
		e, z, err := solvers[w].Vectors(h, k.X, k.Y)
		if err != nil {
			return err
		}
		s.Energies[i] = append([]float64(nil), e...)
		s.Weights[i] = make([][]float64, dim)
		for b := range dim {
			s.Weights[i][b] = LayerWeights(nil, z[b*dim:(b+1)*dim])
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	return s, nil
}
