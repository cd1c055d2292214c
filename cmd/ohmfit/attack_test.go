package main

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/spf13/pflag"
)

// The attacks of the hardening rounds on the command line: each case is a
// command line (or a file) that once crashed, hung, lost an output or
// printed a library's message, and what it must do now.

// leaks are fragments of library messages that must never reach a user.
var leaks = []string{"strconv.", "time: ", "parsing ", "invalid argument", "flag needs", "shorthand", "invalid syntax", "pflag", "goroutine"}

// wantBadInput checks the contract for bad input: exit 2, nothing on
// stdout, one stderr line with the error label, in our own words, and
// containing each of want.
func wantBadInput(t *testing.T, args []string, stdout, stderr string, code ExitCode, want ...string) {
	t.Helper()
	if code != ExitBadInput || stdout != "" || strings.Count(stderr, "\n") != 1 || !strings.HasPrefix(stderr, errorLabel) {
		t.Errorf("%q: exit %d, stdout %q, stderr %q; want exit 2 with one error line", args, code, stdout, stderr)
		return
	}
	for _, l := range leaks {
		if strings.Contains(stderr, l) {
			t.Errorf("%q: library wording %q in %q", args, l, stderr)
		}
	}
	for _, w := range want {
		if !strings.Contains(stderr, w) {
			t.Errorf("%q: %q does not say %q", args, stderr, w)
		}
	}
}

// commandLines gives each command a minimal valid command line that its
// options can be added to.
var commandLines = map[string][]string{
	"values":   {"values", "E24"},
	"solve":    {"solve", "testdata/bench.yaml"},
	"examples": {"examples"},
	"fit":      {"fit", "example:feedback"},
	"divider":  {"divider", "--vin", "5", "--vout", "1"},
	"feedback": {"feedback", "--vref", "0.8", "--vout", "3.3"},
	"combine":  {"combine", "4.7k"},
	"check":    {"check", "testdata/check-pass.yaml"},
	"merge":    {"merge", "testdata/no-such-shard.json"}, // no options of its own beyond --help
	"board":    {"board", "testdata/board/two.yaml"},
}

// TestEveryFlagErrorInOurWords gives every option of every command that is
// not free text a value it cannot take, and every option that takes a value
// none: each must be refused in our words, naming the option and saying
// what it accepts. Going through the command tree covers options added
// later too.
func TestEveryFlagErrorInOurWords(t *testing.T) {
	root := newRootCmd(strings.NewReader(""), &bytes.Buffer{}, &bytes.Buffer{})
	tried := 0
	for _, c := range root.Commands() {
		base, ok := commandLines[c.Name()]
		if !ok {
			if c.Name() != "help" && c.Name() != "completion" {
				t.Errorf("command %s has no command line in this test", c.Name())
			}
			continue
		}
		c.Flags().VisitAll(func(f *pflag.Flag) {
			if f.Name == "help" {
				return
			}
			if f.Value.Type() != "string" {
				bad := "x"
				if f.Value.Type() == "bool" {
					bad = "maybe"
				}
				args := append(append([]string{}, base...), "--"+f.Name+"="+bad)
				stdout, stderr, code := runCLI(t, args...)
				wantBadInput(t, args, stdout, stderr, code, "--"+f.Name, "want ")
				tried++
			}
			if f.Value.Type() != "bool" {
				args := append(append([]string{}, base...), "--"+f.Name)
				stdout, stderr, code := runCLI(t, args...)
				wantBadInput(t, args, stdout, stderr, code, "--"+f.Name+" needs a value")
				tried++
			}
		})
	}
	if tried < 30 {
		t.Errorf("only %d options tried; the command tree was not walked", tried)
	}
}

// TestFlagErrors are the named cases: counts out of range (huge ones used
// to allocate their list before the search and die out of memory),
// durations without a unit, negative numbers read as options, misspelt
// options.
func TestFlagErrors(t *testing.T) {
	huge := "99999999999"
	cases := []struct {
		args []string
		want []string
	}{
		{[]string{"fit", "example:feedback", "--top", huge}, []string{"--top", "from 1 to 10,000"}},
		{[]string{"fit", "example:feedback", "--top", "0"}, []string{"--top", "from 1 to 10,000"}},
		{[]string{"fit", "example:feedback", "--bom-rank", huge, "--bom", "x.csv"}, []string{"--bom-rank"}},
		{[]string{"fit", "example:feedback", "--workers", huge}, []string{"--workers", "from 0 to 1,024"}},
		{[]string{"fit", "example:feedback", "--workers", "-1"}, []string{"--workers"}},
		{[]string{"divider", "--vin", "5", "--vout", "1", "--top", huge}, []string{"--top"}},
		{[]string{"feedback", "--vref", "0.8", "--vout", "3.3", "--top", huge}, []string{"--top"}},
		{[]string{"combine", "4.7k", "--top", huge}, []string{"--top"}},
		{[]string{"combine", "4.7k", "--max-parts", "4"}, []string{"--max-parts", "from 1 to 3"}},
		{[]string{"check", "example:feedback", "--rank", huge}, []string{"--rank"}},
		{[]string{"check", "testdata/check-pass.yaml", "--samples", huge}, []string{"--samples", "10,000,000"}},
		{[]string{"check", "testdata/check-pass.yaml", "--samples", "-1"}, []string{"--samples"}},
		{[]string{"check", "testdata/check-pass.yaml", "--seed", "-1"}, []string{"--seed", "whole number"}},
		{[]string{"fit", "example:feedback", "--time-limit", "5"}, []string{"--time-limit", "with its unit"}},
		{[]string{"fit", "example:feedback", "--time-limit", "-5s"}, []string{"--time-limit"}},
		{[]string{"fit", "example:feedback", "--memory", "12"}, []string{"--memory", "at least 1MiB"}},
		{[]string{"fit", "example:feedback", "--memory", "4 lots"}, []string{"--memory", "like 512MiB"}},
		{[]string{"fit", "example:feedback", "--memory", "99999999999EiB"}, []string{"--memory"}},
		{[]string{"fit", "example:feedback", "--quiet=perhaps"}, []string{"--quiet", "true or false"}},
		{[]string{"combine", "-4.7k"}, []string{"-4.7k", "cannot be negative"}},
		{[]string{"combine", "-4k7"}, []string{"-4k7", "cannot be negative"}},
		{[]string{"fit", "-1", "example:feedback"}, []string{"-1", "negative number"}},
		{[]string{"values", "E24", "--nearr", "1k"}, []string{"--nearr", "did you mean --near?"}},
		{[]string{"values", "E24", "-z"}, []string{"unknown option -z"}},
		{[]string{"fit", "example:feedback", "---top", "3"}, []string{"not an option"}},
		{[]string{"values", "E24", "--from", "4.7x"}, []string{"--from", "want a resistance like"}},
		{[]string{"divider", "--vin", "5V5", "--vout", "1"}, []string{"--vin", "want a voltage like"}},
		{[]string{"fit", "example:feedback", "--format", "xml"}, []string{"--format", "table, json or csv"}},
		{[]string{"fit", "example:feedback", "--series", "E25"}, []string{"unknown series", "E24"}},
	}
	for _, c := range cases {
		t.Run(strings.Join(c.args, " "), func(t *testing.T) {
			start := time.Now()
			stdout, stderr, code := runCLI(t, c.args...)
			wantBadInput(t, c.args, stdout, stderr, code, c.want...)
			if d := time.Since(start); d > 20*time.Second {
				// Not a timing assertion on the code: a refused flag that takes
				// this long ran the search it should have refused.
				t.Errorf("%q took %v", c.args, d)
			}
		})
	}
}

// TestTinyTimeLimit: a time limit too short to evaluate anything must say
// so, not claim that no candidate meets hard limits the template does not
// have. Every format tells the same story, and no format prints a result.
func TestTinyTimeLimit(t *testing.T) {
	for _, args := range [][]string{
		{"fit", "example:feedback", "--time-limit", "1ns"},
		{"fit", "example:feedback", "--time-limit", "1ns", "--format", "json"},
		{"fit", "example:feedback", "--time-limit", "1ns", "--format", "csv"},
		{"fit", "example:feedback", "--time-limit", "1ns", "--method", "heuristic"},
		{"divider", "--vin", "5", "--vout", "1", "--time-limit", "1ns"},
		{"feedback", "--vref", "0.8", "--vout", "3.3", "--time-limit", "1ns"},
	} {
		t.Run(strings.Join(args, " "), func(t *testing.T) {
			stdout, stderr, code := runCLI(t, args...)
			wantBadInput(t, args, stdout, stderr, code, "ran out before any candidate was evaluated", "--time-limit")
			if strings.Contains(stderr, "hard limits") {
				t.Errorf("%q: %q speaks of hard limits", args, stderr)
			}
		})
	}
	// A heuristic run that did evaluate candidates within 1 ms shows them
	// (exit 0); one that did not says the time ran out. Neither may speak
	// of hard limits, which this template does not have.
	args := []string{"fit", "example:feedback", "--method", "heuristic", "--time-limit", "1ms"}
	_, stderr, code := runCLI(t, args...)
	if code == ExitNoSolution || strings.Contains(stderr, "hard limits") {
		t.Errorf("%q: exit %d, %q", args, code, stderr)
	}
}

// TestCheckExitStatus: check is a gate a script can trust. A design whose
// limits hold at every corner exits 0; one that leaves them exits 1 with
// the broken limit on stderr, and still writes its report.
func TestCheckExitStatus(t *testing.T) {
	// --rank picks among fitted answers; a design with every value given
	// has none to pick from.
	if _, stderr, code := runCLI(t, "check", "example:bias-bench", "--rank", "2"); code != ExitBadInput || !strings.Contains(stderr, "one design") {
		t.Errorf("check a valued design --rank 2: exit %d, %q", code, stderr)
	}
	for _, c := range []struct {
		file string
		code ExitCode
		want string
	}{
		{"testdata/check-pass.yaml", ExitOK, ""},
		{"testdata/check-divider.yaml", ExitNoSolution, "voltage th in \"nominal\" leaves its limits in the worst case"},
		{"example:feedback", ExitOK, ""}, // fitted, then checked: 1 % parts hold a 2 % goal
	} {
		t.Run(c.file, func(t *testing.T) {
			for _, format := range []string{"table", "json"} {
				stdout, stderr, code := runCLI(t, "check", c.file, "--samples", "200", "--format", format)
				if code != c.code || stdout == "" {
					t.Errorf("%s %s: exit %d (want %d), %d bytes of report", c.file, format, code, c.code, len(stdout))
				}
				last := stderr[strings.LastIndex(strings.TrimSuffix(stderr, "\n"), "\n")+1:]
				if c.want != "" && !(strings.HasPrefix(last, notMetLabel) && strings.Contains(last, c.want)) {
					t.Errorf("%s %s: stderr %q, want a not-met line about %s", c.file, format, stderr, c.want)
				}
				checkLabels(t, code, stderr)
			}
		})
	}
}

// failingWriter fails every write, like standard output on a full disk.
type failingWriter struct{}

func (failingWriter) Write([]byte) (int, error) {
	return 0, &os.PathError{Op: "write", Path: "/dev/stdout", Err: syscall.ENOSPC}
}

// TestStdoutWriteFails: a result that cannot be written is a failed run
// (exit 2, one message), for every command and for help.
func TestStdoutWriteFails(t *testing.T) {
	for _, args := range [][]string{
		{"help", "fit"},
		{"fit", "--help"},
		{},
		{"values", "E24"},
		{"values", "E24", "--near", "4k32", "--format", "json"},
		{"examples"},
		{"examples", "divider"},
		{"solve", "testdata/bench.yaml"},
		{"fit", "example:feedback", "--format", "json"},
		{"divider", "--vin", "5", "--vout", "1"},
		{"combine", "4.7k"},
		{"check", "testdata/check-pass.yaml", "--samples", "100"},
	} {
		t.Run(strings.Join(args, " "), func(t *testing.T) {
			var stderr bytes.Buffer
			code := run(args, strings.NewReader(""), failingWriter{}, &stderr)
			wantBadInput(t, args, "", stderr.String(), code, "cannot write to standard output", "no space left on device")
		})
	}
	// The real thing, where the system has it.
	if full, err := os.OpenFile("/dev/full", os.O_WRONLY, 0); err == nil {
		defer full.Close()
		cmd := exec.Command(os.Args[0], "help", "fit")
		cmd.Env = append(os.Environ(), "OHMFIT_TEST_MAIN=1")
		var stderr bytes.Buffer
		cmd.Stdout, cmd.Stderr = full, &stderr
		err := cmd.Run()
		var ee *exec.ExitError
		if !errors.As(err, &ee) || ee.ExitCode() != int(ExitBadInput) || !strings.HasPrefix(stderr.String(), errorLabel) {
			t.Errorf("help fit > /dev/full: %v, stderr %q", err, stderr.String())
		}
	}
}

// writeFile writes a test file and fails the test on error.
func writeFile(t *testing.T, path, text string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

// noTemps fails when dir holds a temporary file of an output.
func noTemps(t *testing.T, dir string) {
	t.Helper()
	for _, n := range dirEntries(t, dir) {
		if strings.HasSuffix(n, ".tmp") {
			t.Errorf("temporary file left: %s", n)
		}
	}
}

// TestOutputsAgainstEachOther: two outputs that land on one file (same
// path however spelt, a symbolic link to the other, a hard link) are
// refused before anything runs, and nothing is written.
func TestOutputsAgainstEachOther(t *testing.T) {
	dir := t.TempDir()
	p := func(name string) string { return filepath.Join(dir, name) }
	writeFile(t, p("old.csv"), "old\n")
	if err := os.Symlink("old.csv", p("link.csv")); err != nil {
		t.Skipf("no symbolic links here: %v", err)
	}
	if err := os.Link(p("old.csv"), p("hard.csv")); err != nil {
		t.Skipf("no hard links here: %v", err)
	}
	if err := os.Symlink("new.png", p("dangling.png")); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(dir, p("sub")); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink("c.csv", p("c.svg")); err != nil {
		t.Fatal(err)
	}
	cases := [][]string{
		{"fit", "example:divider", "-o", p("same.csv"), "--bom", p("same.csv")},
		{"fit", "example:divider", "-o", p("p.png"), "--plot", p("p.png")},
		{"fit", "example:divider", "-o", p("x.svg"), "--plot", filepath.Join(dir, ".", "x.svg")},
		{"fit", "example:divider", "--bom", p("old.csv"), "-o", p("link.csv")},
		{"fit", "example:divider", "--bom", p("old.csv"), "-o", p("hard.csv")},
		{"fit", "example:divider", "--plot", p("new.png"), "-o", p("dangling.png")},
		{"fit", "example:divider", "--bom", p("n.csv"), "-o", filepath.Join(p("sub"), "n.csv")},
		{"check", "testdata/check-pass.yaml", "-o", p("r.csv"), "--bom", p("r.csv")},
		{"check", "testdata/check-pass.yaml", "--bom", p("c.csv"), "--plot", p("c.svg")},
		{"check", "testdata/check-pass.yaml", "--plot", p("h.png"), "-o", p("h.png")},
	}
	for _, args := range cases {
		t.Run(strings.Join(args, " "), func(t *testing.T) {
			stdout, stderr, code := runCLI(t, args...)
			wantBadInput(t, args, stdout, stderr, code, "give each output its own")
		})
	}
	if got := readString(t, p("old.csv")); got != "old\n" {
		t.Errorf("old.csv now holds %q", got)
	}
	for _, n := range dirEntries(t, dir) {
		switch n {
		case "old.csv", "link.csv", "hard.csv", "dangling.png", "sub", "c.svg":
		default:
			t.Errorf("a refused run wrote %s", n)
		}
	}
}

// TestOutputThroughSymlink: -o (and --bom, --plot) onto a symbolic link
// writes the link's target, atomically, and keeps the link.
func TestOutputThroughSymlink(t *testing.T) {
	dir := t.TempDir()
	p := func(name string) string { return filepath.Join(dir, name) }
	real := p("real")
	if err := os.Mkdir(real, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		flag, ext string
		args      []string
	}{
		{"-o", ".txt", []string{"solve", "testdata/bench.yaml"}},
		{"-o", ".json", []string{"fit", "example:divider", "--format", "json"}},
		{"--bom", ".csv", []string{"fit", "example:divider"}},
		{"--plot", ".svg", []string{"check", "testdata/check-pass.yaml", "--samples", "100"}},
		{"-o", ".txt", []string{"check", "testdata/check-pass.yaml", "--samples", "100"}},
	} {
		t.Run(c.flag+" "+strings.Join(c.args, " "), func(t *testing.T) {
			target := filepath.Join(real, "out"+c.ext)
			writeFile(t, target, "old\n")
			link := p("link" + c.ext)
			os.Remove(link)
			// A relative link, as `ln -s real/out.txt link.txt` makes.
			if err := os.Symlink(filepath.Join("real", "out"+c.ext), link); err != nil {
				t.Skipf("no symbolic links here: %v", err)
			}
			args := append(append([]string{}, c.args...), c.flag, link)
			if _, stderr, code := runCLI(t, args...); code != ExitOK {
				t.Fatalf("%q: exit %d, %s", args, code, stderr)
			}
			fi, err := os.Lstat(link)
			if err != nil || fi.Mode()&os.ModeSymlink == 0 {
				t.Errorf("%q: the link was replaced (%v)", args, err)
			}
			if got := readString(t, target); got == "old\n" || len(got) < 20 {
				t.Errorf("%q: the link's target holds %q", args, got[:min(len(got), 40)])
			}
			noTemps(t, dir)
			noTemps(t, real)
		})
	}
	// A dangling link: the target is created where it points.
	if err := os.Symlink(filepath.Join("real", "fresh.txt"), p("fresh.txt")); err != nil {
		t.Fatal(err)
	}
	if _, stderr, code := runCLI(t, "solve", "testdata/bench.yaml", "-o", p("fresh.txt")); code != ExitOK {
		t.Fatalf("dangling link: exit %d, %s", code, stderr)
	}
	if got := readString(t, filepath.Join(real, "fresh.txt")); !strings.Contains(got, "condition") {
		t.Errorf("dangling link's target holds %q", got)
	}
}

// TestAllOutputsOrNone: when one output fails (here the histogram plot of a
// run without samples), no other is written — not the BOM, not -o's
// report, not the table on stdout — and no temporary file is left.
func TestAllOutputsOrNone(t *testing.T) {
	dir := t.TempDir()
	p := func(name string) string { return filepath.Join(dir, name) }
	writeFile(t, p("kept.csv"), "an older BOM\n")
	for _, args := range [][]string{
		{"check", "testdata/check-pass.yaml", "--samples", "0", "--bom", p("b.csv"), "--plot", p("h.svg")},
		{"check", "testdata/check-pass.yaml", "--samples", "0", "--bom", p("b.csv"), "--plot", p("h.png"), "-o", p("r.txt")},
		{"check", "testdata/check-pass.yaml", "--samples", "0", "--bom", p("kept.csv"), "--plot", p("h.svg"), "--format", "json"},
	} {
		t.Run(strings.Join(args, " "), func(t *testing.T) {
			stdout, stderr, code := runCLI(t, args...)
			wantBadInput(t, args, stdout, stderr, code, "no Monte Carlo samples")
		})
	}
	if names := dirEntries(t, dir); len(names) != 1 {
		t.Errorf("failed runs left %v", names)
	}
	if got := readString(t, p("kept.csv")); got != "an older BOM\n" {
		t.Errorf("the older BOM now holds %q", got)
	}
	// The same run with samples writes all three.
	args := []string{"check", "testdata/check-pass.yaml", "--samples", "100", "--bom", p("b.csv"), "--plot", p("h.svg"), "-o", p("r.txt")}
	if stdout, stderr, code := runCLI(t, args...); code != ExitOK || stdout != "" {
		t.Fatalf("exit %d, stdout %q, stderr %s", code, stdout, stderr)
	}
	for _, n := range []string{"b.csv", "h.svg", "r.txt"} {
		if fi, err := os.Stat(p(n)); err != nil || fi.Size() == 0 {
			t.Errorf("%s not written: %v", n, err)
		}
	}
}

// TestSignalRemovesTemps sends a real SIGTERM and a real SIGINT to runs
// held in the middle of writing their outputs (as a long plot holds them):
// the process ends, and neither the outputs nor their temporary files are
// left.
func TestSignalRemovesTemps(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("no SIGTERM here")
	}
	for _, c := range []struct {
		sig  syscall.Signal
		args []string
	}{
		{syscall.SIGTERM, []string{"solve", "testdata/bench.yaml", "-o", "out.txt"}},
		{syscall.SIGINT, []string{"fit", "example:divider", "--plot", "p.png", "--bom", "b.csv", "-o", "out.txt"}},
		{syscall.SIGTERM, []string{"check", "testdata/check-pass.yaml", "--samples", "100", "--plot", "p.png", "--bom", "b.csv"}},
	} {
		t.Run(c.sig.String()+" "+c.args[0], func(t *testing.T) {
			dir := t.TempDir()
			args := append([]string{}, c.args...)
			for i, a := range args {
				if strings.Contains(a, ".") && i > 0 && strings.HasPrefix(args[i-1], "-") {
					args[i] = filepath.Join(dir, a)
				}
			}
			args[1], _ = filepath.Abs(args[1])
			if strings.HasPrefix(c.args[1], "example:") {
				args[1] = c.args[1]
			}
			cmd := exec.Command(os.Args[0], args...)
			cmd.Env = append(os.Environ(), "OHMFIT_TEST_MAIN=1", "OHMFIT_TEST_STALL_WRITES=1")
			var stderr bytes.Buffer
			cmd.Stderr = &stderr
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			done := make(chan error, 1)
			go func() { done <- cmd.Wait() }()
			// Wait for the first temporary file: the run is now writing.
			deadline := time.Now().Add(60 * time.Second)
			for {
				found := false
				for _, n := range dirEntries(t, dir) {
					found = found || strings.HasSuffix(n, ".tmp")
				}
				if found {
					break
				}
				if time.Now().After(deadline) {
					cmd.Process.Kill()
					t.Fatalf("no temporary file appeared; stderr %s", stderr.String())
				}
				time.Sleep(10 * time.Millisecond)
			}
			if err := cmd.Process.Signal(c.sig); err != nil {
				t.Fatal(err)
			}
			select {
			case err := <-done:
				var ee *exec.ExitError
				if !errors.As(err, &ee) {
					t.Errorf("the run ended with %v, want it stopped by the signal", err)
				}
			case <-time.After(30 * time.Second):
				cmd.Process.Kill()
				t.Fatal("the run did not stop")
			}
			if names := dirEntries(t, dir); len(names) != 0 {
				t.Errorf("left behind: %v", names)
			}
			if strings.Contains(stderr.String(), "goroutine") {
				t.Errorf("stack trace: %s", stderr.String())
			}
		})
	}
}

// TestNonRegularInputs: a FIFO (or a directory) as the template or as a
// stock file is refused at once, without waiting for a writer.
func TestNonRegularInputs(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("no FIFOs here")
	}
	dir := t.TempDir()
	fifo := filepath.Join(dir, "pipe.yaml")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skipf("cannot make a FIFO: %v", err)
	}
	stockFifo := filepath.Join(dir, "stock.csv")
	if err := syscall.Mkfifo(stockFifo, 0o644); err != nil {
		t.Fatal(err)
	}
	tpl := filepath.Join(dir, "t.yaml")
	writeFile(t, tpl, "ohmfit: 1\nparts:\n  - {name: V1, type: voltage-source, plus: a, minus: gnd, volts: 5}\n"+
		"  - {name: R1, type: resistor, from: a, to: b}\n  - {name: R2, type: resistor, from: b, to: gnd, value: 1k}\n"+
		"targets:\n  - {voltage: b, equals: 2}\nchoose: {series: stock.csv}\n")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"fit", fifo}, "named pipe"},
		{[]string{"solve", fifo}, "named pipe"},
		{[]string{"check", fifo}, "named pipe"},
		{[]string{"fit", tpl}, "named pipe"},
		{[]string{"solve", dir}, "directory"},
		{[]string{"merge", fifo}, "named pipe"},
		{[]string{"merge", dir}, "directory"},
	} {
		t.Run(strings.Join(c.args, " "), func(t *testing.T) {
			done := make(chan struct{})
			go func() {
				defer close(done)
				stdout, stderr, code := runCLI(t, c.args...)
				wantBadInput(t, c.args, stdout, stderr, code, c.want, "not a regular file")
			}()
			select {
			case <-done:
			case <-time.After(30 * time.Second):
				t.Fatalf("%q hangs", c.args)
			}
		})
	}
}

// TestStockFileWithBOM: a stock file saved with a UTF-8 byte order mark (as
// spreadsheets write them) reads like the same file without one.
func TestStockFileWithBOM(t *testing.T) {
	dir := t.TempDir()
	tpl := "ohmfit: 1\nparts:\n  - {name: V1, type: voltage-source, plus: a, minus: gnd, volts: 5}\n" +
		"  - {name: R1, type: resistor, from: a, to: b}\n  - {name: R2, type: resistor, from: b, to: gnd, value: 1k}\n" +
		"targets:\n  - {voltage: b, equals: 2}\nchoose: {series: stock.csv}\n"
	var outs []string
	for _, bom := range []string{"", "\uFEFF"} {
		t.Run(fmt.Sprintf("%q", bom), func(t *testing.T) {
			writeFile(t, filepath.Join(dir, "stock.csv"), bom+"1k2\n1k5\n2k2\n")
			writeFile(t, filepath.Join(dir, "t.yaml"), tpl)
			stdout, stderr, code := runCLI(t, "fit", filepath.Join(dir, "t.yaml"), "--format", "json")
			if code != ExitOK {
				t.Fatalf("BOM %q: exit %d, %s", bom, code, stderr)
			}
			outs = append(outs, stdout)
		})
	}
	if outs[0] != outs[1] {
		t.Errorf("with a BOM the answers differ:\n%s\n%s", outs[0], outs[1])
	}
}

// TestControlCharactersQuoted: a file name with an escape sequence, a
// bidirectional override or bytes that are not UTF-8 is shown escaped in
// every message, never sent raw to the terminal.
func TestControlCharactersQuoted(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"evil\x1b[2J\x1b[31m.yaml", "a\u202egnp.yaml", "bad\xff\xfe.yaml", "bell\a.yaml"} {
		t.Run(fmt.Sprintf("%q", name), func(t *testing.T) {
			path := filepath.Join(dir, name)
			for _, args := range [][]string{
				{"solve", path},
				{"fit", path},
				{"check", path},
				{"solve", "testdata/bench.yaml", "-o", filepath.Join(path, "out.txt")},
				{"fit", "example:divider", "--bom", filepath.Join(dir, "no-dir"+name, "b.csv")},
			} {
				stdout, stderr, code := runCLI(t, args...)
				wantBadInput(t, args, stdout, stderr, code)
				for _, r := range strings.TrimSuffix(stderr, "\n") {
					if unsafeRune(r) || r == 0xfffd {
						t.Errorf("%q: raw %U in %q", args, r, stderr)
					}
				}
				if !strings.ContainsAny(stderr, `\`) {
					t.Errorf("%q: %q shows no escape", args, stderr)
				}
			}
		})
	}
	// The escaping itself.
	for in, want := range map[string]string{
		"plain µΩ.yaml": "plain µΩ.yaml",
		"a\x1b[31mb":    `a\x1b[31mb`,
		"r\u202el":      `r\u202el`,
		"x\xffy":        `x\xffy`,
		"tab\there":     `tab\x09here`,
		"c1\u0085":      `c1\x85`,
	} {
		t.Run(fmt.Sprintf("%q", in), func(t *testing.T) {
			if got := safeText(in); got != want {
				t.Errorf("safeText(%q) = %q, want %q", in, got, want)
			}
		})
	}
}
