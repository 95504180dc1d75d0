package design

import (
	"errors"
	"fmt"
)

// ErrorKind classifies a design error, so that a caller (the command
// line, a batch) can tell the cases apart without reading messages.
// Test one with errors.Is(err, design.ErrAboveNyquist) or read it with
// KindOf.
type ErrorKind int

// Kinds of design errors.
const (
	// ErrInvalid: the spec is malformed (a key missing, contradictory or
	// out of range).
	ErrInvalid ErrorKind = iota + 1
	// ErrUnsupported: a family, response, curve or option that does not
	// exist.
	ErrUnsupported
	// ErrAboveNyquist: a frequency of the spec is at or above the Nyquist
	// frequency of the rate it is designed at; the same spec may work at a
	// higher rate.
	ErrAboveNyquist
	// ErrOrderLimit: the spec needs more order (or more sections) than
	// the package designs.
	ErrOrderLimit
	// ErrUnstable: the design came out unstable or numerically broken.
	ErrUnstable
)

func (k ErrorKind) Error() string {
	switch k {
	case ErrInvalid:
		return "design: invalid spec"
	case ErrUnsupported:
		return "design: unsupported"
	case ErrAboveNyquist:
		return "design: frequency at or above Nyquist"
	case ErrOrderLimit:
		return "design: order limit"
	case ErrUnstable:
		return "design: unstable design"
	}
	return "design: error"
}

// Error is the error type every design error has (possibly wrapped, as in
// "stage 2: ..." of a chain).
type Error struct {
	Kind ErrorKind
	err  error
}

func (e *Error) Error() string { return "design: " + e.err.Error() }

// Unwrap returns the error the message wraps, if any.
func (e *Error) Unwrap() error { return errors.Unwrap(e.err) }

// Is makes errors.Is(err, kind) true for an Error of that kind.
func (e *Error) Is(target error) bool {
	k, ok := target.(ErrorKind)
	return ok && k == e.Kind
}

// KindOf returns the kind of a design error in err's chain, or 0.
func KindOf(err error) ErrorKind {
	var e *Error
	if errors.As(err, &e) {
		return e.Kind
	}
	return 0
}

// errorf builds a design error of a kind; the "design: " prefix is added.
func errorf(kind ErrorKind, format string, a ...any) error {
	return &Error{Kind: kind, err: fmt.Errorf(format, a...)}
}
