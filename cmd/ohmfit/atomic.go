package main

import (
	"bufio"
	"bytes"
	"errors"
	"io"
	"os"
	"path/filepath"
)

// writeAtomic writes a file through a temporary file in the same directory
// and a rename, so a reader never sees half a file and a failed write leaves
// any old file as it was. It refuses to write over any of inputs (the
// template, stock files): an output path that names an input, by path or as
// the same file on disk, is an error.
func writeAtomic(path string, inputs []string, write func(io.Writer) error) error {
	if err := outputAllowed(path, inputs); err != nil {
		return err
	}
	abs, err := filepath.Abs(path)
	if err != nil {
		return badInputf("%s: %w", path, err)
	}
	mode := os.FileMode(0o644)
	if fi, err := os.Stat(path); err == nil {
		mode = fi.Mode().Perm() // replacing a file keeps its permissions
	}
	dir := filepath.Dir(abs)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(abs)+".*.tmp")
	if err != nil {
		return badInputf("cannot write %s: %w", path, trimPathErr(err))
	}
	ok := false
	defer func() {
		if !ok {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	bw := bufio.NewWriter(tmp)
	if err := write(bw); err != nil {
		return badInputf("cannot write %s: %w", path, err)
	}
	if err := bw.Flush(); err != nil {
		return badInputf("cannot write %s: %w", path, trimPathErr(err))
	}
	if err := tmp.Chmod(mode); err != nil {
		return badInputf("cannot write %s: %w", path, trimPathErr(err))
	}
	if err := tmp.Close(); err != nil {
		return badInputf("cannot write %s: %w", path, trimPathErr(err))
	}
	if err := os.Rename(tmp.Name(), abs); err != nil {
		return badInputf("cannot write %s: %w", path, trimPathErr(err))
	}
	ok = true
	return nil
}

// trimPathErr drops the temporary file's name from an fs error, keeping
// the cause for errors.Is.
func trimPathErr(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// outputAllowed refuses an output path that names one of inputs (the
// template, stock files), by path or as the same file on disk, or that
// exists and is not a regular file. Commands call it before they start, so
// that a long run is not wasted on an output it may not write.
func outputAllowed(path string, inputs []string) error {
	if path == "" {
		return badInputf("no output file named")
	}
	abs, err := filepath.Abs(path)
	if err != nil {
		return badInputf("%s: %w", path, err)
	}
	out, statErr := os.Stat(path)
	for _, in := range inputs {
		if in == "" {
			continue
		}
		inAbs, err := filepath.Abs(in)
		same := err == nil && inAbs == abs
		if fi, err := os.Stat(in); err == nil && statErr == nil && os.SameFile(fi, out) {
			same = true
		}
		if same {
			return badInputf("%s is an input of this run; refusing to write over it", path)
		}
	}
	if statErr == nil && !out.Mode().IsRegular() {
		return badInputf("%s exists and is not a regular file", path)
	}
	if fi, err := os.Stat(filepath.Dir(abs)); err != nil || !fi.IsDir() {
		return badInputf("cannot write %s: its directory does not exist", path)
	}
	return nil
}

// redirect runs a command with its standard output captured when path is
// set, then writes what it printed to path atomically. Nothing is written
// when the command fails with bad input; a run that found no solution still
// writes its (empty) result, as stdout would have shown it.
func redirect(path string, inputs []string, out *io.Writer, run func() error) error {
	if path == "" {
		return run()
	}
	if err := outputAllowed(path, inputs); err != nil {
		return err
	}
	var buf bytes.Buffer
	saved := *out
	*out = &buf
	err := run()
	*out = saved
	var ee *exitError
	if err != nil && !(errors.As(err, &ee) && ee.code == ExitNoSolution) {
		return err
	}
	if werr := writeAtomic(path, inputs, func(w io.Writer) error { _, e := w.Write(buf.Bytes()); return e }); werr != nil {
		return werr
	}
	return err
}

// outputsAllowed applies outputAllowed to each named output path ("" for
// none), before a run starts.
func outputsAllowed(inputs []string, paths ...string) error {
	for _, p := range paths {
		if p == "" {
			continue
		}
		if err := outputAllowed(p, inputs); err != nil {
			return err
		}
	}
	return nil
}
