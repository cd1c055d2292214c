package main

import (
	"fmt"
	"io"
	"strings"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/examples"
	"github.com/spf13/cobra"
)

// examplePrefix marks a FILE argument that names a built-in example.
const examplePrefix = "example:"

// examplesOptions are the inputs of `ohmfit examples`.
type examplesOptions struct {
	Name string // "" to list them all

	Out, ErrOut io.Writer
}

// newExamplesCmd builds `ohmfit examples`.
func newExamplesCmd(out, errOut io.Writer) *cobra.Command {
	o := &examplesOptions{Out: out, ErrOut: errOut}
	return &cobra.Command{
		Use:   "examples [NAME]",
		Short: "List the built-in templates and boards, or print a template",
		Long: `Without a name, list the templates built into ohmfit with a line about each,
then the built-in boards (for ohmfit board example:NAME).
With a name, print that template exactly as stored, ready to copy and edit.

Any command that takes a template FILE also accepts example:NAME, which reads
the built-in example of that name, so the examples work on a fresh machine
with no files at hand.`,
		Example: `  # what is there?
  ohmfit examples

  # start a strain-gauge design from the bridge example
  ohmfit examples bridge > strain-gauge.yaml`,
		Args: argsAtMost(1, "at most one argument, an example name"),
		ValidArgsFunction: func(*cobra.Command, []string, string) ([]string, cobra.ShellCompDirective) {
			return examples.Names(), cobra.ShellCompDirectiveNoFileComp
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			if len(args) == 1 {
				o.Name = args[0]
			}
			return runExamples(o)
		},
	}
}

// runExamples lists the examples or prints one verbatim.
func runExamples(o *examplesOptions) error {
	if o.Name != "" {
		text, err := exampleText(o.Name)
		if err != nil {
			return err
		}
		_, err = o.Out.Write(text)
		return err
	}
	t := table{cols: []column{{gap: 4}, {}}}
	for _, name := range examples.Names() {
		t.add(name, examples.Summary(name))
	}
	if err := t.write(o.Out); err != nil {
		return err
	}
	// The built-in boards, for `ohmfit board example:NAME`.
	bt := table{indent: "  ", cols: []column{{gap: 4}, {}}}
	for _, name := range examples.BoardNames() {
		text, _ := examples.Board(name)
		summary := ""
		if b, err := constraints.ParseBoard(name+".yaml", text); err == nil {
			summary = fmt.Sprintf("%s (%d networks)", b.Name, len(b.Networks))
		}
		bt.add(name, summary)
	}
	if len(bt.rows) == 0 {
		return nil
	}
	if _, err := io.WriteString(o.Out, "\nboards, for ohmfit board example:NAME:\n"); err != nil {
		return err
	}
	return bt.write(o.Out)
}

// exampleText returns a built-in example's text, or an error suggesting the
// closest name.
func exampleText(name string) ([]byte, error) {
	text, ok := examples.Get(name)
	if !ok {
		return nil, badInputf("unknown example %q%s; `ohmfit examples` lists them", name, didYouMean(name, examples.Names()))
	}
	return text, nil
}

// loadTemplate reads the template a FILE argument names: a path, or
// example:NAME for a built-in example.
func loadTemplate(arg string, stdin io.Reader) (*constraints.Template, error) {
	if arg == "-" && stdin != nil {
		return constraints.LoadReader(constraints.StdinName, stdin)
	}
	name, ok := strings.CutPrefix(arg, examplePrefix)
	if !ok {
		return constraints.Load(arg)
	}
	text, err := exampleText(name)
	if err != nil {
		return nil, err
	}
	// The example's name stands in for a file name in messages.
	return constraints.Parse(arg, text)
}
