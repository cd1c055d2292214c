package main

import (
	"io"
	"strings"

	"github.com/ohmfit/ohmfit/constraints/examples"
	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/synth"
	"github.com/spf13/cobra"
)

// completionShells are the shells `ohmfit completion` writes a script for.
var completionShells = []string{"bash", "zsh", "fish", "powershell"}

// newCompletionCmd builds `ohmfit completion SHELL`, in place of the CLI
// library's stock command, so that its help is ours and `ohmfit help
// completion bash` works like any other help.
func newCompletionCmd(root *cobra.Command, out io.Writer) *cobra.Command {
	return &cobra.Command{
		Use:   "completion SHELL",
		Short: "Write a tab-completion script for bash, zsh, fish or powershell",
		Long: `Write a script to standard output that teaches SHELL to complete ohmfit's
command names, options, built-in example names (example:NAME), series
names and output formats when you press Tab.

Save it where your shell reads completion scripts at start-up, or load it
into the running shell (bash: source ohmfit.bash). The script asks ohmfit
itself for the candidates, so it stays right after an upgrade.`,
		Example: `  # for bash: then "source ohmfit.bash", or add that line to ~/.bashrc
  ohmfit completion bash > ohmfit.bash

  # for zsh: put _ohmfit in a directory of your own on $fpath
  ohmfit completion zsh > _ohmfit`,
		Args:              argsExactly(1, "one argument, the shell ("+orList(completionShells)+")"),
		ValidArgs:         completionShells,
		ValidArgsFunction: cobra.FixedCompletions(completionShells, cobra.ShellCompDirectiveNoFileComp),
		RunE: func(cmd *cobra.Command, args []string) error {
			switch args[0] {
			case "bash":
				return root.GenBashCompletionV2(out, true)
			case "zsh":
				return root.GenZshCompletion(out)
			case "fish":
				return root.GenFishCompletion(out, true)
			case "powershell":
				return root.GenPowerShellCompletionWithDesc(out)
			}
			return usagef(cmd.CommandPath(), "no completion for shell %q; want %s%s", args[0], orList(completionShells),
				didYouMean(args[0], completionShells))
		},
	}
}

// exampleArgs lists example:NAME for every built-in example.
func exampleArgs() []string {
	var out []string
	for _, n := range examples.Names() {
		out = append(out, "example:"+n)
	}
	return out
}

// completeTemplate completes a FILE argument: the built-in examples and,
// through the shell, file names.
func completeTemplate(_ *cobra.Command, args []string, toComplete string) ([]string, cobra.ShellCompDirective) {
	if len(args) > 0 {
		return nil, cobra.ShellCompDirectiveNoFileComp
	}
	var out []string
	for _, e := range exampleArgs() {
		if strings.HasPrefix(e, toComplete) {
			out = append(out, e)
		}
	}
	return out, cobra.ShellCompDirectiveDefault
}

// addCompletions registers completion for every command's arguments and
// for the flags whose values come from a fixed list: series, formats,
// methods and distributions. The format words are read from each --format
// flag's own help, so that they are never a second list to keep in step.
func addCompletions(root *cobra.Command) {
	var walk func(c *cobra.Command)
	walk = func(c *cobra.Command) {
		if strings.Contains(c.Use, " FILE") && c.ValidArgsFunction == nil {
			c.ValidArgsFunction = completeTemplate
		}
		if strings.HasPrefix(c.Use, "values SERIES") {
			c.ValidArgsFunction = cobra.FixedCompletions(eseries.Names(), cobra.ShellCompDirectiveNoFileComp)
		}
		fixed := map[string][]string{
			"series": eseries.Names(),
			"method": synth.MethodNames,
			"dist":   {"uniform", "normal"},
		}
		if f := c.Flags().Lookup("format"); f != nil {
			var formats []string
			for _, w := range []string{"table", "json", "csv"} {
				if strings.Contains(f.Usage, w) {
					formats = append(formats, w)
				}
			}
			fixed["format"] = formats
		}
		for name, words := range fixed {
			if c.Flags().Lookup(name) != nil {
				// It fails only for a flag registered twice; the walk visits each once.
				_ = c.RegisterFlagCompletionFunc(name, cobra.FixedCompletions(words, cobra.ShellCompDirectiveNoFileComp))
			}
		}
		for _, s := range c.Commands() {
			walk(s)
		}
	}
	walk(root)
}
