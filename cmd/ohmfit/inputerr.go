package main

import (
	"errors"

	"github.com/ohmfit/ohmfit/constraints"
)

// templateError turns an error about template t into a bad-input error. An
// error that already says where in t it is (a *constraints.Error) is kept
// whole; anything else gets t's file name in front.
func templateError(t *constraints.Template, err error) error {
	var ce *constraints.Error
	if errors.As(err, &ce) {
		return &exitError{code: ExitBadInput, err: err}
	}
	return badInputf("%s%s", filePrefix(t, constraints.Pos{}), constraints.Message(err))
}
