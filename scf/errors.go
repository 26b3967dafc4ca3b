package scf

import "errors"

// Sentinel errors. The error returned by [Solve] wraps exactly one of them
// whenever the returned Status is not [Converged]; test with [errors.Is].
// [Status.Err] maps each Status to its sentinel.
var (
	// ErrNotConverged means the iteration limit was reached before the
	// stopping test passed (Status [IterationLimit]).
	ErrNotConverged = errors.New("scf: not converged")

	// ErrDiverged means an iterate, G(x) or the residual became NaN or
	// infinite, or the residual grew beyond [Settings.DivergeFactor] times its
	// smallest value (Status [Diverged]).
	ErrDiverged = errors.New("scf: diverged")

	// ErrCanceled means the context was canceled or its deadline passed
	// (Status [Canceled]). The error from Solve also wraps ctx.Err(), so
	// errors.Is(err, context.Canceled) or context.DeadlineExceeded holds too.
	ErrCanceled = errors.New("scf: canceled")

	// ErrAborted means the Recorder returned an error (Status [Aborted]).
	// The error from Solve also wraps the Recorder's error.
	ErrAborted = errors.New("scf: aborted")

	// ErrFailed means Problem.Update, Problem.Residual or a mixing step
	// returned an error or an impossible value (Status [Failed]). The error
	// from Solve also wraps the underlying error where there is one.
	ErrFailed = errors.New("scf: failed")

	// ErrInvalid means Solve rejected its arguments (Problem, starting point,
	// Settings or Mixer) before evaluating G (Status [Invalid]). Mixers
	// return it from Start for bad parameters.
	ErrInvalid = errors.New("scf: invalid input")
)
