package scf

import (
	"fmt"
	"math"
)

// DefaultBeta is the mixing parameter used by [Linear] and [Anderson] when
// their Beta field is 0.
const DefaultBeta = 0.3

// Linear is plain (damped) linear mixing,
//
//	x_{k+1} = x_k + β (G(x_k) − x_k),
//
// which converges for a contraction G when 0 < β ≤ 1 and, for β small
// enough, whenever the Jacobian of G has all eigenvalues with real part
// below 1. Its zero value is usable. It keeps no history.
type Linear struct {
	// Beta is the mixing parameter β (dimensionless). 0 means
	// DefaultBeta (0.3). NaN, infinite and negative values are errors.
	Beta float64
}

var _ Mixer = Linear{}

func (l Linear) beta() (float64, error) {
	switch {
	case math.IsNaN(l.Beta) || math.IsInf(l.Beta, 0) || l.Beta < 0:
		return 0, fmt.Errorf("%w: Linear.Beta = %v, want a finite value > 0 (0 means %g)", ErrInvalid, l.Beta, DefaultBeta)
	case l.Beta == 0:
		return DefaultBeta, nil
	}
	return l.Beta, nil
}

// Start returns a linear-mixing run for vectors of length n.
func (l Linear) Start(n int) (Mixing, error) {
	beta, err := l.beta()
	if err != nil {
		return nil, err
	}
	if n < 1 {
		return nil, fmt.Errorf("%w: Linear: vector length %d, want >= 1", ErrInvalid, n)
	}
	return &linearMixing{n: n, beta: beta}, nil
}

// String returns "linear(beta=β)" with the default filled in.
func (l Linear) String() string {
	beta := l.Beta
	if beta == 0 {
		beta = DefaultBeta
	}
	return fmt.Sprintf("linear(beta=%g)", beta)
}

type linearMixing struct {
	n    int
	beta float64
}

func (m *linearMixing) Next(dst, x, gx []float64) (int, error) {
	if err := checkLengths("linear mixing", m.n, dst, x, gx); err != nil {
		return 0, err
	}
	linearStep(dst, x, gx, m.beta)
	return 0, nil
}

var _ Mixing = (*linearMixing)(nil)
