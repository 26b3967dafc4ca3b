package lattice

import (
	"errors"
	"fmt"
	"strings"
)

// MaxLayers is the largest number of layers a [Stack] may have.
const MaxLayers = 64

// ErrStacking is the sentinel wrapped by every [*StackError].
var ErrStacking = errors.New("invalid stacking")

// StackError reports a stacking sequence that cannot be used. Pos is the 1-based position of the
// offending letter, or 0 when the problem is not tied to one letter (empty input, bad layer count).
type StackError struct {
	Input  string // the sequence as given (for constructors, a description such as "Bernal N=-1")
	Pos    int    // 1-based letter position, 0 if none
	Reason string
}

func (e *StackError) Error() string {
	if e.Pos > 0 {
		return fmt.Sprintf("lattice: stacking %q: %s at position %d", e.Input, e.Reason, e.Pos)
	}
	return fmt.Sprintf("lattice: stacking %q: %s", e.Input, e.Reason)
}

// Unwrap returns [ErrStacking].
func (e *StackError) Unwrap() error { return ErrStacking }

// Stack is a validated stacking sequence, bottom layer first. The zero value has no layers and is
// not usable; obtain a Stack from [ParseStack], [NewBernal] or [NewRhombohedral]. A Stack is an
// immutable value and safe to share.
type Stack struct {
	seq string
}

// ParseStack parses a sequence of the letters A, B and C (case-insensitive, surrounding spaces
// ignored) such as "AB", "ABA", "ABCA" or "ABCB". Two equal neighbours are an error, as are other
// letters, an empty string and more than [MaxLayers] layers.
func ParseStack(s string) (Stack, error) {
	in := s
	s = strings.ToUpper(strings.TrimSpace(s))
	if s == "" {
		return Stack{}, &StackError{Input: in, Reason: "empty sequence (want letters A, B, C, e.g. \"ABA\")"}
	}
	runes := []rune(s)
	if len(runes) > MaxLayers {
		return Stack{}, &StackError{Input: in, Reason: fmt.Sprintf("%d layers exceed the maximum of %d", len(runes), MaxLayers)}
	}
	for i, r := range runes {
		if r != 'A' && r != 'B' && r != 'C' {
			return Stack{}, &StackError{Input: in, Pos: i + 1, Reason: fmt.Sprintf("letter %q is not A, B or C", r)}
		}
		if i > 0 && runes[i-1] == r {
			return Stack{}, &StackError{Input: in, Pos: i + 1, Reason: fmt.Sprintf("layer %d repeats the letter %c of the layer below (neighbours must differ)", i+1, r)}
		}
	}
	return Stack{seq: s}, nil
}

// NewBernal returns the Bernal (ABAB...) stack of n layers, 1 <= n <= [MaxLayers].
func NewBernal(n int) (Stack, error) {
	return periodic(n, "AB", "Bernal")
}

// NewRhombohedral returns the rhombohedral (ABCABC...) stack of n layers, 1 <= n <= [MaxLayers].
func NewRhombohedral(n int) (Stack, error) {
	return periodic(n, "ABC", "rhombohedral")
}

func periodic(n int, unit, name string) (Stack, error) {
	if n < 1 || n > MaxLayers {
		return Stack{}, &StackError{Input: fmt.Sprintf("%s N=%d", name, n), Reason: fmt.Sprintf("layer count must be between 1 and %d", MaxLayers)}
	}
	b := make([]byte, n)
	for i := range b {
		b[i] = unit[i%len(unit)]
	}
	return Stack{seq: string(b)}, nil
}

// Layers returns the number of layers N.
func (s Stack) Layers() int { return len(s.seq) }

// Orbitals returns 2N, the dimension of one flavour's Hamiltonian.
func (s Stack) Orbitals() int { return 2 * len(s.seq) }

// String returns the letter sequence, bottom layer first.
func (s Stack) String() string { return s.seq }

// Letter returns the letter of layer l (1-based). It returns 0 for l out of range.
func (s Stack) Letter(l int) byte {
	if l < 1 || l > len(s.seq) {
		return 0
	}
	return s.seq[l-1]
}

// IsBernal reports whether the stack alternates two letters (ABAB..., BCBC..., ...). Every stack
// of one or two layers is Bernal.
func (s Stack) IsBernal() bool {
	for i := 2; i < len(s.seq); i++ {
		if s.seq[i] != s.seq[i-2] {
			return false
		}
	}
	return len(s.seq) > 0
}

// IsRhombohedral reports whether every layer steps in the same cyclic direction
// (ABCABC... or ACBACB...). Stacks of one or two layers count as both Bernal and rhombohedral.
func (s Stack) IsRhombohedral() bool {
	if len(s.seq) == 0 {
		return false
	}
	for i := 1; i < len(s.seq); i++ {
		if step(s.seq[i-1], s.seq[i]) != step(s.seq[0], s.seq[min(1, len(s.seq)-1)]) {
			return false
		}
	}
	return true
}

// shift returns the in-plane position of a letter in units of δ (A: 0, B: 1, C: 2).
func shift(c byte) int { return int(c - 'A') }

// step returns +1 if b follows a cyclically (A→B, B→C, C→A) and -1 otherwise.
func step(a, b byte) int {
	if (shift(b)-shift(a)+3)%3 == 1 {
		return 1
	}
	return -1
}
