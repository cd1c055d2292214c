// Command ohmfit chooses standard resistor values for a network of fixed
// shape so that its voltages, currents and power meet stated goals, and
// analyses networks whose values are already chosen.
//
// Run `ohmfit help` for the list of commands.
package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
)

// ExitCode is the process exit status; the contract fixes its three values.
type ExitCode int

// Exit codes, as fixed by the user-facing contract.
const (
	ExitOK         ExitCode = 0 // success
	ExitNoSolution ExitCode = 1 // ran fine, but nothing meets the hard limits
	ExitBadInput   ExitCode = 2 // bad usage or bad input
)

func main() { os.Exit(int(run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr))) }

// run executes one command line and reports how it went. It prints every
// error itself, as one line on stderr, so nothing else needs to.
func run(args []string, stdin io.Reader, stdout, stderr io.Writer) ExitCode {
	out := &stdoutWriter{w: stdout}
	root := newRootCmd(stdin, out, stderr)
	root.SetArgs(args)
	err := root.Execute()
	if out.err != nil {
		// The result did not reach its reader (a full disk, a closed
		// file): whatever else happened, the run failed.
		err = badInputf("cannot write to standard output: %s", trimPathErr(out.err))
	}
	if err == nil {
		return ExitOK
	}
	code := exitCodeOf(err)
	label := errorLabel
	if code == ExitNoSolution {
		label = notMetLabel
	}
	stderrLine(stderr, label, message(err))
	return code
}

// stdoutWriter passes writes to standard output and keeps the first error.
// It reports success to its callers, so that no library prints its own
// version of the failure; run reports it once, with exit status 2.
type stdoutWriter struct {
	w   io.Writer
	err error
}

func (s *stdoutWriter) Write(p []byte) (int, error) {
	if s.err == nil {
		if _, err := s.w.Write(p); err != nil {
			s.err = err
		}
	}
	return len(p), nil
}

// exitError attaches an exit code to an error a command returns.
type exitError struct {
	code ExitCode
	err  error
}

func (e *exitError) Error() string { return e.err.Error() }
func (e *exitError) Unwrap() error { return e.err }

// usageError is a mistake on the command line itself. It is printed with a
// pointer to the command's help, because the fix is usually found there.
type usageError struct {
	cmd string // the command's path, e.g. "ohmfit values"
	err error
}

func (e *usageError) Error() string { return e.err.Error() }
func (e *usageError) Unwrap() error { return e.err }

// usagef returns a usageError for the command path cmd.
func usagef(cmd, format string, args ...any) error {
	return &usageError{cmd: cmd, err: fmt.Errorf(format, args...)}
}

// badInputf returns an error that exits with ExitBadInput.
func badInputf(format string, args ...any) error {
	return &exitError{code: ExitBadInput, err: fmt.Errorf(format, args...)}
}

// exitCodeOf maps an error to its exit status. The library error types are
// listed so that the mapping is visible in one place; everything a command
// can fail on is a property of its input, so the fallback is ExitBadInput
// too (the contract has no code for anything else).
func exitCodeOf(err error) ExitCode {
	var (
		ee *exitError
		ue *usageError
		ce *constraints.Error
		pe *units.ParseError
	)
	switch {
	case errors.As(err, &ee):
		return ee.code
	case errors.As(err, &ue), errors.As(err, &ce), errors.As(err, &pe),
		errors.Is(err, eseries.ErrUnknownSeries), isSolverError(err):
		return ExitBadInput
	}
	return ExitBadInput
}

// isSolverError reports whether err is one of the solver's graph or value
// errors: a network that cannot be analysed as written.
func isSolverError(err error) bool {
	var (
		ve *solver.ValueError
		oe *solver.OverflowError
		de *solver.DuplicatePartError
		pe *solver.PartError
		se *solver.ShortedError
	)
	return errors.Is(err, solver.ErrSingular) || errors.Is(err, solver.ErrEmpty) ||
		errors.As(err, &ve) || errors.As(err, &oe) || errors.As(err, &de) || errors.As(err, &pe) || errors.As(err, &se)
}

// message is the text printed after the line's label. Usage errors end with a
// pointer to the help of the command that was being run.
func message(err error) string {
	var ue *usageError
	if errors.As(err, &ue) {
		return err.Error() + "; see `" + helpHint(ue.cmd) + "`"
	}
	return err.Error()
}

// helpHint is the help command for a command path: "ohmfit help values".
func helpHint(path string) string {
	if rest, ok := strings.CutPrefix(path, "ohmfit "); ok {
		return "ohmfit help " + rest
	}
	return "ohmfit help"
}

// oneLine folds a message onto one line, since the contract promises a
// single line on stderr whatever a library error contains.
func oneLine(s string) string {
	s = strings.TrimSpace(s)
	if !strings.ContainsAny(s, "\r\n") {
		return s
	}
	return strings.Join(strings.Fields(strings.ReplaceAll(s, "\r", " ")), " ")
}
