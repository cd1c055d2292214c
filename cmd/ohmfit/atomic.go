package main

import (
	"bufio"
	"bytes"
	"errors"
	"io"
	"io/fs"
	"os"
	"os/signal"
	"path/filepath"
	"sync"
	"syscall"
	"time"
)

// outputs is everything one run writes: its standard output and its
// files (-o, --bom, --plot). They are written all or none. Each file is
// first written whole to a temporary file beside its target (stage), and
// standard output goes to a buffer; only when the command has succeeded
// are the files renamed into place, together, and then the buffer printed
// (finish). A run that fails on bad input, or is stopped by a signal while
// writing, leaves no file and prints nothing on standard output.
//
// A path that is a symbolic link is written through: its target is
// replaced, atomically, and the link is kept. No output may name an input
// of the run, another output, or an existing file that is not a regular
// file.
type outputs struct {
	inputs []string
	out    *io.Writer // the command's stdout, pointed at buf while it runs
	saved  io.Writer  // the real standard output
	toFile string     // -o FILE; "" for standard output
	buf    bytes.Buffer
	staged []stagedFile
}

// stagedFile is an output written to a temporary file, not yet in place.
type stagedFile struct {
	path   string // as the user named it, for messages
	target string // the file the rename replaces (the link's target for a symlink)
	tmp    string
}

// newOutputs checks the run's output paths ("" for none) before anything
// runs, so that a long run is not wasted on an output it may not write, and
// redirects *out to a buffer. toFile is -o's path.
func newOutputs(inputs []string, out *io.Writer, toFile string, files ...string) (*outputs, error) {
	paths := append([]string{toFile}, files...)
	var named []string
	for _, p := range paths {
		if p == "" {
			continue
		}
		if err := outputAllowed(p, inputs); err != nil {
			return nil, err
		}
		named = append(named, p)
	}
	if err := outputsDistinct(named); err != nil {
		return nil, err
	}
	o := &outputs{inputs: inputs, out: out, saved: *out, toFile: toFile}
	*out = &o.buf
	return o, nil
}

// stage writes one output file to a temporary file beside its target. The
// file appears under its name only at finish.
func (o *outputs) stage(path string, write func(io.Writer) error) error {
	s, err := stageFile(path, o.inputs, write)
	if err != nil {
		return err
	}
	o.staged = append(o.staged, s)
	return nil
}

// finish ends the run that returned err: on success (or on exit 1, whose
// result is still a result) it stages -o's file, renames every staged file
// into place and prints the buffered standard output; on any other error
// it removes the staged files and prints nothing.
func (o *outputs) finish(err error) error {
	*o.out = o.saved
	var ee *exitError
	if err != nil && !(errors.As(err, &ee) && ee.code == ExitNoSolution) {
		discard(o.staged)
		return err
	}
	if o.toFile != "" {
		if serr := o.stage(o.toFile, func(w io.Writer) error { _, e := w.Write(o.buf.Bytes()); return e }); serr != nil {
			discard(o.staged)
			return serr
		}
	}
	if cerr := commit(o.staged); cerr != nil {
		return cerr
	}
	if o.toFile == "" {
		// A failed write here is seen and reported by run's stdoutWriter.
		_, _ = o.saved.Write(o.buf.Bytes())
	}
	return err
}

// writeAtomic writes one file as outputs does: through a temporary file
// and a rename, never over an input, through a symbolic link to its
// target. A failed write leaves any old file as it was.
func writeAtomic(path string, inputs []string, write func(io.Writer) error) error {
	if err := outputAllowed(path, inputs); err != nil {
		return err
	}
	s, err := stageFile(path, inputs, write)
	if err != nil {
		return err
	}
	return commit([]stagedFile{s})
}

// stageFile writes path's future contents to a temporary file in its
// target's directory, with the target's permissions when it exists.
func stageFile(path string, inputs []string, write func(io.Writer) error) (stagedFile, error) {
	target, err := writeTarget(path)
	if err != nil {
		return stagedFile{}, err
	}
	mode := os.FileMode(0o644)
	if fi, err := os.Stat(target); err == nil {
		mode = fi.Mode().Perm() // replacing a file keeps its permissions
	}
	tmp, err := createTemp(filepath.Dir(target), "."+filepath.Base(target)+".*.tmp")
	if err != nil {
		return stagedFile{}, badInputf("cannot write %s: %w", path, trimPathErr(err))
	}
	s := stagedFile{path: path, target: target, tmp: tmp.Name()}
	if stageHook != nil {
		stageHook(s.tmp)
	}
	ok := false
	defer func() {
		if !ok {
			tmp.Close()
			discard([]stagedFile{s})
		}
	}()
	bw := bufio.NewWriter(tmp)
	if err := write(bw); err != nil {
		return s, badInputf("cannot write %s: %w", path, err)
	}
	if err := bw.Flush(); err != nil {
		return s, badInputf("cannot write %s: %w", path, trimPathErr(err))
	}
	if err := tmp.Chmod(mode); err != nil {
		return s, badInputf("cannot write %s: %w", path, trimPathErr(err))
	}
	if err := tmp.Close(); err != nil {
		return s, badInputf("cannot write %s: %w", path, trimPathErr(err))
	}
	ok = true
	return s, nil
}

// stageHook, when set, runs as each temporary file is created. Only tests
// set it, to hold a write open while they send the process a signal.
var stageHook func(tmp string)

// writeTarget is the file a write to path replaces: path itself, or for a
// symbolic link the file at the end of its chain of links (which need not
// exist yet), as an absolute path.
func writeTarget(path string) (string, error) {
	abs, err := filepath.Abs(path)
	if err != nil {
		return "", badInputf("%s: %w", path, err)
	}
	for range 40 { // the usual limit on a chain of links
		fi, err := os.Lstat(abs)
		if err != nil || fi.Mode()&fs.ModeSymlink == 0 {
			return abs, nil
		}
		dest, err := os.Readlink(abs)
		if err != nil {
			return "", badInputf("cannot write %s: %w", path, trimPathErr(err))
		}
		if !filepath.IsAbs(dest) {
			dest = filepath.Join(filepath.Dir(abs), dest)
		}
		abs = dest
	}
	return "", badInputf("cannot write %s: too many symbolic links", path)
}

// commit renames the staged files into place. It holds the temporary-file
// lock throughout, so that a signal arriving meanwhile waits until every
// file is in place: the set lands whole.
func commit(files []stagedFile) error {
	temps.Lock()
	defer temps.Unlock()
	for i, s := range files {
		if err := os.Rename(s.tmp, s.target); err != nil {
			for _, rest := range files[i:] {
				os.Remove(rest.tmp)
				temps.drop(rest.tmp)
			}
			return badInputf("cannot write %s: %w", s.path, trimPathErr(err))
		}
		temps.drop(s.tmp)
	}
	return nil
}

// discard removes staged files that will not be committed.
func discard(files []stagedFile) {
	temps.Lock()
	defer temps.Unlock()
	for _, s := range files {
		os.Remove(s.tmp)
		temps.drop(s.tmp)
	}
}

// temps are the temporary files that exist now. While there are any, an
// interrupt (Ctrl-C) or SIGTERM removes them before the process ends, so
// that a run stopped while drawing a large plot leaves nothing behind.
var temps = tempFiles{names: map[string]bool{}}

type tempFiles struct {
	sync.Mutex
	names map[string]bool
	sig   chan os.Signal
}

// createTemp creates a temporary file and registers it for removal on a
// signal.
func createTemp(dir, pattern string) (*os.File, error) {
	temps.Lock()
	defer temps.Unlock()
	// Catch the signals before the file exists: a signal in between
	// would otherwise end the process with the file left behind.
	if len(temps.names) == 0 && temps.sig == nil {
		temps.sig = make(chan os.Signal, 1)
		signal.Notify(temps.sig, os.Interrupt, syscall.SIGTERM)
		go removeOnSignal(temps.sig)
	}
	f, err := os.CreateTemp(dir, pattern)
	if err != nil {
		if len(temps.names) == 0 {
			temps.release()
		}
		return nil, err
	}
	temps.names[f.Name()] = true
	return f, nil
}

// drop forgets a temporary file that was renamed or removed; the caller
// holds the lock. With none left, signals get their usual meaning back.
func (t *tempFiles) drop(name string) {
	if !t.names[name] {
		return
	}
	delete(t.names, name)
	if len(t.names) == 0 {
		t.release()
	}
}

// release gives signals their usual meaning back; the caller holds the
// lock.
func (t *tempFiles) release() {
	signal.Stop(t.sig)
	close(t.sig)
	t.sig = nil
}

// removeOnSignal waits for a signal on ch; when one comes it removes every
// temporary file and ends the process as that signal would have.
func removeOnSignal(ch chan os.Signal) {
	sig, ok := <-ch
	if !ok {
		return
	}
	endBySignal(sig)
}

// endBySignal removes every temporary file and ends the process as sig
// would have by default. The one way ohmfit ends on a signal.
func endBySignal(sig os.Signal) {
	temps.Lock() // held to the end: no rename may follow
	for name := range temps.names {
		os.Remove(name)
	}
	signal.Reset(sig)
	if p, err := os.FindProcess(os.Getpid()); err == nil && p.Signal(sig) == nil {
		time.Sleep(time.Second) // the signal ends the process meanwhile
	}
	os.Exit(int(ExitBadInput))
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
// exists and is not a regular file.
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
	target, err := writeTarget(path)
	if err != nil {
		return err
	}
	if fi, err := os.Stat(filepath.Dir(target)); err != nil || !fi.IsDir() {
		return badInputf("cannot write %s: its directory does not exist", path)
	}
	return nil
}

// outputsDistinct refuses two outputs that would land on one file: the
// same path however spelt, one a symbolic link to the other, or two names
// (hard links) of one file. One of them would silently be lost.
func outputsDistinct(paths []string) error {
	type key struct {
		path string
		fi   fs.FileInfo
	}
	keys := make([]key, len(paths))
	for i, p := range paths {
		t, err := writeTarget(p)
		if err != nil {
			return err
		}
		// Resolve links in the directory too, so a/x and b/x with b a link
		// to a are seen as one file even before x exists.
		if dir, err := filepath.EvalSymlinks(filepath.Dir(t)); err == nil {
			t = filepath.Join(dir, filepath.Base(t))
		}
		keys[i].path = t
		keys[i].fi, _ = os.Stat(t)
	}
	for i := range keys {
		for j := range i {
			same := keys[i].path == keys[j].path ||
				(keys[i].fi != nil && keys[j].fi != nil && os.SameFile(keys[i].fi, keys[j].fi))
			switch {
			case same && paths[i] == paths[j]:
				return badInputf("%s is named for two outputs; give each output its own file", paths[i])
			case same:
				return badInputf("%s and %s are the same file; give each output its own", paths[j], paths[i])
			}
		}
	}
	return nil
}
