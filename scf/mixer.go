package scf

import "fmt"

// Mixer is a mixing scheme: an immutable configuration from which each
// [Solve] call starts a fresh [Mixing] run with its own history. Because
// Start must not modify the receiver, one Mixer value may be shared by any
// number of Solve calls, concurrent or not. [Linear] and [Anderson] are the
// implementations in this package.
type Mixer interface {
	// Start returns a new Mixing with empty history for vectors of length
	// n. It returns an error wrapping ErrInvalid when the configuration or
	// n is invalid.
	Start(n int) (Mixing, error)
}

// Mixing is one run of a mixing scheme. It holds the history of one Solve
// call and is not safe for concurrent use.
type Mixing interface {
	// Next writes the next iterate x_{k+1} into dst, given the current
	// iterate x = x_k and its image gx = G(x_k). All three slices have the
	// length given to Start; dst may alias x or gx, and x and gx are not
	// modified. Next returns the number of earlier iterates the step used
	// (0 for a plain linear-mixing step) and an error, for example on a
	// length mismatch or a non-finite residual; after an error the Mixing
	// state is unchanged.
	Next(dst, x, gx []float64) (history int, err error)
}

// linearStep sets dst = x + beta (gx - x) elementwise. [Linear] and
// [Anderson] without history share it, so that the two give bitwise equal
// iterates. dst may alias x or gx.
func linearStep(dst, x, gx []float64, beta float64) {
	for i := range dst {
		dst[i] = x[i] + beta*(gx[i]-x[i])
	}
}

func checkLengths(name string, n int, dst, x, gx []float64) error {
	if len(dst) != n || len(x) != n || len(gx) != n {
		return fmt.Errorf("scf: %s step: lengths dst %d, x %d, gx %d, want %d", name, len(dst), len(x), len(gx), n)
	}
	return nil
}

// mixerName is the name Solve puts into [Iteration.Mixer].
func mixerName(m Mixer) string {
	if s, ok := m.(fmt.Stringer); ok {
		return s.String()
	}
	return fmt.Sprintf("%T", m)
}
