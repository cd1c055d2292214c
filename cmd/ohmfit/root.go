package main

import (
	"io"
	"os"
	"runtime/debug"
	"slices"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
	"golang.org/x/term"
)

// version is the release this binary was built as; release builds set it with
// -ldflags "-X main.version=v1.2.3".
var version = "dev"

// versionString is what --version prints after "ohmfit ": the release, and
// from the build information the module version (for `go install …@v1.2.3`),
// the Go release and the source revision when they are known.
func versionString() string {
	v := version
	info, ok := debug.ReadBuildInfo()
	if !ok {
		return v
	}
	if v == "dev" && info.Main.Version != "" && info.Main.Version != "(devel)" {
		v = info.Main.Version
	}
	extra := []string{info.GoVersion}
	var rev, dirty string
	for _, s := range info.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.modified":
			if s.Value == "true" {
				dirty = "+changes"
			}
		}
	}
	if rev != "" {
		extra = append(extra, "rev "+rev[:min(len(rev), 12)]+dirty)
	}
	return v + " (" + strings.Join(extra, ", ") + ")"
}

// helpTemplate is our own help layout: what the command does, how to call
// it, its options, then worked examples.
const helpTemplate = `{{with (or .Long .Short)}}{{. | trimTrailingWhitespaces}}

{{end}}{{if or .Runnable .HasSubCommands}}{{.UsageString}}{{end}}`

// usageTemplate is the part of the help that describes the call itself.
const usageTemplate = `Call:
  {{if .HasAvailableSubCommands}}{{.CommandPath}} COMMAND [options]{{else}}{{.UseLine}}{{end}}
{{- if .HasAvailableSubCommands}}

Commands:
{{- range .Commands}}{{if .IsAvailableCommand}}
  {{rpad .Name .NamePadding}}  {{.Short}}{{end}}{{end}}
{{- end}}
{{- if .HasAvailableLocalFlags}}

Options:
{{.LocalFlags.FlagUsages | trimTrailingWhitespaces}}
{{- end}}
{{- if .HasAvailableInheritedFlags}}

Options for every command:
{{.InheritedFlags.FlagUsages | trimTrailingWhitespaces}}
{{- end}}
{{- if .HasExample}}

Example:
{{.Example}}
{{- end}}
{{- if .HasAvailableSubCommands}}

Run ` + "`ohmfit help COMMAND`" + ` for one command's options and examples.
{{- end}}
`

// newRootCmd builds the whole command tree, writing to the given streams.
func newRootCmd(stdin io.Reader, stdout, stderr io.Writer) *cobra.Command {
	root := &cobra.Command{
		Use:   "ohmfit",
		Short: "Choose standard resistor values that meet electrical goals",
		Long: `ohmfit chooses standard (IEC 60063, E3 … E192) resistor values for a network
whose shape is already decided, so that its voltages, currents and power meet
the goals written in a template, and analyses networks whose values are known.

A template is a small YAML file; ` + "`ohmfit examples`" + ` lists the built-in ones.`,
		Example: `  ohmfit values E96 --near 4.32k
  ohmfit examples
  ohmfit solve example:bias-bench`,
		Version:       versionString(),
		SilenceUsage:  true,
		SilenceErrors: true,
		// With Args set, cobra hands an unknown command name to RunE instead
		// of building its own multi-line message; we write a one-line one.
		Args: cobra.ArbitraryArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			if len(args) == 0 {
				return cmd.Help()
			}
			return unknownCommand(cmd, args[0])
		},
	}
	root.SetIn(stdin)
	root.SetOut(stdout)
	root.SetErr(stderr)
	root.SetVersionTemplate("ohmfit {{.Version}}\n")
	root.SetHelpTemplate(helpTemplate)
	root.SetUsageTemplate(usageTemplate)
	root.SetFlagErrorFunc(flagError)
	// Our own completion command replaces the library's stock one.
	root.CompletionOptions.DisableDefaultCmd = true
	root.Flags().BoolP("version", "v", false, "print the version and exit")
	root.PersistentFlags().BoolP("help", "h", false, "show help for the command")

	root.SetHelpCommand(newHelpCmd(root))
	root.AddCommand(
		newValuesCmd(stdout, stderr),
		newSolveCmd(stdout, stderr),
		newExamplesCmd(stdout, stderr),
		newFitCmd(stdout, stderr, isTerminal(stderr)),
		newDividerCmd(stdout, stderr, isTerminal(stderr)),
		newFeedbackCmd(stdout, stderr, isTerminal(stderr)),
		newCombineCmd(stdout, stderr),
		newCheckCmd(stdout, stderr),
		newMergeCmd(stdout, stderr),
		newCompletionCmd(root, stdout),
		newBoardCmd(stdout, stderr),
	)
	addCompletions(root)
	for _, c := range root.Commands() {
		// Each Use line spells out its options; cobra would append "[flags]".
		c.DisableFlagsInUseLine = true
	}
	return root
}

// isTerminal reports whether w is a terminal, where a progress bar helps;
// anywhere else (a file, a pipe, a test buffer) it would be noise.
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	return ok && term.IsTerminal(int(f.Fd()))
}

// unknownCommand is the usage error for a command name that does not exist,
// with a suggestion when the name is a likely typo.
func unknownCommand(root *cobra.Command, name string) error {
	var names []string
	for _, c := range root.Commands() {
		if c.IsAvailableCommand() || c.Name() == "help" {
			names = append(names, c.Name())
		}
	}
	return usagef("ohmfit", "unknown command %q%s", name, didYouMean(name, names))
}

// newHelpCmd replaces cobra's help command so that an unknown topic is a
// usage error (exit 2) rather than a page of help with exit 0.
func newHelpCmd(root *cobra.Command) *cobra.Command {
	return &cobra.Command{
		Use: "help [COMMAND [ARGUMENT]]",
		// cobra adds the help command after our loop over the others.
		DisableFlagsInUseLine: true,
		Short:                 "Show help for ohmfit or one of its commands",
		Example: `  ohmfit help solve
  ohmfit values --help`,
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) > 2 {
				return usagef("ohmfit help", "help takes a command name and at most one of its arguments, got %d words", len(args))
			}
			return nil
		},
		ValidArgsFunction: cobra.NoFileCompletions,
		RunE: func(cmd *cobra.Command, args []string) error {
			if len(args) == 0 {
				return root.Help()
			}
			c, rest, err := root.Find(args)
			if err != nil || c == root {
				return unknownCommand(root, args[0])
			}
			// "help completion bash": an argument the command knows reads as
			// a question about the command.
			if len(rest) > 0 && !slices.Contains(c.ValidArgs, rest[0]) {
				return usagef("ohmfit help", "%s has no subcommand or argument %q%s", c.CommandPath(), rest[0], didYouMean(rest[0], c.ValidArgs))
			}
			return c.Help()
		},
	}
}

// checkFormat returns a usage error unless format is one of allowed.
func checkFormat(cmd *cobra.Command, format string, allowed ...string) error {
	for _, a := range allowed {
		if format == a {
			return nil
		}
	}
	return usagef(cmd.CommandPath(), "--format must be %s, not %q", orList(allowed), format)
}

// orList writes "a, b or c".
func orList(items []string) string {
	if len(items) < 2 {
		return strings.Join(items, "")
	}
	return strings.Join(items[:len(items)-1], ", ") + " or " + items[len(items)-1]
}

// argsExactly returns an argument check that wants n arguments and explains
// what they are (what) when the count is wrong.
func argsExactly(n int, what string) cobra.PositionalArgs {
	return func(cmd *cobra.Command, args []string) error {
		if len(args) != n {
			return usagef(cmd.CommandPath(), "%s takes %s, got %s", cmd.Name(), what, countWords(len(args)))
		}
		return nil
	}
}

// argsAtMost is argsExactly for an optional argument.
func argsAtMost(n int, what string) cobra.PositionalArgs {
	return func(cmd *cobra.Command, args []string) error {
		if len(args) > n {
			return usagef(cmd.CommandPath(), "%s takes %s, got %s", cmd.Name(), what, countWords(len(args)))
		}
		return nil
	}
}

// countWords writes an argument count for a message.
func countWords(n int) string {
	if n == 0 {
		return "none"
	}
	return counted(n, "argument", "arguments")
}

// changed reports whether the user set the named flag.
func changed(fs *pflag.FlagSet, name string) bool {
	f := fs.Lookup(name)
	return f != nil && f.Changed
}
