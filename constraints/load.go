package constraints

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"syscall"
)

// MaxFileSize is the largest template or stock file read, in bytes. Real
// templates are a few kilobytes; the bound keeps a wrong path (a log, an
// image) from being slurped whole.
const MaxFileSize = 4 << 20

// maxDepth bounds nesting. The deepest legal path (choose, overrides, part,
// series list) is five levels; anything far deeper is not a template.
const maxDepth = 32

// Defaults for choose, as the contract states them.
const (
	defaultSeries = "E24"
	defaultMin    = 10.0
	defaultMax    = 10e6
)

// Load reads and parses the template at path. File is set to path as given
// and Dir to its directory, against which stock files are resolved.
func Load(path string) (*Template, error) {
	data, rerr := readFile(path)
	if rerr != nil {
		return nil, rerr
	}
	return Parse(path, data)
}

// StdinName stands for standard input in messages ("<stdin>:3:5: ...");
// the FILE argument "-" reads the template from there.
const StdinName = "<stdin>"

// LoadReader reads a template from r (standard input, say) with the same
// size limit as a file, and parses it; name stands for the file in messages,
// and stock files are resolved against the current directory.
func LoadReader(name string, r io.Reader) (*Template, error) {
	data, rerr := readAllLimited(name, r, MaxFileSize, "a template")
	if rerr != nil {
		return nil, rerr
	}
	return parseIn(name, ".", data)
}

// Parse parses template text. file is used in messages and, through its
// directory, to resolve stock files ("" means the current directory). The
// error, if any, is an *Error for the first problem in file order.
func Parse(file string, data []byte) (*Template, error) {
	dir := filepath.Dir(file)
	if file == "" {
		dir = "."
	}
	return parseIn(file, dir, data)
}

// parseIn parses template text named file, with stock files resolved
// against dir, and returns the first problem in file order.
func parseIn(file, dir string, data []byte) (*Template, error) {
	d := &decoder{file: file, dir: dir}
	t := d.parse(data)
	if len(d.errs) > 0 {
		return nil, d.first()
	}
	return t, nil
}

// readFile reads a regular file of at most MaxFileSize bytes. The size is
// checked before reading so a huge or endless file costs nothing. The file's
// type is checked before it is opened, and it is opened without blocking:
// opening a FIFO (or a device) could otherwise wait forever for a writer.
func readFile(path string) ([]byte, *Error) {
	return readLimited(path, MaxFileSize, "a template")
}

// ReadFile reads an input file the way templates are read: a regular file
// only (a FIFO or device is refused without blocking), of at most limit
// bytes; what names the kind of file for the message ("a shard result").
// Its errors name the file and say what is wrong in plain words.
func ReadFile(path string, limit int64, what string) ([]byte, error) {
	data, err := readLimited(path, limit, what)
	if err != nil {
		return nil, err
	}
	return data, nil
}

func readLimited(path string, limit int64, what string) ([]byte, *Error) {
	fail := func(msg string, err error) ([]byte, *Error) {
		return nil, &Error{File: path, Msg: msg, Err: err}
	}
	notRegular := func(fi fs.FileInfo) ([]byte, *Error) {
		return fail(fmt.Sprintf("not a regular file (%s); ohmfit reads plain text files", fileKind(fi.Mode())), nil)
	}
	if fi, err := os.Stat(path); err == nil && !fi.Mode().IsRegular() {
		return notRegular(fi)
	}
	f, err := os.OpenFile(path, os.O_RDONLY|syscall.O_NONBLOCK, 0)
	if err != nil {
		return fail("cannot open: "+pathCause(err), err)
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return fail("cannot read: "+pathCause(err), err)
	}
	if !fi.Mode().IsRegular() {
		return notRegular(fi) // replaced between the two looks
	}
	if fi.Size() > limit {
		return fail(tooBigMessage(limit, what), nil)
	}
	// The limit also covers a file that grows between Stat and read.
	return readAllLimited(path, f, limit, what)
}

// readAllLimited reads r to its end, refusing more than limit bytes; the
// one reader behind every input file and standard input.
func readAllLimited(name string, r io.Reader, limit int64, what string) ([]byte, *Error) {
	data, err := io.ReadAll(io.LimitReader(r, limit+1))
	if err != nil {
		return nil, &Error{File: name, Msg: "cannot read: " + pathCause(err), Err: err}
	}
	if int64(len(data)) > limit {
		return nil, &Error{File: name, Msg: tooBigMessage(limit, what)}
	}
	return data, nil
}

// tooBigMessage says an input is over its size limit.
func tooBigMessage(limit int64, what string) string {
	return fmt.Sprintf("file is larger than %d MiB; this is not %s", limit>>20, what)
}

// fileKind names a file type for a message.
func fileKind(m fs.FileMode) string {
	switch {
	case m.IsDir():
		return "a directory"
	case m&fs.ModeNamedPipe != 0:
		return "a named pipe"
	case m&fs.ModeSocket != 0:
		return "a socket"
	case m&fs.ModeDevice != 0:
		return "a device"
	}
	return "a special file"
}

// pathCause drops the path an fs error repeats, since Error names the file.
func pathCause(err error) string {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err.Error()
	}
	return err.Error()
}
