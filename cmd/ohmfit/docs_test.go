package main

import (
	"bytes"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"runtime"
	"slices"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/synth"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// The documentation is part of what the program promises: every example in
// every --help must run as written, and every `$ ohmfit …` block in the
// README must print what the README shows.

// scoredCount matches the candidate count in a summary line; with several
// workers the count of candidates scored before the proof closes varies
// from run to run, as the README says.
var scoredCount = regexp.MustCompile(`evaluated [0-9,]+, solves [0-9,]+`)

// normaliseRun blanks what varies between runs: search times and how many
// candidates were scored on the way to the same proven answer.
func normaliseRun(s string) string {
	return scoredCount.ReplaceAllString(normaliseTiming(s), "evaluated N, solves N")
}

// readmeBlock is one `$ ohmfit …` block of the README with the output shown
// under it.
type readmeBlock struct {
	line int
	args []string
	want string
}

// readmeBlocks finds every fenced block that starts with `$ ohmfit`.
func readmeBlocks(t *testing.T, text string) []readmeBlock {
	t.Helper()
	var out []readmeBlock
	lines := strings.Split(text, "\n")
	for i := 0; i < len(lines); i++ {
		if lines[i] != "```" || i+1 >= len(lines) || !strings.HasPrefix(lines[i+1], "$ ohmfit ") {
			continue
		}
		b := readmeBlock{line: i + 2, args: strings.Fields(strings.TrimPrefix(lines[i+1], "$ ohmfit "))}
		var want []string
		for i += 2; i < len(lines) && lines[i] != "```"; i++ {
			want = append(want, lines[i])
		}
		b.want = strings.Join(want, "\n") + "\n"
		out = append(out, b)
	}
	return out
}

// TestREADMECommands runs every `$ ohmfit …` block of the README from the
// repository root and compares its standard output with the README's. Files
// a block writes (--bom, --plot, -o) go to a temporary directory, so the
// test never touches a tracked file.
func TestREADMECommands(t *testing.T) {
	root, err := filepath.Abs(filepath.Join("..", ".."))
	if err != nil {
		t.Fatal(err)
	}
	text, err := os.ReadFile(filepath.Join(root, "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	blocks := readmeBlocks(t, string(text))
	if len(blocks) < 10 {
		t.Fatalf("found %d `$ ohmfit` blocks in README.md; the tour has more", len(blocks))
	}
	tmp := t.TempDir()
	t.Chdir(root)
	for _, b := range blocks {
		t.Run(strings.Join(b.args, " "), func(t *testing.T) {
			args := append([]string(nil), b.args...)
			for i := 0; i+1 < len(args); i++ {
				switch args[i] {
				case "--bom", "--plot", "-o", "--output":
					args[i+1] = filepath.Join(tmp, filepath.Base(args[i+1]))
				}
			}
			var out, errOut bytes.Buffer
			code := run(args, strings.NewReader(""), &out, &errOut)
			if code == ExitBadInput {
				t.Fatalf("README.md:%d: exit 2: %s", b.line, errOut.String())
			}
			if got := normaliseRun(out.String()); got != normaliseRun(b.want) {
				t.Errorf("README.md:%d: output differs\n--- got\n%s--- README\n%s", b.line, out.String(), b.want)
			}
		})
	}
}

// helpExamples lists every command of the tree with the command lines its
// Example text gives (comments and blank lines left out).
func helpExamples(root *cobra.Command) map[string][]string {
	out := map[string][]string{}
	var walk func(c *cobra.Command)
	walk = func(c *cobra.Command) {
		for _, l := range strings.Split(c.Example, "\n") {
			l = strings.TrimSpace(l)
			if l != "" && !strings.HasPrefix(l, "#") {
				out[c.CommandPath()] = append(out[c.CommandPath()], l)
			}
		}
		for _, s := range c.Commands() {
			walk(s)
		}
	}
	walk(root)
	return out
}

// TestHelpExamplesRun builds the binary and runs every example of every
// command's help with bash, as a user would paste it, in an empty
// directory (one per command, so a line can use the file an earlier line
// wrote). Each must exit 0.
func TestHelpExamplesRun(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the binary; skipped under -short")
	}
	if _, err := exec.LookPath("bash"); err != nil {
		t.Skip("no bash to run the examples with")
	}
	bin := t.TempDir()
	build := exec.Command("go", "build", "-o", filepath.Join(bin, "ohmfit"), ".")
	if out, err := build.CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	root := newRootCmd(strings.NewReader(""), &bytes.Buffer{}, &bytes.Buffer{})
	examples := helpExamples(root)
	if len(examples) < 8 {
		t.Fatalf("only %d commands have examples", len(examples))
	}
	for path, lines := range examples {
		t.Run(path, func(t *testing.T) {
			dir := t.TempDir()
			for _, l := range lines {
				cmd := exec.Command("bash", "-c", l)
				cmd.Dir = dir
				cmd.Env = append(os.Environ(), "PATH="+bin+string(os.PathListSeparator)+os.Getenv("PATH"))
				var stdout, stderr bytes.Buffer
				cmd.Stdout, cmd.Stderr = &stdout, &stderr
				if err := cmd.Run(); err != nil {
					t.Errorf("%q: %v\n%s", l, err, stderr.String())
					continue
				}
				if stdout.Len() == 0 && !strings.Contains(l, ">") && !strings.Contains(l, " -o ") {
					t.Errorf("%q printed nothing", l)
				}
			}
		})
	}
}

// TestCompletion asks the completion machinery what it offers, as the
// shell scripts do (the hidden __complete command), and checks the help
// of the completion command itself.
func TestCompletion(t *testing.T) {
	cases := []struct {
		args      []string
		want, not []string
	}{
		{[]string{"__complete", "fit", "example:"}, []string{"example:feedback", "example:bias-bench"}, nil},
		{[]string{"__complete", "check", "ex"}, []string{"example:bias-bench"}, nil},
		{[]string{"__complete", "examples", ""}, []string{"feedback"}, nil},
		{[]string{"__complete", "fit", "x.yaml", "--series", ""}, []string{"E24", "E192"}, nil},
		{[]string{"__complete", "values", ""}, []string{"E3", "E96"}, nil},
		{[]string{"__complete", "fit", "x.yaml", "--format", ""}, []string{"table", "json", "csv"}, nil},
		{[]string{"__complete", "check", "x.yaml", "--format", ""}, []string{"table", "json"}, []string{"csv"}},
		{[]string{"__complete", "fit", "x.yaml", "--method", ""}, []string{"auto", "bound", "exhaustive", "heuristic"}, nil},
		{[]string{"__complete", "completion", ""}, []string{"bash", "zsh", "fish", "powershell"}, nil},
		{[]string{"help", "completion", "bash"}, []string{"press Tab", "ohmfit completion bash > ohmfit.bash"}, []string{"autocompletion", "Generate the"}},
		{[]string{"completion", "bash"}, []string{"bash completion"}, nil},
	}
	for _, c := range cases {
		t.Run(strings.Join(c.args, " "), func(t *testing.T) {
			out, errOut, code := runCLI(t, c.args...)
			if code != ExitOK {
				t.Fatalf("exit %d: %s", code, errOut)
			}
			lines := strings.Split(out, "\n")
			for _, w := range c.want {
				if !slices.ContainsFunc(lines, func(l string) bool { return strings.Contains(l, w) }) {
					t.Errorf("missing %q in\n%s", w, out)
				}
			}
			for _, w := range c.not {
				if slices.Contains(lines, w) || (len(w) > 4 && strings.Contains(out, w)) {
					t.Errorf("%q should not be offered:\n%s", w, out)
				}
			}
		})
	}
	if _, errOut, code := runCLI(t, "help", "completion", "bsh"); code != ExitBadInput || !strings.Contains(errOut, `did you mean "bash"`) {
		t.Errorf("help completion bsh: exit %d, %q", code, errOut)
	}
}

// placeholder is what a flag's help shows for its value: upper case, with
// digits and the punctuation of FILE.csv, K/N and MIN..MAX.
var placeholder = regexp.MustCompile(`^[A-Z][A-Z0-9]*([./][A-Za-z0-9.]+)*$`)

// TestFlagPlaceholders walks every flag of every command: the word its help
// shows for the value is an upper-case placeholder, and no backtick is left
// in the text (cobra turns the first backticked word into the placeholder,
// so a second one would print garbled).
func TestFlagPlaceholders(t *testing.T) {
	root := newRootCmd(strings.NewReader(""), &bytes.Buffer{}, &bytes.Buffer{})
	var walk func(c *cobra.Command)
	walk = func(c *cobra.Command) {
		c.Flags().VisitAll(func(f *pflag.Flag) {
			name, usage := pflag.UnquoteUsage(f)
			if f.Value.Type() != "bool" && !placeholder.MatchString(name) {
				t.Errorf("%s --%s: placeholder %q is not an upper-case word", c.CommandPath(), f.Name, name)
			}
			if strings.Contains(usage, "`") {
				t.Errorf("%s --%s: a backtick is left in %q", c.CommandPath(), f.Name, usage)
			}
		})
		for _, s := range c.Commands() {
			walk(s)
		}
	}
	walk(root)
}

// TestGlossaryCoversOutput holds the template reference to the output: every
// status a search can end with is in its status list, every --method word
// and every JSON key that carries a number (or a pass/fail) is named there in
// backticks, so a key added without its unit fails here.
func TestGlossaryCoversOutput(t *testing.T) {
	text, err := os.ReadFile(filepath.Join("..", "..", "constraints", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	doc := string(text)
	for s := synth.Proven; s <= synth.Partial; s++ {
		if !strings.Contains(doc, "| `"+s.String()+"` |") {
			t.Errorf("status %q is not in the status list", s)
		}
	}
	for _, m := range synth.MethodNames {
		if !strings.Contains(doc, "`"+m+"`") {
			t.Errorf("--method %s is not in the glossary", m)
		}
	}
	// Keys whose members are names (of parts, positions, nodes), not keys.
	named := map[string]bool{"values": true, "parts": true, "combine": true, "nodes": true, "sensitivities": true}
	runs := [][]string{
		{"fit", "example:feedback", "--top", "2", "--tradeoffs", "1%", "--format", "json", "--workers", "1"},
		{"fit", "example:feedback", "--top", "2", "--robust", "--check", "--format", "json", "--workers", "1"},
		{"check", "example:battery-sense", "--samples", "50", "--format", "json"},
		{"check", "testdata/check-divider.yaml", "--samples", "50", "--ambient", "0..70", "--format", "json"},
		{"check", "testdata/check-heated.yaml", "--samples", "50", "--format", "json"},
		{"check", "example:cold-chain", "--samples", "50", "--format", "json"},
		{"solve", "example:bias-bench", "--format", "json"},
		{"combine", "1R5", "--max-parts", "3", "--series", "E12", "--min", "1", "--max", "100", "--format", "json"},
		{"values", "E24", "--near", "4.32k", "--format", "json"},
		{"board", "testdata/board/two.yaml", "--format", "json"},
	}
	for _, args := range runs {
		t.Run(strings.Join(args, " "), func(t *testing.T) {
			out, errOut, code := runCLI(t, args...)
			if code == ExitBadInput {
				t.Fatalf("exit 2: %s", errOut)
			}
			var v any
			if err := json.Unmarshal([]byte(out), &v); err != nil {
				t.Fatal(err)
			}
			var walk func(parent string, v any)
			walk = func(parent string, v any) {
				switch x := v.(type) {
				case map[string]any:
					for k, m := range x {
						if !named[parent] {
							switch m.(type) {
							case float64, bool:
								if !strings.Contains(doc, "`"+k+"`") && !strings.Contains(doc, "."+k+"`") {
									t.Errorf("JSON key %q (in %q) is not in constraints/README.md", k, parent)
								}
							}
						}
						walk(k, m)
					}
				case []any:
					for _, m := range x {
						walk(parent+"[]", m) // a list of records, not of names
					}
				}
			}
			walk("", v)
		})
	}
}

// TestVersionFromBuildInfo: --version reads the binary's build information
// (the Go release it was built with, the module version or VCS revision
// when the build recorded them) rather than a hard-coded string.
func TestVersionFromBuildInfo(t *testing.T) {
	out, _, code := runCLI(t, "--version")
	if code != ExitOK || !strings.HasPrefix(out, "ohmfit ") || !strings.Contains(out, runtime.Version()) {
		t.Errorf("--version: exit %d, %q; want \"ohmfit VERSION (%s…)\"", code, out, runtime.Version())
	}
}
