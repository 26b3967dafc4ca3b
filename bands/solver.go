package bands

import (
	"fmt"

	"lamina/internal/eigh"
)

// Solver diagonalises one Hamiltonian at a time at chosen k-points without allocating. A Solver
// is not safe for concurrent use; give each goroutine its own.
type Solver struct {
	n  int
	h  []complex128
	w  []float64
	z  []complex128
	ws *eigh.Workspace
}

// NewSolver returns a Solver for Hamiltonians of order dim.
func NewSolver(dim int) (*Solver, error) {
	ws, err := eigh.NewWorkspace(dim)
	if err != nil {
		return nil, fmt.Errorf("bands: %w", err)
	}
	return &Solver{n: dim, h: make([]complex128, dim*dim), w: make([]float64, dim), z: make([]complex128, dim*dim), ws: ws}, nil
}

// Values returns the eigenvalues of h at (kx, ky) in ascending order (eV). The slice is owned by
// the Solver and overwritten by the next call.
func (s *Solver) Values(h Hamiltonian, kx, ky float64) ([]float64, error) {
	if h.Dim() != s.n {
		return nil, fmt.Errorf("bands: solver of order %d given a Hamiltonian of order %d", s.n, h.Dim())
	}
	h.At(s.h, kx, ky)
	if err := s.ws.Values(s.w, s.h); err != nil {
		return nil, fmt.Errorf("bands: at k = (%g, %g) 1/nm: %w", kx, ky, err)
	}
	return s.w, nil
}

// Vectors returns the eigenvalues (ascending, eV) and orthonormal eigenvectors of h at (kx, ky):
// eigenvector j is z[j*n : (j+1)*n] in the basis (A1, B1, ..., AN, BN). Both slices are owned by
// the Solver and overwritten by the next call.
func (s *Solver) Vectors(h Hamiltonian, kx, ky float64) (w []float64, z []complex128, err error) {
	if h.Dim() != s.n {
		return nil, nil, fmt.Errorf("bands: solver of order %d given a Hamiltonian of order %d", s.n, h.Dim())
	}
	h.At(s.h, kx, ky)
	if err := s.ws.Eigen(s.w, s.z, s.h); err != nil {
		return nil, nil, fmt.Errorf("bands: at k = (%g, %g) 1/nm: %w", kx, ky, err)
	}
	return s.w, s.z, nil
}

// Matrix returns the solver's copy of the last matrix it was given, row-major.
func (s *Solver) Matrix() []complex128 { return s.h }

// LayerWeights writes into dst (len N) the weight of eigenvector v (len 2N) on each layer:
// |v_{A_l}|² + |v_{B_l}|². It returns dst, grown if needed.
func LayerWeights(dst []float64, v []complex128) []float64 {
	n := len(v) / 2
	if cap(dst) < n {
		dst = make([]float64, n)
	}
	dst = dst[:n]
	for l := range n {
		a, b := v[2*l], v[2*l+1]
		dst[l] = real(a)*real(a) + imag(a)*imag(a) + real(b)*real(b) + imag(b)*imag(b)
	}
	return dst
}
