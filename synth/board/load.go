package board

import (
	"errors"
	"fmt"
	"math"
	"path"
	"path/filepath"
	"strings"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/examples"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/synth"
)

// ExamplePrefix marks a board or template argument that names a built-in
// example (example:NAME).
const ExamplePrefix = "example:"

// Board is a board file with every network's template loaded and compiled.
type Board struct {
	Spec     *constraints.Board
	Networks []*Network
}

// Network is one network of a board, ready to search.
type Network struct {
	Spec     constraints.BoardNetwork
	Template *constraints.Template
	Problem  *synth.Problem
	// Cap is the goal-error cap the network's designs must meet: the board's
	// error_max, or when that is not given the largest tolerance among the
	// template's goals, as a goal error (CapFromTolerance).
	Cap              float64
	CapFromTolerance bool
}

// Name is how messages name the network: "network U3 (rail.yaml)".
func (n *Network) Name() string {
	return fmt.Sprintf("network %s (%s)", n.Spec.Prefix, n.Spec.Template)
}

// Load reads a board: a board file, or example:NAME for a built-in board.
// Every error is a *constraints.Error: a problem in the board file at its
// position, or a problem in a template at the template's own position with
// the board entry that named it.
func Load(arg string) (*Board, error) {
	if name, ok := strings.CutPrefix(arg, ExamplePrefix); ok {
		text, ok := examples.Board(name)
		if !ok {
			return nil, &constraints.Error{Msg: fmt.Sprintf("unknown built-in board %q%s; the built-in boards are %s",
				name, constraints.Suggest(name, examples.BoardNames()), strings.Join(examples.BoardNames(), ", "))}
		}
		spec, err := constraints.ParseBoard(arg, text)
		if err != nil {
			return nil, err
		}
		return resolve(spec, embedded{})
	}
	spec, err := constraints.LoadBoard(arg)
	if err != nil {
		return nil, err
	}
	return resolve(spec, disk{dir: spec.Dir})
}

// Parse reads board-file text whose templates are files relative to the
// directory of file (or examples). It is Load without reading the board file.
func Parse(file string, data []byte) (*Board, error) {
	spec, err := constraints.ParseBoard(file, data)
	if err != nil {
		return nil, err
	}
	return resolve(spec, disk{dir: spec.Dir})
}

// opener reads the templates a board names by path.
type opener interface {
	open(rel string) (*constraints.Template, error)
}

// disk reads templates from files relative to the board file's directory.
type disk struct{ dir string }

func (d disk) open(rel string) (*constraints.Template, error) {
	p := rel
	if !filepath.IsAbs(p) {
		p = filepath.Join(d.dir, p)
	}
	return constraints.Load(p)
}

// embedded reads the templates a built-in board names, which sit beside it.
type embedded struct{}

func (embedded) open(rel string) (*constraints.Template, error) {
	text, ok := examples.BoardFile(path.Clean(rel))
	if !ok {
		return nil, &constraints.Error{File: ExamplePrefix + rel, Msg: "cannot open: no such built-in file"}
	}
	return constraints.Parse(ExamplePrefix+rel, text)
}

// resolve loads, compiles and caps every network of a board.
func resolve(spec *constraints.Board, o opener) (*Board, error) {
	b := &Board{Spec: spec}
	for i, ns := range spec.Networks {
		at := func(p constraints.Pos, format string, args ...any) error {
			return &constraints.Error{File: spec.File, Line: p.Line, Col: p.Col,
				Key: fmt.Sprintf("networks[%d]", i), Msg: fmt.Sprintf("network %d (%s): ", i+1, ns.Prefix) + fmt.Sprintf(format, args...)}
		}
		t, err := openTemplate(ns.Template, o)
		if err != nil {
			var ce *constraints.Error
			if errors.As(err, &ce) && ce.Line == 0 {
				// The file itself could not be had (missing, empty, not a
				// file): say so where the board names it.
				return nil, at(ns.TemplatePos, "template %s: %s", ns.Template, ce.Msg)
			}
			return nil, named(err, spec, ns, i)
		}
		cp, err := constraints.Compile(t)
		if err != nil {
			return nil, named(templateErr(t, err), spec, ns, i)
		}
		p, err := synth.NewProblem(cp, "")
		if err != nil {
			return nil, named(templateErr(t, err), spec, ns, i)
		}
		n := &Network{Spec: ns, Template: t, Problem: p, Cap: ns.ErrorMax}
		if !ns.HasErrorMax {
			c, ok := toleranceCap(t)
			if !ok {
				return nil, at(ns.Pos, "error_max is missing and template %s has no goal with a tolerance to take a cap from; add error_max: 1%% (say)", ns.Template)
			}
			n.Cap, n.CapFromTolerance = c, true
		}
		b.Networks = append(b.Networks, n)
	}
	return b, nil
}

// openTemplate reads example:NAME or a path through o.
func openTemplate(ref string, o opener) (*constraints.Template, error) {
	name, ok := strings.CutPrefix(ref, ExamplePrefix)
	if !ok {
		return o.open(ref)
	}
	text, ok := examples.Get(name)
	if !ok {
		return nil, &constraints.Error{Msg: fmt.Sprintf("unknown example %q%s; `ohmfit examples` lists them", name, constraints.Suggest(name, examples.Names()))}
	}
	return constraints.Parse(ref, text)
}

// templateErr gives an error about template t the template's file name.
func templateErr(t *constraints.Template, err error) error {
	var ce *constraints.Error
	if errors.As(err, &ce) {
		return err
	}
	return &constraints.Error{File: t.File, Msg: constraints.Message(err), Err: err}
}

// named adds the board entry that named a template to the template's own
// error, keeping the template's file and position in front.
func named(err error, spec *constraints.Board, ns constraints.BoardNetwork, i int) error {
	var ce *constraints.Error
	if !errors.As(err, &ce) {
		return err
	}
	e := *ce
	e.Msg = fmt.Sprintf("%s (the template of network %d, %s, at %s:%d:%d)", e.Msg, i+1, ns.Prefix, spec.File, ns.TemplatePos.Line, ns.TemplatePos.Col)
	return &e
}

// toleranceCap is the cap a network takes when the board gives no
// error_max: the largest tolerance among the template's goals, written as
// the goal error it allows (a percentage as it is; an absolute tolerance
// divided by |equals|, or as it is when equals is 0, as GoalError reads
// it). When every goal has a tolerance, every design that meets them lies
// within the cap.
// It reports false when no goal has a tolerance.
func toleranceCap(t *constraints.Template) (float64, bool) {
	c, ok := 0.0, false
	for _, tg := range t.Targets {
		if !tg.HasEquals || tg.Tolerance <= 0 {
			continue
		}
		e := tg.Tolerance
		if !tg.TolRelative && tg.Equals != 0 {
			e /= math.Abs(tg.Equals)
		}
		c, ok = math.Max(c, e), true
	}
	return c, ok
}

// capText writes a cap as a percentage: "0.5 %".
func capText(c float64) string { return units.FormatUnit(c, units.Percent) }
