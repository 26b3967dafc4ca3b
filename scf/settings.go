package scf

import (
	"fmt"
	"math"
)

// Default values used when the corresponding [Settings] field is zero.
const (
	DefaultTol           = 1e-8
	DefaultMaxIter       = 200
	DefaultDivergeFactor = 1e8
)

// Settings controls [Solve]. It is passed by value and its zero value is
// ready to use: every field states its default and what 0 means. Solve fills
// the defaults into its own copy and never writes them back, so one Settings
// value may be shared by concurrent Solve calls as long as its Mixer,
// Converger and Recorder are safe for that (the Mixers of this package are).
//
// Invalid values (NaN, negative, MinIter > MaxIter) make Solve return an
// error wrapping [ErrInvalid]; they never panic.
type Settings struct {
	// Tol is the convergence threshold on the residual, in the units of
	// Problem.Residual (by default max_i |G(x)_i - x_i|, in the units of x).
	// Solve converges when residual <= Tol. 0 means DefaultTol (1e-8).
	// Negative, NaN and infinite values are errors.
	Tol float64

	// MaxIter is the largest number of evaluations of G. 0 means
	// DefaultMaxIter (200). Negative is an error.
	MaxIter int

	// MinIter is the smallest number of evaluations of G before Solve may
	// report convergence. 0 means no minimum: a starting point that already
	// satisfies the test converges after one evaluation. Negative values
	// and values above MaxIter (after defaults) are errors.
	MinIter int

	// DivergeFactor stops Solve with [Diverged] when the residual exceeds
	// both Tol and DivergeFactor times the smallest residual seen in earlier
	// iterations. 0 means DefaultDivergeFactor (1e8). +Inf switches the
	// test off. NaN and values below 1 (other than 0) are errors.
	DivergeFactor float64

	// Mixer makes the next iterate from x and G(x). nil means
	// [Anderson]{} with the defaults documented on Anderson.
	Mixer Mixer

	// Converger, if non-nil, is an extra stopping test: Solve converges only
	// when the residual test passes and Converger.Converged returns true.
	// It is not called before the residual test passes.
	Converger Converger

	// Recorder, if non-nil, receives one [Iteration] per evaluation of G.
	// nil means silent. An error from Record stops Solve with [Aborted].
	Recorder Recorder
}

// Converger is an optional stopping test in addition to [Settings.Tol], for
// example a change in total energy or in a band gap. Solve calls Converged
// from its own goroutine, in iteration order, only for iterations whose
// residual already passed the Tol test. The slices in it are valid only
// during the call.
type Converger interface {
	Converged(it Iteration) bool
}

// ConvergerFunc adapts a function to the [Converger] interface.
type ConvergerFunc func(it Iteration) bool

// Converged calls f(it).
func (f ConvergerFunc) Converged(it Iteration) bool { return f(it) }

// withDefaults returns a copy of s with every zero field replaced by its
// default, or an error wrapping ErrInvalid naming the first bad field.
func (s Settings) withDefaults() (Settings, error) {
	switch {
	case math.IsNaN(s.Tol) || math.IsInf(s.Tol, 0) || s.Tol < 0:
		return s, fmt.Errorf("%w: Settings.Tol = %v, want a finite value >= 0 (0 means %g)", ErrInvalid, s.Tol, DefaultTol)
	case s.MaxIter < 0:
		return s, fmt.Errorf("%w: Settings.MaxIter = %d, want >= 0 (0 means %d)", ErrInvalid, s.MaxIter, DefaultMaxIter)
	case s.MinIter < 0:
		return s, fmt.Errorf("%w: Settings.MinIter = %d, want >= 0", ErrInvalid, s.MinIter)
	case math.IsNaN(s.DivergeFactor) || (s.DivergeFactor != 0 && s.DivergeFactor < 1):
		return s, fmt.Errorf("%w: Settings.DivergeFactor = %v, want >= 1 or +Inf (0 means %g)", ErrInvalid, s.DivergeFactor, DefaultDivergeFactor)
	}
	if s.Tol == 0 {
		s.Tol = DefaultTol
	}
	if s.MaxIter == 0 {
		s.MaxIter = DefaultMaxIter
	}
	if s.MinIter > s.MaxIter {
		return s, fmt.Errorf("%w: Settings.MinIter = %d exceeds MaxIter = %d", ErrInvalid, s.MinIter, s.MaxIter)
	}
	if s.DivergeFactor == 0 {
		s.DivergeFactor = DefaultDivergeFactor
	}
	if s.Mixer == nil {
		s.Mixer = Anderson{}
	}
	return s, nil
}
