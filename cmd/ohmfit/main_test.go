package main

import (
	"bytes"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/constraints/examples"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata from the current output")

// runCLI runs one command line as main would and returns what it printed and
// its exit code.
func runCLI(t *testing.T, args ...string) (stdout, stderr string, code ExitCode) {
	t.Helper()
	var out, errOut bytes.Buffer
	code = run(args, strings.NewReader(""), &out, &errOut)
	return out.String(), errOut.String(), code
}

// golden compares got with testdata/name.golden, rewriting it under -update.
func golden(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join("testdata", name+".golden")
	if *update {
		if err := os.WriteFile(path, []byte(normaliseTiming(got)), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run `go test ./cmd/ohmfit -update` to create it)", err)
	}
	if got != string(want) && normaliseTiming(got) != normaliseTiming(string(want)) {
		t.Errorf("output differs from %s\n--- got\n%s--- want\n%s", path, got, want)
	}
}

// timing matches the search time in a fit summary line, which varies from
// run to run.
var timing = regexp.MustCompile(`, in [0-9.]+(ns|µs|ms|s|m[0-9.]+s|h[0-9.m]+s);`)

// normaliseTiming blanks the search time so that golden files compare the
// rest of the output exactly.
func normaliseTiming(s string) string {
	return timing.ReplaceAllString(s, ", in TIME;")
}

// TestGolden runs each command line and compares its exit code, stdout and
// stderr, written into one file per case, with the golden copy.
func TestGolden(t *testing.T) {
	cases := []struct {
		name string
		args []string
		code ExitCode
	}{
		// values
		{"values-range", []string{"values", "E12", "--from", "1k", "--to", "10k"}, ExitOK},
		{"values-default", []string{"values", "e3"}, ExitOK},
		{"values-json", []string{"values", "E6", "--from", "100", "--to", "1kΩ", "--format", "json"}, ExitOK},
		{"values-empty", []string{"values", "E3", "--from", "4.8k", "--to", "9k"}, ExitOK},
		{"values-near", []string{"values", "E24", "--near", "4k32"}, ExitOK},
		{"values-near-exact", []string{"values", "E24", "--near", "4.7kohm"}, ExitOK},
		{"values-near-between", []string{"values", "E96", "--near", "4k7"}, ExitOK},
		{"values-near-json", []string{"values", "E24", "--near", "4320", "--format", "json"}, ExitOK},
		{"values-help", []string{"values", "--help"}, ExitOK},
		{"values-err-series", []string{"values", "E25"}, ExitBadInput},
		{"values-err-value", []string{"values", "E24", "--from", "4.7x"}, ExitBadInput},
		{"values-err-unit", []string{"values", "E24", "--near", "3.3V"}, ExitBadInput},
		{"values-err-order", []string{"values", "E24", "--from", "10k", "--to", "1k"}, ExitBadInput},
		{"values-err-zero", []string{"values", "E24", "--near", "0"}, ExitBadInput},
		{"values-err-empty", []string{"values", "E24", "--near="}, ExitBadInput},
		{"values-err-conflict", []string{"values", "E24", "--near", "1k", "--to", "2k"}, ExitBadInput},
		{"values-err-args", []string{"values"}, ExitBadInput},
		{"values-err-format", []string{"values", "E24", "--format", "xml"}, ExitBadInput},
		{"values-err-flag", []string{"values", "E24", "--nearr", "1k"}, ExitBadInput},

		// solve
		{"solve-table", []string{"solve", "testdata/bench.yaml"}, ExitOK},
		{"solve-json", []string{"solve", "testdata/bench.yaml", "--format", "json"}, ExitOK},
		{"solve-opamp", []string{"solve", "testdata/preamp.yaml"}, ExitOK},
		{"solve-bridge", []string{"solve", "testdata/bridge-balanced.yaml"}, ExitOK},
		{"solve-err-free", []string{"solve", "testdata/free.yaml"}, ExitBadInput},
		{"solve-err-syntax", []string{"solve", "testdata/bad.yaml"}, ExitBadInput},
		{"solve-err-missing", []string{"solve", "testdata/no-such-file.yaml"}, ExitBadInput},
		{"solve-err-floating", []string{"solve", "testdata/floating.yaml"}, ExitBadInput},
		{"solve-err-example", []string{"solve", "example:nosuch"}, ExitBadInput},
		{"solve-err-args", []string{"solve", "a.yaml", "b.yaml"}, ExitBadInput},

		// fit and the commands that build their template from flags
		{"fit-feedback", []string{"fit", "example:feedback", "--workers", "1"}, ExitOK},
		{"fit-divider-json", []string{"fit", "example:divider", "--top", "3", "--format", "json", "--workers", "1"}, ExitOK},
		{"fit-gain-csv", []string{"fit", "example:gain-stage", "--top", "3", "--format", "csv", "--workers", "1"}, ExitOK},
		{"fit-series-override", []string{"fit", "example:sensor-bias", "--series", "e12", "--top", "3", "--workers", "1"}, ExitOK},
		{"fit-heuristic", []string{"fit", "example:feedback", "--method", "heuristic", "--top", "3", "--workers", "1"}, ExitOK},
		{"fit-tradeoffs", []string{"divider", "--vin", "5", "--vout", "3.3", "--series", "E96", "--tradeoffs", "0.5%", "--top", "3", "--workers", "1"}, ExitOK},
		{"fit-tradeoffs-json", []string{"fit", "example:feedback", "--tradeoffs", "1%", "--top", "1", "--format", "json", "--workers", "1"}, ExitOK},
		{"fit-err-tradeoffs", []string{"fit", "example:feedback", "--tradeoffs", "5V"}, ExitBadInput},
		{"fit-err-tradeoffs-bare", []string{"fit", "example:feedback", "--tradeoffs", "5"}, ExitBadInput},
		{"fit-many-goals", []string{"fit", "testdata/many-goals.yaml", "--top", "3", "--workers", "1"}, ExitOK},
		{"fit-many-goals-csv", []string{"fit", "testdata/many-goals.yaml", "--top", "2", "--format", "csv", "--workers", "1"}, ExitOK},
		{"fit-tradeoffs-robust-csv", []string{"fit", "example:divider", "--top", "2", "--tradeoffs", "1%", "--robust", "--format", "csv", "--workers", "1"}, ExitOK},
		{"fit-err-check-csv", []string{"fit", "example:feedback", "--check", "--format", "csv"}, ExitBadInput},
		{"check-goal-and-limit", []string{"check", "testdata/check-goal-and-limit.yaml", "--samples", "0"}, ExitOK},
		{"fit-tradeoffs-fraction", []string{"divider", "--vin", "5", "--vout", "3.3", "--series", "E96", "--tradeoffs", "0.005", "--top", "3", "--workers", "1"}, ExitOK},
		{"fit-battery-sense", []string{"fit", "example:battery-sense", "--top", "3", "--workers", "1"}, ExitOK},
		{"fit-battery-sense-json", []string{"fit", "example:battery-sense", "--top", "1", "--format", "json", "--workers", "1"}, ExitOK},
		{"solve-sensors", []string{"solve", "testdata/thermistor-bench.yaml"}, ExitOK},
		{"solve-hazard", []string{"solve", "testdata/hv-sense.yaml"}, ExitOK},
		{"fit-hazard", []string{"fit", "testdata/hv-fit.yaml", "--top", "1", "--workers", "1"}, ExitOK},
		{"fit-err-overflow", []string{"fit", "testdata/overflow.yaml"}, ExitBadInput},
		{"fit-none", []string{"fit", "testdata/impossible.yaml"}, ExitNoSolution},
		{"check-undefined", []string{"check", "testdata/undefined-figure.yaml", "--samples", "100"}, ExitNoSolution},
		{"check-undefined-json", []string{"check", "testdata/undefined-figure.yaml", "--samples", "100", "--format", "json"}, ExitNoSolution},
		{"board-err-stdin", []string{"board", "-"}, ExitBadInput},
		{"fit-never-binds", []string{"fit", "testdata/never-binds.yaml", "--top", "2"}, ExitOK},
		{"fit-err-series", []string{"fit", "example:feedback", "--series", "E25"}, ExitBadInput},
		{"fit-err-top", []string{"fit", "example:feedback", "--top", "0"}, ExitBadInput},
		{"fit-err-method", []string{"fit", "example:feedback", "--method", "fast"}, ExitBadInput},
		{"fit-err-absurd", []string{"fit", "testdata/absurd.yaml"}, ExitBadInput},
		{"fit-err-missing", []string{"fit", "testdata/no-such-file.yaml"}, ExitBadInput},
		{"divider-table", []string{"divider", "--vin", "3.3", "--vout", "0.8", "--series", "E96", "--max-current", "100u", "--top", "5", "--workers", "1"}, ExitOK},
		{"divider-load-json", []string{"divider", "--vin", "12", "--vout", "2.5", "--load", "100k", "--tolerance", "1%", "--top", "2", "--format", "json", "--workers", "1"}, ExitOK},
		{"divider-err-vout", []string{"divider", "--vin", "3.3", "--vout", "5"}, ExitBadInput},
		{"divider-err-missing", []string{"divider", "--vin", "3.3"}, ExitBadInput},
		{"divider-err-combine", []string{"divider", "--vin", "3.3", "--vout", "1", "--combine", "both"}, ExitBadInput},
		{"feedback-table", []string{"feedback", "--vref", "0.8", "--vout", "3.3", "--series", "E96", "--bias-current", "20n", "--top", "5", "--workers", "1"}, ExitOK},
		{"feedback-err-vout", []string{"feedback", "--vref", "1.25", "--vout", "1"}, ExitBadInput},
		{"combine-table", []string{"combine", "4.32k"}, ExitOK},
		{"combine-three", []string{"combine", "1R5", "--series", "E12", "--min", "1", "--max", "100", "--max-parts", "3", "--top", "5"}, ExitOK},
		{"combine-json", []string{"combine", "4k32", "--top", "3", "--format", "json"}, ExitOK},
		{"combine-err-parts", []string{"combine", "4.32k", "--max-parts", "4"}, ExitBadInput},
		{"combine-err-value", []string{"combine", "0"}, ExitBadInput},
		{"combine-err-code", []string{"combine", "4k7k"}, ExitBadInput},
		{"combine-err-negative", []string{"combine", "-4.7k"}, ExitBadInput},
		{"fit-err-top-huge", []string{"fit", "example:feedback", "--top", "99999999999"}, ExitBadInput},
		{"fit-err-time-unit", []string{"fit", "example:feedback", "--time-limit", "5"}, ExitBadInput},
		{"fit-err-time-limit", []string{"fit", "example:feedback", "--time-limit", "1ns", "--workers", "1"}, ExitBadInput},
		{"fit-err-same-output", []string{"fit", "example:divider", "-o", "same.csv", "--bom", "same.csv"}, ExitBadInput},

		// real parts: check, and fit's --check and --robust
		// A ±3 % band that 1 % parts leave at a corner: the report, and exit 1.
		{"check-divider", []string{"check", "testdata/check-divider.yaml", "--samples", "2000", "--seed", "3"}, ExitNoSolution},
		{"check-divider-json", []string{"check", "testdata/check-divider.yaml", "--samples", "500", "--dist", "normal", "--format", "json"}, ExitNoSolution},
		{"check-pass", []string{"check", "testdata/check-pass.yaml", "--samples", "500"}, ExitOK},
		{"check-hv-package", []string{"check", "testdata/check-hv.yaml", "--samples", "500", "--max-package", "0603"}, ExitNoSolution},
		{"check-fitted", []string{"check", "example:feedback", "--samples", "1000", "--ambient", "0..70"}, ExitOK},
		{"check-err-dist", []string{"check", "testdata/check-divider.yaml", "--dist", "gauss"}, ExitBadInput},
		{"check-err-ambient", []string{"check", "testdata/check-divider.yaml", "--ambient", "70..0"}, ExitBadInput},
		{"check-err-package", []string{"check", "testdata/check-divider.yaml", "--max-package", "0604"}, ExitBadInput},
		{"check-err-bom", []string{"check", "testdata/check-divider.yaml", "--bom", "parts.txt"}, ExitBadInput},
		{"check-err-one-sample", []string{"check", "example:divider", "--samples", "1", "--seed", "1"}, ExitBadInput},
		{"check-err-rank", []string{"check", "testdata/one-design.yaml", "--rank", "2"}, ExitBadInput},
		{"fit-err-bom-rank", []string{"fit", "testdata/one-design.yaml", "--bom", "never-written.csv", "--rank", "2"}, ExitBadInput},
		{"check-err-overwrite", []string{"check", "testdata/check-stock.yaml", "--samples", "0", "--bom", "testdata/check-stock.csv"}, ExitBadInput},
		{"fit-robust", []string{"fit", "example:feedback", "--robust", "--top", "5", "--workers", "1"}, ExitOK},
		{"fit-check", []string{"fit", "example:divider", "--check", "--top", "3", "--workers", "1"}, ExitOK},

		// board
		{"board-controller", []string{"board", "example:controller"}, ExitOK},
		{"board-controller-json", []string{"board", "example:controller", "--format", "json"}, ExitOK},
		{"board-two-csv", []string{"board", "testdata/board/two.yaml", "--format", "csv"}, ExitOK},
		{"board-two", []string{"board", "testdata/board/two.yaml"}, ExitOK},
		{"board-two-fixed", []string{"board", "testdata/board/two-fixed.yaml"}, ExitOK},
		{"board-unmet", []string{"board", "testdata/board/unmet.yaml"}, ExitNoSolution},
		{"board-err-missing-template", []string{"board", "testdata/board/missing-template.yaml"}, ExitBadInput},
		{"board-err-bad-template", []string{"board", "testdata/board/bad-template.yaml"}, ExitBadInput},
		{"board-err-duplicate-prefix", []string{"board", "testdata/board/duplicate-prefix.yaml"}, ExitBadInput},
		{"board-err-no-error-max", []string{"board", "testdata/board/no-error-max.yaml"}, ExitBadInput},
		{"board-err-missing", []string{"board", "testdata/board/no-such-board.yaml"}, ExitBadInput},
		{"board-err-example", []string{"board", "example:controler"}, ExitBadInput},
		{"board-err-overwrite", []string{"board", "testdata/board/stocked-board.yaml", "--bom", "testdata/board/drawer.csv"}, ExitBadInput},
		{"board-err-bom", []string{"board", "testdata/board/two.yaml", "--bom", "parts.txt"}, ExitBadInput},
		{"board-err-format", []string{"board", "testdata/board/two.yaml", "--format", "xml"}, ExitBadInput},
		{"board-err-time-limit", []string{"board", "example:controller", "--time-limit", "1ns"}, ExitBadInput},
		{"board-err-time-limit-unit", []string{"board", "example:controller", "--time-limit", "5"}, ExitBadInput},

		// examples
		{"examples-list", []string{"examples"}, ExitOK},
		{"examples-err-unknown", []string{"examples", "brigde"}, ExitBadInput},

		// the root command
		{"root-help", []string{}, ExitOK},
		{"root-err-command", []string{"valeus", "E24"}, ExitBadInput},
		{"help-err-topic", []string{"help", "fitt"}, ExitBadInput},
		{"help-solve", []string{"help", "solve"}, ExitOK},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			out, errOut, code := runCLI(t, tc.args...)
			if code != tc.code {
				t.Errorf("exit code %d, want %d (stderr: %q)", code, tc.code, errOut)
			}
			if code == ExitBadInput && strings.Count(errOut, "\n") != 1 {
				t.Errorf("stderr should be exactly one line, got %q", errOut)
			}
			checkLabels(t, code, errOut)
			golden(t, tc.name, fmt.Sprintf("$ ohmfit %s\nexit %d\n--- stdout\n%s--- stderr\n%s",
				strings.Join(tc.args, " "), code, out, errOut))
		})
	}
}

// TestExampleVerbatim checks that `ohmfit examples NAME` prints the stored
// text byte for byte, so that redirecting it to a file gives a usable copy,
// and that every example loads.
func TestExampleVerbatim(t *testing.T) {
	names := examples.Names()
	if len(names) == 0 {
		t.Fatal("no built-in examples")
	}
	for _, name := range names {
		t.Run(name, func(t *testing.T) {
			out, errOut, code := runCLI(t, "examples", name)
			want, _ := examples.Get(name)
			if code != ExitOK || errOut != "" || out != string(want) {
				t.Errorf("exit %d, stderr %q, stdout differs from the stored text: %v", code, errOut, out != string(want))
			}
			if _, err := loadTemplate(examplePrefix+name, nil); err != nil {
				t.Errorf("example does not load: %v", err)
			}
		})
	}
}

// TestVersion checks --version without a golden file: the Go release in it
// changes with the toolchain.
func TestVersion(t *testing.T) {
	for _, arg := range []string{"--version", "-v"} {
		t.Run(arg, func(t *testing.T) {
			out, errOut, code := runCLI(t, arg)
			if code != ExitOK || errOut != "" || !strings.HasPrefix(out, "ohmfit dev") || strings.Count(out, "\n") != 1 {
				t.Errorf("%s: exit %d, stdout %q, stderr %q", arg, code, out, errOut)
			}
		})
	}
}

// TestPercent checks the percentage form used by the --near table.
func TestPercent(t *testing.T) {
	cases := []struct {
		in   float64
		want string
	}{
		{-0.00462963, "-0.463%"},
		{0.0880, "+8.80%"},
		{0.5, "+50.0%"},
		{2, "+200%"},
		{0, "±0%"},
		{1.5e-6, "+0.000150%"},
	}
	for _, c := range cases {
		t.Run(c.want, func(t *testing.T) {
			if got := percent(c.in); got != c.want {
				t.Errorf("percent(%v) = %q, want %q", c.in, got, c.want)
			}
		})
	}
}

// TestDidYouMean checks the typo suggestions in messages.
func TestDidYouMean(t *testing.T) {
	cands := []string{"values", "solve", "examples", "help"}
	cases := []struct{ word, want string }{
		{"valeus", ` (did you mean "values"?)`},
		{"SOLVE", ` (did you mean "solve"?)`},
		{"exmaples", ` (did you mean "examples"?)`},
		{"zzz", ""},
		{"x", ""},
	}
	for _, c := range cases {
		t.Run(c.word, func(t *testing.T) {
			if got := didYouMean(c.word, cands); got != c.want {
				t.Errorf("didYouMean(%q) = %q, want %q", c.word, got, c.want)
			}
		})
	}
}

// TestObjectOrder checks that JSON objects keep their key order and that a
// figure that is not a finite number is written null (JSON has no NaN or
// infinity), so every format tells the same story.
func TestObjectOrder(t *testing.T) {
	var b bytes.Buffer
	if err := writeJSON(&b, object{{"z", 1.5}, {"a", object{{"m", "x<y"}}}}); err != nil {
		t.Fatal(err)
	}
	if want := "{\n  \"z\": 1.5,\n  \"a\": {\n    \"m\": \"x<y\"\n  }\n}\n"; b.String() != want {
		t.Errorf("got %q, want %q", b.String(), want)
	}
	b.Reset()
	if err := writeJSON(&b, object{{"v", math.NaN()}, {"w", math.Inf(-1)}, {"x", 2.0}}); err != nil {
		t.Fatal(err)
	}
	if want := "{\n  \"v\": null,\n  \"w\": null,\n  \"x\": 2\n}\n"; b.String() != want {
		t.Errorf("non-finite: got %q, want %q", b.String(), want)
	}
}

// TestTidy checks that only residue next to a large value is shown as zero.
func TestTidy(t *testing.T) {
	cases := []struct{ v, scale, want float64 }{
		{1e-19, 0.01, 0},
		{-2e-16, 5, 0},
		{1e-9, 5, 1e-9},
		{1e-15, 0, 1e-15}, // nothing to compare with: keep it
		{0, 0, 0},
	}
	for _, c := range cases {
		t.Run(fmt.Sprint(c.v, " ", c.scale), func(t *testing.T) {
			if got := tidy(c.v, c.scale); got != c.want {
				t.Errorf("tidy(%g, %g) = %g, want %g", c.v, c.scale, got, c.want)
			}
		})
	}
}

// TestPowerBalance checks the property the solve table's last line shows:
// the power the resistors dissipate is the power the sources and op-amp
// outputs deliver (Tellegen's theorem), in every condition.
func TestPowerBalance(t *testing.T) {
	for _, file := range []string{"testdata/bench.yaml", "testdata/preamp.yaml", "testdata/bridge-balanced.yaml"} {
		t.Run(file, func(t *testing.T) {
			tpl, err := loadTemplate(file, nil)
			if err != nil {
				t.Fatal(err)
			}
			results, err := analyzeAll(tpl)
			if err != nil {
				t.Fatalf("%s: %v", file, err)
			}
			for _, r := range results {
				sum := 0.0
				for _, p := range r.sol.Parts {
					sum += p.Watts
				}
				if math.Abs(sum) > 1e-12*r.sol.ResistorPower {
					t.Errorf("%s, %s: watts absorbed sum to %g, want 0 (resistors %g)", file, r.name, sum, r.sol.ResistorPower)
				}
			}
		})
	}
}

// checkLabels checks the promise of the stderr labels: every line carries
// one of them, and the last line of a failed run says how it failed (error:
// for exit 2, not met: for exit 1), while a successful run has neither.
func checkLabels(t *testing.T, code ExitCode, stderr string) {
	t.Helper()
	if stderr == "" {
		if code != ExitOK {
			t.Errorf("exit %d with nothing on stderr", code)
		}
		return
	}
	lines := strings.Split(strings.TrimSuffix(stderr, "\n"), "\n")
	for i, l := range lines {
		// Library errors reach people through constraints.Message, without
		// the package names Go errors carry.
		for _, pkg := range []string{"eseries: ", "units: ", "solver: ", "constraints: ", "sensors: ", "ratings: ", "synth: ", "variation: ", "board: "} {
			if strings.Contains(l, pkg) {
				t.Errorf("stderr shows a package name %q: %q", pkg, l)
			}
		}
		var label string
		for _, lb := range []string{errorLabel, notMetLabel, cautionLabel, warningLabel, noteLabel} {
			if strings.HasPrefix(l, lb) {
				label = lb
			}
		}
		last := i == len(lines)-1
		switch {
		case label == "":
			t.Errorf("stderr line without a label: %q", l)
		case label == errorLabel && !(last && code == ExitBadInput):
			t.Errorf("exit %d: error line %q", code, l)
		case label == notMetLabel && !(last && code == ExitNoSolution):
			t.Errorf("exit %d: not-met line %q", code, l)
		case last && code == ExitBadInput && label != errorLabel,
			last && code == ExitNoSolution && label != notMetLabel:
			t.Errorf("exit %d ends with %q", code, l)
		}
	}
}

// TestLoadText: a part's load as a whole percentage, and a huge overload in
// powers of ten, not 23 digits.
func TestLoadText(t *testing.T) {
	for _, c := range []struct {
		f    float64
		want string
	}{{0.5, "50%"}, {1.234, "123%"}, {9999.99, "999999%"}, {2.6315789e20, "2.6e+22%"}} {
		t.Run(c.want, func(t *testing.T) {
			if got := loadText(c.f); got != c.want {
				t.Errorf("loadText(%g) = %q, want %q", c.f, got, c.want)
			}
		})
	}
}
