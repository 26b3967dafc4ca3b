package scf

import "fmt"

// Status says why [Solve] stopped. The zero value is not a valid Status; it
// prints as "Status(0)".
type Status int

const (
	// Converged means the residual fell to [Settings.Tol] or below, at least
	// [Settings.MinIter] iterations were done and the [Settings.Converger],
	// if any, agreed.
	Converged Status = iota + 1

	// IterationLimit means [Settings.MaxIter] evaluations of G were done
	// without convergence.
	IterationLimit

	// Diverged means G(x), the residual or the next iterate was NaN or
	// infinite, or the residual exceeded [Settings.DivergeFactor] times the
	// smallest residual seen so far.
	Diverged

	// Canceled means the context was done before or during an iteration.
	Canceled

	// Aborted means the [Recorder] returned an error.
	Aborted

	// Failed means Problem.Update or Problem.Residual returned an error or
	// an impossible value, or the mixing step failed.
	Failed

	// Invalid means the arguments were rejected before G was evaluated.
	Invalid
)

var statusNames = [...]string{
	Converged:      "Converged",
	IterationLimit: "IterationLimit",
	Diverged:       "Diverged",
	Canceled:       "Canceled",
	Aborted:        "Aborted",
	Failed:         "Failed",
	Invalid:        "Invalid",
}

var statusErrs = [...]error{
	Converged:      nil,
	IterationLimit: ErrNotConverged,
	Diverged:       ErrDiverged,
	Canceled:       ErrCanceled,
	Aborted:        ErrAborted,
	Failed:         ErrFailed,
	Invalid:        ErrInvalid,
}

// String returns the name of the status, or "Status(n)" for a value that is
// not one of the constants. It never panics.
func (s Status) String() string {
	if s >= Converged && int(s) < len(statusNames) {
		return statusNames[s]
	}
	return fmt.Sprintf("Status(%d)", int(s))
}

// Err returns nil for [Converged] and the sentinel error of every other
// status ([ErrNotConverged], [ErrDiverged], [ErrCanceled], [ErrAborted],
// [ErrFailed], [ErrInvalid]). For a value that is not one of the constants
// it returns a non-nil error naming the value.
func (s Status) Err() error {
	if s >= Converged && int(s) < len(statusErrs) {
		return statusErrs[s]
	}
	return fmt.Errorf("scf: unknown %v", s)
}
