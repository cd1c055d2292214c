package board

import "fmt"

// Error is an error of this package written for a person: Msg is the text
// without the package's name (Error adds it), and Err, when set, is the
// sentinel or cause it wraps, for errors.Is.
type Error struct {
	Msg string
	Err error
}

// Error returns "board: " and the message.
func (e *Error) Error() string { return "board: " + e.Msg }

// Message returns the text for a person, without the package's name.
func (e *Error) Message() string { return e.Msg }

// Unwrap returns the wrapped sentinel or cause.
func (e *Error) Unwrap() error { return e.Err }

// errorf returns an *Error with a formatted message wrapping cause (nil
// for none).
func errorf(cause error, format string, args ...any) error {
	return &Error{Msg: fmt.Sprintf(format, args...), Err: cause}
}
