package units

import "fmt"

// Error is an error of this package written for a person: Msg is the text
// without the package's name (Error adds it, as Go errors carry it), and
// Err, when set, is the sentinel or cause it wraps, for errors.Is.
// Commands show Message, so that no message is ever edited as a string.
type Error struct {
	Msg string
	Err error
}

// Error returns "units: " and the message.
func (e *Error) Error() string { return "units: " + e.Msg }

// Message returns the text for a person, without the package's name.
func (e *Error) Message() string { return e.Msg }

// Unwrap returns the wrapped sentinel or cause.
func (e *Error) Unwrap() error { return e.Err }

// errorf returns an *Error with a formatted message wrapping cause (nil
// for none).
func errorf(cause error, format string, args ...any) error {
	return &Error{Msg: fmt.Sprintf(format, args...), Err: cause}
}
