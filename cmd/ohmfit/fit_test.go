package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth"
)

// TestMain lets the test binary act as the ohmfit command when asked, so a
// test can run it as a real process and send it a real interrupt.
func TestMain(m *testing.M) {
	if os.Getenv("OHMFIT_TEST_MAIN") == "1" {
		if f := os.Getenv("OHMFIT_TEST_PHASE_FILE"); f != "" {
			// Tell the test which phase the run is in.
			phaseHook = func(name string) {
				if fh, err := os.OpenFile(f, os.O_APPEND|os.O_WRONLY|os.O_CREATE, 0o600); err == nil {
					fmt.Fprintln(fh, name)
					fh.Close()
				}
			}
		}
		if os.Getenv("OHMFIT_TEST_STALL_WRITES") == "1" {
			// Hold every output write open, as a long plot would.
			stageHook = func(string) { time.Sleep(time.Hour) }
		}
		os.Exit(int(run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr)))
	}
	os.Exit(m.Run())
}

type fitDoc struct {
	Exhaustive bool   `json:"exhaustive"`
	Status     string `json:"status"`
	Solutions  []struct {
		Rank    int                  `json:"rank"`
		Values  map[string]float64   `json:"values"`
		Parts   map[string][]float64 `json:"parts"`
		Error   float64              `json:"error"`
		Power   float64              `json:"power"`
		Targets []struct {
			Target string  `json:"target"`
			Value  float64 `json:"value"`
		} `json:"targets"`
	} `json:"solutions"`
}

func fitJSONDoc(t *testing.T, args ...string) fitDoc {
	t.Helper()
	out, errOut, code := runCLI(t, args...)
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var doc fitDoc
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("%v in %s", err, out)
	}
	return doc
}

// Each divider answer against the closed form Vout = Vin·R2/(R1+R2) (voltage
// divider formula), R2 in parallel with the load when there is one.
func TestDividerAgainstClosedForm(t *testing.T) {
	doc := fitJSONDoc(t, "divider", "--vin", "12", "--vout", "2.5", "--load", "100k", "--format", "json", "--top", "20")
	if len(doc.Solutions) != 20 || !doc.Exhaustive {
		t.Fatalf("%d solutions, exhaustive %v", len(doc.Solutions), doc.Exhaustive)
	}
	for _, s := range doc.Solutions {
		r1, r2 := s.Values["R1"], s.Values["R2"]
		low := r2 * 100e3 / (r2 + 100e3) // parallel law
		want := 12 * low / (r1 + low)
		got := s.Targets[0].Value
		if math.Abs(got-want) > 1e-12*want {
			t.Errorf("R1 %g R2 %g: %g V, closed form %g V", r1, r2, got, want)
		}
		if e := math.Abs(want-2.5) / 2.5; math.Abs(e-s.Error) > 1e-12 {
			t.Errorf("R1 %g R2 %g: error %g, closed form %g", r1, r2, s.Error, e)
		}
		// Power: Vin² / (R1 + R2∥RL) — Ohm's law and the series law.
		if p := 12 * 12 / (r1 + low); math.Abs(p-s.Power) > 1e-12*p {
			t.Errorf("power %g, closed form %g", s.Power, p)
		}
	}
}

// The feedback network is solved as a network; its answers must obey the
// adjustable regulator's closed form Vout = Vref·(1 + R1/R2) + Ibias·R1,
// which follows from KCL at the feedback pin with the pin held at Vref.
func TestFeedbackAgainstClosedForm(t *testing.T) {
	doc := fitJSONDoc(t, "feedback", "--vref", "0.6", "--vout", "1.8", "--bias-current", "200n", "--series", "E24", "--format", "json", "--top", "15")
	for _, s := range doc.Solutions {
		r1, r2 := s.Values["R1"], s.Values["R2"]
		want := 0.6*(1+r1/r2) + 200e-9*r1
		if got := s.Targets[0].Value; math.Abs(got-want) > 1e-12*want {
			t.Errorf("R1 %g R2 %g: Vout %g, closed form %g", r1, r2, got, want)
		}
	}
}

// A time limit ends a search that cannot finish with the best found so far,
// marked not exhaustive, exit 0.
func TestFitTimeLimit(t *testing.T) {
	out, errOut, code := runCLI(t, "fit", "testdata/big.yaml", "--method", "exhaustive", "--time-limit", "200ms", "--format", "json", "--top", "3")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var doc fitDoc
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Exhaustive || doc.Status != "time-limit" || len(doc.Solutions) == 0 {
		t.Fatalf("exhaustive %v, status %q, %d solutions", doc.Exhaustive, doc.Status, len(doc.Solutions))
	}
	if !strings.Contains(errOut, "time limit") {
		t.Errorf("stderr should say the time limit was reached: %q", errOut)
	}
}

// A real Ctrl-C (SIGINT) to every command that can run long. During a
// search (fit, divider, feedback) it stops the search: the best so far is
// printed, marked not proven, exit 0. After a search, or in a command with
// no search (check's worst case and Monte Carlo), it ends the process as the
// signal does by default: nothing printed, nothing left. It is never
// swallowed (a swallowed Ctrl-C runs the command to its end and exits 0),
// and never gives a stack trace. solve, combine and merge finish in
// milliseconds and keep the default meaning throughout.
func TestInterruptEveryCommand(t *testing.T) {
	if testing.Short() {
		t.Skip("runs long commands")
	}
	cases := []struct {
		name  string
		args  []string
		phase string // the phase to send the signal in (see phaseHook)
	}{
		{"fit", []string{"fit", "testdata/big.yaml", "--method", "exhaustive", "--top", "3"}, "searching"},
		{"divider", []string{"divider", "--vin", "12", "--vout", "2.5", "--series", "E192", "--combine", "any", "--method", "exhaustive", "--tradeoffs", "50%", "--top", "3"}, "searching"},
		{"feedback", []string{"feedback", "--vref", "0.7", "--vout", "3.3", "--series", "E192", "--combine", "any", "--method", "exhaustive", "--tradeoffs", "50%", "--top", "3"}, "searching"},
		{"fit --check, in the check", []string{"fit", "testdata/long-sweep.yaml", "--check"}, "checking"},
		{"check valued", []string{"check", "testdata/check-pass.yaml", "--samples", "10000000"}, "checking"},
		{"check after its search", []string{"check", "example:divider", "--samples", "10000000"}, "checking"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			cmd := exec.Command(os.Args[0], c.args...)
			phases := filepath.Join(t.TempDir(), "phases")
			cmd.Env = append(os.Environ(), "OHMFIT_TEST_MAIN=1", "OHMFIT_TEST_PHASE_FILE="+phases)
			var out, errOut bytes.Buffer
			cmd.Stdout, cmd.Stderr = &out, &errOut
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			done := make(chan error, 1)
			go func() { done <- cmd.Wait() }()
			// Wait until the run is in the phase (a condition, not a time).
			for {
				seen, _ := os.ReadFile(phases)
				if slices.Contains(strings.Fields(string(seen)), c.phase) {
					break
				}
				select {
				case err := <-done:
					t.Fatalf("ended (%v) before the %s phase; phases %q, stderr %s", err, c.phase, seen, errOut.String())
				case <-time.After(5 * time.Millisecond):
				}
			}
			if err := cmd.Process.Signal(syscall.SIGINT); err != nil {
				t.Fatal(err)
			}
			err := stoppedAfterInterrupt(t, cmd, done)
			if strings.Contains(errOut.String(), "goroutine") {
				t.Errorf("stack trace: %s", errOut.String())
			}
			if c.phase == "searching" {
				if err != nil {
					t.Fatalf("%v; stderr: %s", err, errOut.String())
				}
				if !strings.Contains(out.String(), "interrupted: not proven") || !strings.Contains(out.String(), "1") {
					t.Errorf("stdout should show the best so far, marked not proven:\n%s", out.String())
				}
				if !strings.Contains(errOut.String(), "interrupted") {
					t.Errorf("stderr: %q", errOut.String())
				}
				return
			}
			var ee *exec.ExitError
			if !errors.As(err, &ee) {
				t.Fatalf("ended with %v, want it ended by the interrupt; stdout %d bytes", err, out.Len())
			}
			if out.Len() != 0 {
				t.Errorf("printed after the interrupt:\n%s", out.String())
			}
		})
	}
}

// TestStdinTemplate: the FILE "-" reads the template from standard input,
// gives the same output as the file itself, names "<stdin>" in messages, and
// keeps the loader's size limit.
func TestStdinTemplate(t *testing.T) {
	text, err := os.ReadFile("testdata/check-divider.yaml")
	if err != nil {
		t.Fatal(err)
	}
	huge := strings.Repeat("#", constraints.MaxFileSize+1)
	cases := []struct {
		args  []string
		stdin string
		code  ExitCode
		want  string // in stderr, for a failing run
	}{
		{[]string{"solve", "-"}, string(text), ExitOK, ""},
		{[]string{"check", "-", "--samples", "100"}, string(text), ExitNoSolution, ""},
		{[]string{"fit", "-", "--top", "2", "--workers", "1"}, "ohmfit: 1\nparts:\n  - {name: V1, type: voltage-source, plus: a, minus: gnd, volts: 5}\n  - {name: R1, type: resistor, from: a, to: b}\n  - {name: R2, type: resistor, from: b, to: gnd}\ntargets:\n  - {voltage: b, equals: 2.5}\n", ExitOK, ""},
		{[]string{"solve", "-"}, "ohmfit: 1\nparts: 7\n", ExitBadInput, "<stdin>:2:"},
		{[]string{"fit", "-"}, huge, ExitBadInput, "larger than 4 MiB"},
	}
	for _, c := range cases {
		t.Run(strings.Join(c.args, " "), func(t *testing.T) {
			var out, errOut bytes.Buffer
			code := run(c.args, strings.NewReader(c.stdin), &out, &errOut)
			if code != c.code || !strings.Contains(errOut.String(), c.want) {
				t.Fatalf("exit %d (want %d), stderr %q (want %q)", code, c.code, errOut.String(), c.want)
			}
			if c.want != "" || c.args[0] == "fit" {
				return
			}
			// The same command on the file prints the same, but for the name.
			fileArgs := append([]string{c.args[0], "testdata/check-divider.yaml"}, c.args[2:]...)
			fromFile, _, _ := runCLI(t, fileArgs...)
			if normaliseTiming(out.String()) != normaliseTiming(fromFile) {
				t.Errorf("from stdin:\n%s\nfrom the file:\n%s", out.String(), fromFile)
			}
		})
	}
}

// stoppedAfterInterrupt waits for an interrupted command to end (done
// carries its Wait), failing the test and killing it when it runs on for a
// minute, and returns how it ended.
func stoppedAfterInterrupt(t *testing.T, cmd *exec.Cmd, done <-chan error) error {
	t.Helper()
	select {
	case err := <-done:
		return err
	case <-time.After(60 * time.Second):
		cmd.Process.Kill()
		t.Fatal("the command did not stop after an interrupt")
		return nil
	}
}

// TestNothingSeen: a search stopped before it evaluated any candidate is
// refused (exit 2) rather than reported as "no candidate meets the hard
// limits", in fit and in check's search alike; any other result passes.
func TestNothingSeen(t *testing.T) {
	cases := []struct {
		name string
		res  synth.Result
		want bool
	}{
		{"interrupted at once", synth.Result{Status: synth.Interrupted}, true},
		{"time limit at once", synth.Result{Status: synth.TimeLimit}, true},
		{"interrupted after some", synth.Result{Status: synth.Interrupted, Stats: synth.Stats{Evaluated: 1}}, false},
		{"proven, none feasible", synth.Result{Status: synth.NoFeasible}, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := nothingSeen(&c.res, time.Second)
			var ee *exitError
			if got := errors.As(err, &ee) && ee.code == ExitBadInput; got != c.want {
				t.Errorf("nothingSeen: %v, want a refusal %v", err, c.want)
			}
		})
	}
}

// A branch-and-bound run stopped by its time limit says how much of the
// space it has not yet covered: the candidates of its open boxes, a count
// between 1 and the space, and their share of it.
func TestTimeLimitSaysWhatIsLeft(t *testing.T) {
	stdout, stderr, code := runCLI(t, "fit", "../../synth/testdata/wide8-e96.yaml", "--time-limit", "300ms", "--top", "1", "-q")
	if code != 0 {
		t.Fatalf("exit %d; stderr %s", code, stderr)
	}
	m := regexp.MustCompile(`time-limit: not proven; ([0-9.e+,]+) candidates \(([0-9.e+-]+) of the space\) in boxes not yet searched or ruled out`).FindStringSubmatch(stdout)
	if m == nil {
		t.Fatalf("no count of what is left in:\n%s", stdout)
	}
	left, err1 := strconv.ParseFloat(strings.ReplaceAll(m[1], ",", ""), 64)
	share, err2 := strconv.ParseFloat(m[2], 64)
	space := math.Pow(289, 8) // eight positions of E96 over 1k … 1M (IEC 60063: 96 per decade, 3 decades + 1)
	if err1 != nil || err2 != nil || !(left >= 1 && left <= space) || math.Abs(share-left/space) > 0.01*share+1e-12 {
		t.Errorf("left %q (%g), share %q (%g), space %g", m[1], left, m[2], share, space)
	}
}
