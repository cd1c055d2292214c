package main

import (
	"bufio"
	"fmt"
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
	if path == "" {
		return badInputf("no output file named")
	}
	abs, err := filepath.Abs(path)
	if err != nil {
		return badInputf("%s: %v", path, err)
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
	dir := filepath.Dir(abs)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(abs)+".*.tmp")
	if err != nil {
		return badInputf("cannot write %s: %v", path, trimPathErr(err))
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
		return badInputf("cannot write %s: %v", path, err)
	}
	if err := bw.Flush(); err != nil {
		return badInputf("cannot write %s: %v", path, trimPathErr(err))
	}
	if err := tmp.Chmod(0o644); err != nil {
		return badInputf("cannot write %s: %v", path, trimPathErr(err))
	}
	if err := tmp.Close(); err != nil {
		return badInputf("cannot write %s: %v", path, trimPathErr(err))
	}
	if err := os.Rename(tmp.Name(), abs); err != nil {
		return badInputf("cannot write %s: %v", path, trimPathErr(err))
	}
	ok = true
	return nil
}

// trimPathErr drops the temporary file's name from an fs error.
func trimPathErr(err error) string {
	if pe, ok := err.(*os.PathError); ok {
		return pe.Err.Error()
	}
	return fmt.Sprint(err)
}
